import { ChangeDetectionStrategy, Component, inject, signal } from '@angular/core';
import { FormBuilder, ReactiveFormsModule } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MAT_DIALOG_DATA, MatDialogModule, MatDialogRef } from '@angular/material/dialog';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatInputModule } from '@angular/material/input';
import { MatRadioModule } from '@angular/material/radio';
import { REMOVAL_REASON_LABELS, REMOVAL_REASONS, removalSchema, type FittingDetail, type FittingView, type RemovalReason } from '@setwright/contracts/blades';
import { applyProblemToForm, toProblem, type Problem } from '../../core/problem';
import { BladeApi } from './blade-api';

/** Take the blade off the saw outside a blade change, saying why. Competent persons and workshop admins. */
@Component({
  selector: 'sw-removal-dialog',
  imports: [ReactiveFormsModule, MatDialogModule, MatRadioModule, MatFormFieldModule, MatInputModule, MatButtonModule],
  template: `
    <h2 mat-dialog-title>Take this blade off</h2>
    <form [formGroup]="form" (ngSubmit)="save()" novalidate>
      <mat-dialog-content>
        <p>{{ fitting.bladeType.label }}. The next blade change records the blade that goes on.</p>
        <p id="reason-label" class="label">Why is it coming off?</p>
        <mat-radio-group formControlName="reason" aria-labelledby="reason-label" class="reasons">
          @for (r of reasons; track r) {
            <mat-radio-button [value]="r">{{ labels[r] }}</mat-radio-button>
          }
        </mat-radio-group>
        @if (form.controls.reason.errors?.['server']; as e) {
          <p class="problem" role="alert">{{ e }}</p>
        }
        <mat-form-field appearance="outline" class="wide">
          <mat-label>Note{{ form.controls.reason.value === 'other' ? '' : ' (optional)' }}</mat-label>
          <textarea matInput formControlName="note" rows="3" maxlength="500"></textarea>
          <mat-error>{{ form.controls.note.errors?.['server'] }}</mat-error>
        </mat-form-field>
        @for (line of problems(); track line) {
          <p class="problem" role="alert">{{ line }}</p>
        }
      </mat-dialog-content>
      <mat-dialog-actions align="end">
        <button mat-button type="button" mat-dialog-close>Cancel</button>
        <button mat-flat-button class="sw-primary-action" type="submit" [disabled]="saving()">Take it off</button>
      </mat-dialog-actions>
    </form>
  `,
  styles: `
    .reasons {
      display: flex;
      flex-direction: column;
      margin-bottom: 12px;
    }
    .reasons mat-radio-button {
      min-height: 48px;
      display: flex;
      align-items: center;
    }
    .label {
      font-weight: 500;
      margin-bottom: 4px;
    }
    .wide {
      width: 100%;
    }
    .problem {
      color: var(--mat-sys-error);
      font-weight: 500;
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class RemovalDialog {
  private readonly api = inject(BladeApi);
  private readonly ref = inject(MatDialogRef<RemovalDialog, FittingDetail>);
  protected readonly fitting = inject<FittingView>(MAT_DIALOG_DATA);
  protected readonly reasons = REMOVAL_REASONS;
  protected readonly labels = REMOVAL_REASON_LABELS;
  protected readonly saving = signal(false);
  protected readonly problems = signal<string[]>([]);
  protected readonly form = inject(FormBuilder).nonNullable.group({ reason: '' as RemovalReason | '', note: '' });

  protected async save() {
    this.problems.set([]);
    const v = this.form.getRawValue();
    const body = { reason: v.reason || undefined, note: v.note.trim() || undefined };
    const checked = removalSchema.safeParse(body);
    if (!checked.success) {
      this.show({ type: '/problems/validation', title: 'Some fields need correcting', status: 400, errors: checked.error.issues.map((i) => ({ pointer: '#/' + i.path.map(String).join('/'), detail: i.message })) });
      return;
    }
    this.saving.set(true);
    try {
      this.ref.close(await this.api.remove(this.fitting.id, checked.data.reason, checked.data.note));
    } catch (err) {
      this.show(toProblem(err));
    } finally {
      this.saving.set(false);
    }
  }

  private show(problem: Problem) {
    const left = applyProblemToForm(this.form, problem);
    const lines = left.map((e) => e.detail);
    if (!problem.errors?.length) lines.push(problem.detail ?? problem.title);
    this.problems.set(lines);
  }
}
