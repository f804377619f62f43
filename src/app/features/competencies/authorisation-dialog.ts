import { DatePipe } from '@angular/common';
import { ChangeDetectionStrategy, Component, inject, signal } from '@angular/core';
import { rxResource } from '@angular/core/rxjs-interop';
import { FormBuilder, ReactiveFormsModule } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MAT_DIALOG_DATA, MatDialogModule, MatDialogRef } from '@angular/material/dialog';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatInputModule } from '@angular/material/input';
import { AUTHORISATION_STATE_LABELS, grantSchema, revokeSchema, type CompetencyCell, type MatrixProcedure } from '@setwright/contracts/competencies';
import type { PersonRef } from '@setwright/contracts/records';
import { applyProblemToForm, toProblem, type Problem } from '../../core/problem';
import { CompetencyApi } from './competency-api';

export interface AuthorisationDialogData {
  person: PersonRef;
  procedure: MatrixProcedure;
  cell: CompetencyCell | null;
  /** The workshop's today (YYYY-MM-DD). */
  today: string;
  /** A competent person other than the person in the row. */
  canGrant: boolean;
  canRevoke: boolean;
}

const addYear = (isoDate: string) => `${Number(isoDate.slice(0, 4)) + 1}${isoDate.slice(4)}`.replace(/-02-29$/, '-02-28');

/** One person on one procedure: runs, the authorisation and its history; grant, renew or withdraw it. */
@Component({
  selector: 'sw-authorisation-dialog',
  imports: [ReactiveFormsModule, MatDialogModule, MatFormFieldModule, MatInputModule, MatButtonModule, DatePipe],
  template: `
    <h2 mat-dialog-title>{{ data.person.displayName }} — {{ data.procedure.title }}</h2>
    <mat-dialog-content>
      <dl>
        <dt>Witnessed runs</dt>
        <dd>{{ data.cell?.witnessedRuns ?? 0 }}</dd>
        <dt>Signed runs</dt>
        <dd>{{ data.cell?.signedRuns ?? 0 }}</dd>
        <dt>Last signed run</dt>
        <dd>{{ data.cell?.lastSignedAt ? (data.cell!.lastSignedAt | date: 'd MMM y') : 'None yet' }}</dd>
        @if (current; as a) {
          <dt>Authorisation</dt>
          <dd>
            <strong>{{ stateLabels[a.state] }}</strong> — valid to {{ a.expiresOn | date: 'd MMM y' }}, granted by {{ a.grantedBy.displayName }} on
            {{ a.grantedAt | date: 'd MMM y' }}@if (a.note) { · {{ a.note }} }
          </dd>
        } @else {
          <dt>Authorisation</dt>
          <dd>Not authorised</dd>
        }
      </dl>

      @if (history.value()?.length) {
        <h3>History</h3>
        <ul class="history" aria-label="Authorisation history, newest first">
          @for (h of history.value(); track h.id) {
            <li>
              {{ h.grantedAt | date: 'd MMM y' }}: granted by {{ h.grantedBy.displayName }}, to {{ h.expiresOn | date: 'd MMM y' }}
              @if (h.endKind) {
                — {{ h.endKind === 'renewed' ? 'renewed' : 'withdrawn' }} {{ h.endedAt | date: 'd MMM y' }}@if (h.endedBy) { by {{ h.endedBy.displayName }} }@if (h.endKind === 'revoked' && h.endReason) { : {{ h.endReason }} }
              }
            </li>
          }
        </ul>
      }

      @if (data.canGrant) {
        <form [formGroup]="grantForm" (ngSubmit)="grant()" novalidate aria-label="Authorise">
          <h3>{{ current ? 'Renew the authorisation' : 'Authorise' }}</h3>
          <p>You certify that {{ data.person.displayName }} is trained and may run this procedure until the date below. Sign with your own password.</p>
          <mat-form-field appearance="outline">
            <mat-label>Valid to</mat-label>
            <input matInput type="date" formControlName="expiresOn" [min]="data.today" required />
            <mat-error>{{ grantForm.controls.expiresOn.errors?.['server'] }}</mat-error>
          </mat-form-field>
          <mat-form-field appearance="outline" class="wide">
            <mat-label>Note (what you saw, any limits)</mat-label>
            <textarea matInput formControlName="note" rows="2" maxlength="1000"></textarea>
            <mat-error>{{ grantForm.controls.note.errors?.['server'] }}</mat-error>
          </mat-form-field>
          <mat-form-field appearance="outline" class="wide">
            <mat-label>Your password</mat-label>
            <input matInput type="password" formControlName="password" autocomplete="current-password" required />
            <mat-error>{{ grantForm.controls.password.errors?.['server'] }}</mat-error>
          </mat-form-field>
          <div class="actions">
            <button mat-flat-button class="sw-primary-action" type="submit" [disabled]="busy()">Sign and authorise</button>
          </div>
        </form>
      }

      @if (data.canRevoke && current) {
        <form [formGroup]="revokeForm" (ngSubmit)="revoke()" novalidate aria-label="Withdraw the authorisation">
          <h3>Withdraw the authorisation</h3>
          <mat-form-field appearance="outline" class="wide">
            <mat-label>Why it is withdrawn</mat-label>
            <input matInput formControlName="reason" maxlength="1000" required />
            <mat-error>{{ revokeForm.controls.reason.errors?.['server'] }}</mat-error>
          </mat-form-field>
          <div class="actions">
            <button mat-stroked-button type="submit" [disabled]="busy()">Withdraw</button>
          </div>
        </form>
      }
      @for (line of problems(); track line) {
        <p class="problem" role="alert">{{ line }}</p>
      }
    </mat-dialog-content>
    <mat-dialog-actions align="end">
      <button mat-button type="button" mat-dialog-close>Close</button>
    </mat-dialog-actions>
  `,
  styles: `
    dl {
      display: grid;
      grid-template-columns: max-content 1fr;
      gap: 6px 16px;
      margin: 0;
    }
    dt {
      color: var(--mat-sys-on-surface-variant);
    }
    dd {
      margin: 0;
    }
    h3 {
      font: var(--mat-sys-title-medium);
      margin: 20px 0 8px;
    }
    .history {
      padding-left: 20px;
      margin: 0;
    }
    .wide {
      width: 100%;
    }
    .actions {
      display: flex;
      justify-content: flex-end;
    }
    .problem {
      color: var(--mat-sys-error);
      font-weight: 500;
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class AuthorisationDialog {
  private readonly api = inject(CompetencyApi);
  private readonly ref = inject(MatDialogRef<AuthorisationDialog, boolean>);
  protected readonly data = inject<AuthorisationDialogData>(MAT_DIALOG_DATA);
  protected readonly current = this.data.cell?.authorisation ?? null;
  protected readonly stateLabels = AUTHORISATION_STATE_LABELS;
  protected readonly history = rxResource({ stream: () => this.api.history(this.data.person.id, this.data.procedure.key) });
  protected readonly busy = signal(false);
  protected readonly problems = signal<string[]>([]);
  private readonly fb = inject(FormBuilder).nonNullable;
  protected readonly grantForm = this.fb.group({ expiresOn: addYear(this.data.today), note: '', password: '' });
  protected readonly revokeForm = this.fb.group({ reason: '' });

  protected async grant() {
    const v = this.grantForm.getRawValue();
    const body = { personId: this.data.person.id, procedureKey: this.data.procedure.key, expiresOn: v.expiresOn, note: v.note.trim() || undefined, password: v.password };
    const checked = grantSchema.safeParse(body);
    await this.send(this.grantForm, checked.success ? null : checked.error.issues, () => this.api.grant(body));
  }

  protected async revoke() {
    const body = { reason: this.revokeForm.getRawValue().reason.trim() };
    const checked = revokeSchema.safeParse(body);
    await this.send(this.revokeForm, checked.success ? null : checked.error.issues, () => this.api.revoke(this.current!.id, body.reason));
  }

  private async send(form: Parameters<typeof applyProblemToForm>[0], issues: { path: PropertyKey[]; message: string }[] | null, call: () => Promise<unknown>) {
    this.problems.set([]);
    if (issues) {
      this.show(form, { type: '/problems/validation', title: 'Some fields need correcting', status: 400, errors: issues.map((i) => ({ pointer: '#/' + i.path.map(String).join('/'), detail: i.message })) });
      return;
    }
    this.busy.set(true);
    try {
      await call();
      this.ref.close(true);
    } catch (err) {
      this.show(form, toProblem(err));
    } finally {
      this.busy.set(false);
    }
  }

  private show(form: Parameters<typeof applyProblemToForm>[0], problem: Problem) {
    const left = applyProblemToForm(form, problem);
    const lines = left.map((e) => e.detail);
    if (!problem.errors?.length) lines.push(problem.detail ?? problem.title);
    this.problems.set(lines);
  }
}
