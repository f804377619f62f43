import { DatePipe } from '@angular/common';
import { ChangeDetectionStrategy, Component, computed, inject } from '@angular/core';
import { rxResource } from '@angular/core/rxjs-interop';
import { MatButtonModule } from '@angular/material/button';
import { MatExpansionModule } from '@angular/material/expansion';
import { MatIconModule } from '@angular/material/icon';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { toProblem } from '../../core/problem';
import { PeopleApi } from './people-api';
import { PeopleTabs } from './people-tabs';

/**
 * Mail: what the local SMTP stand-in received, newest first (development only; in production the
 * server sends to a real relay and has no such mailbox).
 */
@Component({
  selector: 'sw-mail-list',
  imports: [DatePipe, MatButtonModule, MatExpansionModule, MatIconModule, MatProgressBarModule, PeopleTabs],
  template: `
    <div class="sw-page">
      <div class="head">
        <h1>People</h1>
        <button mat-stroked-button type="button" (click)="mail.reload()" [disabled]="mail.isLoading()">
          <mat-icon>refresh</mat-icon> Look again
        </button>
      </div>
      <sw-people-tabs>
        <p class="lede">E-mail as the local stand-in for the mail relay received it. Nothing here left the building.</p>
        @if (mail.isLoading()) {
          <mat-progress-bar mode="indeterminate" aria-label="Loading the mail" />
        }
        @if (unavailable(); as message) {
          <p role="alert">{{ message }}</p>
        } @else {
          <mat-accordion multi>
            @for (m of mail.value() ?? []; track m.id) {
              <mat-expansion-panel>
                <mat-expansion-panel-header>
                  <mat-panel-title>{{ m.subject }}</mat-panel-title>
                  <mat-panel-description>{{ m.to.join(', ') }} · {{ m.receivedAt | date: 'd MMM, HH:mm:ss' }}</mat-panel-description>
                </mat-expansion-panel-header>
                <p class="from">From {{ m.from }}</p>
                @if (m.links.length) {
                  <ul class="links" aria-label="Links in this message">
                    @for (link of m.links; track link) {
                      <li><a [href]="link">{{ link }}</a></li>
                    }
                  </ul>
                }
                <pre>{{ m.text }}</pre>
              </mat-expansion-panel>
            } @empty {
              @if (!mail.isLoading()) {
                <p class="none">No mail yet.</p>
              }
            }
          </mat-accordion>
        }
      </sw-people-tabs>
    </div>
  `,
  styles: `
    .head {
      display: flex;
      flex-wrap: wrap;
      align-items: center;
      justify-content: space-between;
      gap: 12px;
      margin-bottom: 8px;
    }
    .head h1 {
      margin: 0;
    }
    .lede,
    .from,
    .none {
      color: var(--mat-sys-on-surface-variant);
    }
    pre {
      white-space: pre-wrap;
      overflow-wrap: anywhere;
      font: var(--mat-sys-body-medium);
      background: var(--mat-sys-surface-container);
      padding: 12px;
      border-radius: 6px;
    }
    .links a {
      display: inline-block;
      min-height: var(--sw-touch);
      line-height: var(--sw-touch);
      overflow-wrap: anywhere;
    }
    mat-panel-title {
      font-weight: 500;
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class MailList {
  private readonly api = inject(PeopleApi);
  protected readonly mail = rxResource({ stream: () => this.api.standInMail() });
  protected readonly unavailable = computed(() => {
    const error = this.mail.error();
    if (!error) return null;
    // A resource wraps what was thrown when it is not an Error (the interceptor throws a Problem).
    const problem = toProblem((error as { cause?: unknown }).cause ?? error);
    return problem.status === 404
      ? 'There is no stand-in mailbox here: this server sends e-mail to a real mail relay.'
      : `The mail could not be loaded: ${problem.detail ?? problem.title}`;
  });
}
