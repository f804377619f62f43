import { DatePipe } from '@angular/common';
import { ChangeDetectionStrategy, Component, computed, inject } from '@angular/core';
import { rxResource } from '@angular/core/rxjs-interop';
import { MatIconModule } from '@angular/material/icon';
import { RouterLink } from '@angular/router';
import { DUE_STATE_LABELS } from '@setwright/contracts/schedules';
import { of } from 'rxjs';
import { Session } from '../../core/session';
import { MachineApi } from '../machines/machine-api';

/** Today's checks: machines tagged out, then checks overdue, due and due soon, across the register. */
@Component({
  selector: 'sw-due-checks',
  imports: [DatePipe, MatIconModule, RouterLink],
  template: `
    @if (acts()) {
      @if (taggedOut().length) {
        <section aria-labelledby="tagged-out-title" class="tagged-out">
          <h2 id="tagged-out-title"><mat-icon aria-hidden="true">block</mat-icon> Machines tagged out</h2>
          <ul>
            @for (t of taggedOut(); track t.machine.id) {
              <li>
                <a [routerLink]="['/machines', t.machine.id]">{{ t.machine.name }}</a>
                <span class="meta">“{{ t.procedureTitle }}” failed {{ t.doneAt | date: 'd MMM y' }} · {{ t.machine.location }}</span>
              </li>
            }
          </ul>
        </section>
      }
      <section aria-labelledby="due-checks-title">
        <h2 id="due-checks-title">Checks due</h2>
        <ul class="due">
          @for (i of items(); track i.machine.id + i.procedureKey) {
            <li [class.now]="i.state === 'due' || i.state === 'overdue'">
              <a [routerLink]="['/machines', i.machine.id]">{{ i.procedureTitle }} — {{ i.machine.name }}</a>
              <span class="meta"><strong>{{ labels[i.state] }}</strong> · {{ i.state === 'soon' ? 'due' : 'since' }} {{ i.dueAt | date: 'd MMM y' }}@if (i.reasons[0]; as r) { · {{ r }} }</span>
            </li>
          } @empty {
            @if (!due.isLoading()) { <li class="none">No checks are due in the next few days.</li> }
          }
        </ul>
      </section>
    }
  `,
  styles: `
    ul {
      list-style: none;
      padding: 0;
      margin: 0 0 16px;
    }
    li {
      display: flex;
      flex-wrap: wrap;
      justify-content: space-between;
      gap: 4px 12px;
      align-items: center;
      min-height: 56px;
      padding: 6px 12px;
      border-bottom: 1px solid var(--mat-sys-outline-variant);
    }
    li a {
      min-height: 48px;
      display: inline-flex;
      align-items: center;
      font-weight: 500;
    }
    .meta {
      color: var(--mat-sys-on-surface-variant);
    }
    .due li.now {
      box-shadow: inset 6px 0 0 var(--sw-safety-warning);
      padding-left: 20px;
    }
    .tagged-out {
      border: 3px solid var(--sw-safety-prohibition);
      border-radius: 8px;
      padding: 0 12px;
      margin-bottom: 16px;
      h2 {
        display: flex;
        align-items: center;
        gap: 8px;
        color: var(--sw-safety-prohibition);
      }
    }
    .none {
      color: var(--mat-sys-on-surface-variant);
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class DueChecks {
  private readonly session = inject(Session);
  private readonly api = inject(MachineApi);
  /** The roles that act on due checks (the API refuses the others). */
  protected readonly acts = computed(() => this.session.hasAnyRole(['trainee', 'competent_person', 'workshop_admin']));
  protected readonly due = rxResource({ params: () => this.acts(), stream: ({ params }) => (params ? this.api.due() : of(null)) });
  protected readonly items = computed(() => this.due.value()?.items ?? []);
  protected readonly taggedOut = computed(() => this.due.value()?.taggedOut ?? []);
  protected readonly labels = DUE_STATE_LABELS;
}
