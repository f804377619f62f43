import { ChangeDetectionStrategy, Component, inject } from '@angular/core';
import { FormBuilder, ReactiveFormsModule, Validators } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MAT_DIALOG_DATA, MatDialogModule, MatDialogRef } from '@angular/material/dialog';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatInputModule } from '@angular/material/input';

export interface SignDialogData {
  /** What the signature means, as printed: "Performed by", "Approved by". */
  meaning: string;
  printedName: string;
  /** What the person is signing, in a sentence. */
  statement: string;
  action: string;
}

/** An electronic signature: the person re-enters their own password; the meaning and printed name are shown as they will be recorded. */
@Component({
  selector: 'sw-sign-dialog',
  imports: [ReactiveFormsModule, MatDialogModule, MatFormFieldModule, MatInputModule, MatButtonModule],
  template: `
    <h2 mat-dialog-title>{{ data.action }}</h2>
    <form [formGroup]="form" (ngSubmit)="sign()" novalidate>
      <mat-dialog-content>
        <p>{{ data.statement }}</p>
        <dl class="as-recorded">
          <dt>Meaning</dt>
          <dd>{{ data.meaning }}</dd>
          <dt>Printed name</dt>
          <dd>{{ data.printedName }}</dd>
          <dt>Date and time</dt>
          <dd>recorded when you sign</dd>
        </dl>
        <mat-form-field appearance="outline" class="wide">
          <mat-label>Your password</mat-label>
          <input matInput formControlName="password" type="password" autocomplete="current-password" required />
          @if (form.controls.password.invalid) {
            <mat-error>Enter your password to sign.</mat-error>
          }
        </mat-form-field>
      </mat-dialog-content>
      <mat-dialog-actions align="end">
        <button mat-button type="button" mat-dialog-close>Cancel</button>
        <button mat-flat-button class="sw-primary-action" type="submit">Sign</button>
      </mat-dialog-actions>
    </form>
  `,
  styles: `
    .wide {
      width: 100%;
    }
    .as-recorded {
      display: grid;
      grid-template-columns: max-content 1fr;
      gap: 4px 16px;
      margin: 0 0 16px;
    }
    dt {
      color: var(--mat-sys-on-surface-variant);
    }
    dd {
      margin: 0;
      font-weight: 700;
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class SignDialog {
  protected readonly data = inject<SignDialogData>(MAT_DIALOG_DATA);
  private readonly ref = inject(MatDialogRef<SignDialog, string>);
  protected readonly form = inject(FormBuilder).nonNullable.group({ password: ['', Validators.required] });

  protected sign() {
    if (this.form.invalid) {
      this.form.markAllAsTouched();
      return;
    }
    this.ref.close(this.form.getRawValue().password);
  }
}
