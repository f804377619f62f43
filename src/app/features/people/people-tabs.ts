import { ChangeDetectionStrategy, Component, isDevMode } from '@angular/core';
import { MatTabsModule } from '@angular/material/tabs';
import { RouterLink, RouterLinkActive } from '@angular/router';

/** The tabs of the People place. Mail is the local SMTP stand-in's mailbox, so it is there in development only. */
@Component({
  selector: 'sw-people-tabs',
  imports: [MatTabsModule, RouterLink, RouterLinkActive],
  template: `
    <!-- One tab alone is no choice, so the bar shows only when there are more. -->
    @if (tabs.length > 1) {
      <nav mat-tab-nav-bar [tabPanel]="panel" aria-label="People area">
        @for (tab of tabs; track tab.path) {
          <a mat-tab-link [routerLink]="tab.path" routerLinkActive #rla="routerLinkActive" [routerLinkActiveOptions]="{ exact: true }" [active]="rla.isActive">
            {{ tab.label }}
          </a>
        }
      </nav>
    }
    <mat-tab-nav-panel #panel><ng-content /></mat-tab-nav-panel>
  `,
  styles: `
    nav {
      margin-bottom: 16px;
    }
    a[mat-tab-link] {
      min-height: var(--sw-touch);
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class PeopleTabs {
  protected readonly tabs = [
    { path: '/people', label: 'People' },
    ...(isDevMode() ? [{ path: '/people/mail', label: 'Mail' }] : []),
  ];
}
