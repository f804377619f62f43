import { BreakpointObserver } from '@angular/cdk/layout';
import { ChangeDetectionStrategy, Component, computed, inject } from '@angular/core';
import { toSignal } from '@angular/core/rxjs-interop';
import { MatButtonModule } from '@angular/material/button';
import { MatIconModule } from '@angular/material/icon';
import { MatListModule } from '@angular/material/list';
import { MatMenuModule } from '@angular/material/menu';
import { MatSidenavModule } from '@angular/material/sidenav';
import { MatToolbarModule } from '@angular/material/toolbar';
import { RouterLink, RouterLinkActive, RouterOutlet } from '@angular/router';
import { map } from 'rxjs';
import { ROLE_LABELS } from '@setwright/contracts/roles';
import { ConnectionStatus } from './offline/connection-status';
import { PLACES } from './places';
import { Session } from './session';

/** The frame around every signed-in page: a toolbar, the places the person may open, and the page. */
@Component({
  selector: 'sw-shell',
  imports: [RouterOutlet, RouterLink, RouterLinkActive, MatToolbarModule, MatSidenavModule, MatListModule, MatButtonModule, MatIconModule, MatMenuModule, ConnectionStatus],
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

  protected signOut() {
    void this.session.signOut();
  }
}
