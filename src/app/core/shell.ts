import { BreakpointObserver } from '@angular/cdk/layout';
import { ChangeDetectionStrategy, Component, computed, inject } from '@angular/core';
import { toSignal } from '@angular/core/rxjs-interop';
import { MatButtonModule } from '@angular/material/button';
import { MatIconModule } from '@angular/material/icon';
import { MatListModule } from '@angular/material/list';
import { MatMenuModule } from '@angular/material/menu';
import { MatSidenavModule } from '@angular/material/sidenav';
import { MatToolbarModule } from '@angular/material/toolbar';
import { NavigationEnd, Router, RouterLink, RouterOutlet } from '@angular/router';
import { filter, map } from 'rxjs';
import { ROLE_LABELS } from '@setwright/contracts/roles';
import { ConnectionStatus } from './offline/connection-status';
import { isFocusedPage, PLACES, placeOf } from './places';
import { Session } from './session';

/** The frame around every signed-in page: a toolbar, the places the person may open, and the page. */
@Component({
  selector: 'sw-shell',
  imports: [RouterOutlet, RouterLink, MatToolbarModule, MatSidenavModule, MatListModule, MatButtonModule, MatIconModule, MatMenuModule, ConnectionStatus],
  templateUrl: './shell.html',
  styleUrl: './shell.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class Shell {
  private readonly session = inject(Session);
  protected readonly user = this.session.user;
  protected readonly places = computed(() => PLACES.filter((p) => this.session.hasAnyRole(p.roles)));
  protected readonly roleText = computed(() => this.session.roles().map((r) => ROLE_LABELS[r]).join(' · '));
  protected readonly wide = toSignal(inject(BreakpointObserver).observe('(min-width: 900px)').pipe(map((s) => s.matches)), {
    initialValue: true,
  });
  private readonly router = inject(Router);
  private readonly url = toSignal(
    this.router.events.pipe(
      filter((e): e is NavigationEnd => e instanceof NavigationEnd),
      map((e) => e.urlAfterRedirects),
    ),
    { initialValue: this.router.url },
  );
  /** One place is marked as the current one: the most specific place the address is in. */
  protected readonly current = computed(() => placeOf(this.places(), this.url()));
  /** On the runner the places fold away behind the menu button, even on a wide screen. */
  protected readonly focused = computed(() => isFocusedPage(this.url()));
  protected readonly sideBySide = computed(() => this.wide() && !this.focused());

  protected signOut() {
    void this.session.signOut();
  }
}
