import { ChangeDetectionStrategy, Component, effect, inject, input, signal } from '@angular/core';
import { rxResource } from '@angular/core/rxjs-interop';
import { FormArray, FormControl, FormGroup, ReactiveFormsModule } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatCheckboxModule } from '@angular/material/checkbox';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatInputModule } from '@angular/material/input';
import { SCHEDULE_TRIGGER_LABELS, SCHEDULE_TRIGGERS, type ScheduleTrigger, type ScheduleView } from '@setwright/contracts/schedules';
import { toProblem } from '../../core/problem';
import { RecordApi } from '../records/record-api';
import { MachineApi } from './machine-api';

function row(key: string, title: string, s?: ScheduleView) {
  return new FormGroup({
    procedureKey: new FormControl(key, { nonNullable: true }),
    title: new FormControl(title, { nonNullable: true }),
    intervalDays: new FormControl<number | null>(s?.intervalDays ?? null),
    after_blade_change: new FormControl(s?.triggers.includes('after_blade_change') ?? false, { nonNullable: true }),
    after_relocation: new FormControl(s?.triggers.includes('after_relocation') ?? false, { nonNullable: true }),
    after_failed_check: new FormControl(s?.triggers.includes('after_failed_check') ?? false, { nonNullable: true }),
    allowedWhileTaggedOut: new FormControl(s?.allowedWhileTaggedOut ?? false, { nonNullable: true }),
  });
}
type Row = ReturnType<typeof row>;

/** When each procedure falls due on this machine: every so many days and/or after events; and what may run while it is tagged out. */
@Component({
  selector: 'sw-schedule-form',
  imports: [ReactiveFormsModule, MatButtonModule, MatCheckboxModule, MatFormFieldModule, MatInputModule],
  template: `
    <h2 id="schedules-title">Check schedules</h2>
    <p class="hint">Leave a procedure blank to leave it unscheduled. A check falls due at its last pass plus the interval, or at once after a chosen event.</p>
    <form [formGroup]="form" (ngSubmit)="save()" aria-labelledby="schedules-title" novalidate>
      <ul formArrayName="rows" class="rows">
        @for (r of form.controls.rows.controls; track r.controls.procedureKey.value; let i = $index) {
          <li [formGroupName]="i">
            <h3>{{ r.controls.title.value }}</h3>
            <mat-form-field appearance="outline" class="interval">
              <mat-label>Every</mat-label>
              <input matInput type="number" inputmode="numeric" min="1" step="1" formControlName="intervalDays" />
              <span matTextSuffix>days</span>
              <mat-error>{{ r.controls.intervalDays.getError('server') }}</mat-error>
            </mat-form-field>
            <div class="checks" role="group" [attr.aria-label]="'When ' + r.controls.title.value + ' falls due'">
              @for (t of triggers; track t.value) {
                <mat-checkbox [formControlName]="t.value">{{ t.label }}</mat-checkbox>
              }
              <mat-checkbox formControlName="allowedWhileTaggedOut">May be run while the machine is tagged out</mat-checkbox>
            </div>
            @for (p of rowProblems()[i] ?? []; track p) { <p class="problem" role="alert">{{ p }}</p> }
          </li>
        }
      </ul>
      @if (message(); as m) { <p class="message" role="status">{{ m }}</p> }
      <button mat-flat-button type="submit" [disabled]="saving()">{{ saving() ? 'Saving…' : 'Save schedules' }}</button>
    </form>
  `,
  styles: `
    .hint {
      color: var(--mat-sys-on-surface-variant);
    }
    .rows {
      list-style: none;
      padding: 0;
      margin: 0 0 16px;
    }
    li {
      display: flex;
      flex-wrap: wrap;
      gap: 4px 24px;
      align-items: center;
      padding: 8px 0 12px;
      border-bottom: 1px solid var(--mat-sys-outline-variant);
    }
    h3 {
      flex: 1 1 100%;
      margin: 4px 0;
      font: var(--mat-sys-title-small);
    }
    .interval {
      width: 180px;
    }
    .checks {
      display: flex;
      flex-wrap: wrap;
      gap: 0 16px;
    }
    .problem {
      color: var(--mat-sys-error);
      flex-basis: 100%;
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class ScheduleForm {
  private readonly api = inject(MachineApi);
  private readonly records = inject(RecordApi);
  readonly machineId = input.required<string>();
  readonly kind = input.required<string>();
  readonly schedules = input.required<ScheduleView[]>();

  protected readonly procedures = rxResource({ params: () => this.kind(), stream: ({ params }) => this.records.procedures(params) });
  protected readonly form = new FormGroup({ rows: new FormArray<Row>([]) });
  protected readonly triggers = SCHEDULE_TRIGGERS.map((t) => ({ value: t, label: SCHEDULE_TRIGGER_LABELS[t] }));
  protected readonly saving = signal(false);
  protected readonly message = signal<string | null>(null);
  protected readonly rowProblems = signal<Record<number, string[] | undefined>>({});

  constructor() {
    effect(() => {
      const procedures = this.procedures.value() ?? [];
      const current = new Map(this.schedules().map((s) => [s.procedureKey, s]));
      const rows = this.form.controls.rows;
      rows.clear();
      for (const p of procedures) rows.push(row(p.key, p.title, current.get(p.key)));
      // A schedule of a procedure with no approved version now still shows, so it can be removed.
      for (const s of this.schedules()) if (!procedures.some((p) => p.key === s.procedureKey)) rows.push(row(s.procedureKey, s.procedureTitle, s));
    });
  }

  protected async save() {
    this.message.set(null);
    this.rowProblems.set({});
    const rows = this.form.controls.rows.controls;
    const sent = rows
      .map((r, i) => ({ r: r.getRawValue(), i }))
      .filter(({ r }) => r.intervalDays !== null || r.allowedWhileTaggedOut || SCHEDULE_TRIGGERS.some((t) => r[t]));
    const body = {
      schedules: sent.map(({ r }) => ({
        procedureKey: r.procedureKey,
        intervalDays: r.intervalDays,
        triggers: SCHEDULE_TRIGGERS.filter((t): t is ScheduleTrigger => r[t]),
        allowedWhileTaggedOut: r.allowedWhileTaggedOut,
      })),
    };
    this.saving.set(true);
    try {
      await this.api.saveSchedules(this.machineId(), body);
      this.message.set('Schedules saved.');
    } catch (err) {
      const problem = toProblem(err);
      const byRow: Record<number, string[] | undefined> = {};
      for (const e of problem.errors ?? []) {
        const m = /^#\/schedules\/(\d+)\/([^/]+)/.exec(e.pointer);
        const at = m ? sent[Number(m[1])] : undefined;
        if (at && m![2] === 'intervalDays') {
          rows[at.i]!.controls.intervalDays.setErrors({ server: e.detail });
          rows[at.i]!.controls.intervalDays.markAsTouched();
        } else if (at) {
          (byRow[at.i] ??= []).push(e.detail);
        } else {
          this.message.set(e.detail);
        }
      }
      if (!problem.errors?.length) this.message.set(problem.detail ?? problem.title);
      this.rowProblems.set(byRow);
    } finally {
      this.saving.set(false);
    }
  }
}
