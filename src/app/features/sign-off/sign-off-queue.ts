import { ChangeDetectionStrategy, Component, inject } from '@angular/core';
import { rxResource } from '@angular/core/rxjs-interop';
import { DatePipe } from '@angular/common';
import { MatIconModule } from '@angular/material/icon';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { RouterLink } from '@angular/router';
import { SignOffApi } from './sign-off-api';

/** To sign: records waiting for a competent person, newest first, with what stands out at a glance. */
@Component({
  selector: 'sw-sign-off-queue',
  imports: [RouterLink, DatePipe, MatIconModule, MatProgressBarModule],
  template: `
    <div class="sw-page">
      <h1>To sign</h1>
      @if (queue.isLoading()) {
        <mat-progress-bar mode="indeterminate" aria-label="Loading records waiting for sign-off" />
      }
      <ul class="queue" aria-label="Records waiting for sign-off">
        @for (r of queue.value() ?? []; track r.id) {
          <li>
            <a [routerLink]="['/to-sign', r.id]" class="item">
              <span class="what">
                <strong>{{ r.procedure.title }}</strong>
                <span>{{ r.machine.name }} · {{ r.machine.assetTag }}</span>
              </span>
              <span class="who">{{ r.startedBy.displayName }} · finished {{ r.finishedAt | date: 'd MMM, HH:mm' }}</span>
              <span class="flags">
                @if (r.outOfLimitsSteps) {
                  <span class="flag fail"><mat-icon aria-hidden="true">cancel</mat-icon>{{ r.outOfLimitsSteps }} out of limits</span>
                } @else {
                  <span class="flag pass"><mat-icon aria-hidden="true">check_circle</mat-icon>All within limits</span>
                }
                @if (r.witnessedSteps) {
                  <span class="flag">{{ r.witnessedSteps }} witnessed</span>
                }
              </span>
            </a>
          </li>
        } @empty {
          @if (!queue.isLoading()) {
            <li class="none">Nothing is waiting for your signature.</li>
          }
        }
      </ul>
    </div>
  `,
  styles: `
    .queue {
      list-style: none;
      padding: 0;
      margin: 0;
      display: flex;
      flex-direction: column;
      gap: 10px;
    }
    .item {
      display: grid;
      grid-template-columns: 1fr auto;
      gap: 4px 16px;
      padding: 14px 16px;
      min-height: 56px;
      border-radius: 8px;
      background: var(--mat-sys-surface-container-lowest);
      border: 1px solid var(--mat-sys-outline-variant);
      color: inherit;
      text-decoration: none;
    }
    .item:hover {
      border-color: var(--mat-sys-primary);
    }
    .what {
      display: flex;
      flex-direction: column;
    }
    .who {
      color: var(--mat-sys-on-surface-variant);
      text-align: right;
    }
    .flags {
      grid-column: 1 / -1;
      display: flex;
      gap: 8px;
      flex-wrap: wrap;
    }
    .flag {
      display: inline-flex;
      align-items: center;
      gap: 4px;
      padding: 2px 8px;
      border-radius: 4px;
      background: var(--mat-sys-secondary-container);
      font-weight: 500;
    }
    .flag.fail {
      background: var(--sw-safety-prohibition);
      color: #fff;
    }
    .flag.pass {
      background: var(--sw-safety-safe);
      color: #fff;
    }
    .none {
      color: var(--mat-sys-on-surface-variant);
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class SignOffQueue {
  private readonly api = inject(SignOffApi);
  protected readonly queue = rxResource({ stream: () => this.api.queue() });
}
