import { ChangeDetectionStrategy, Component, inject } from '@angular/core';
import { FormBuilder, ReactiveFormsModule, Validators } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MAT_DIALOG_DATA, MatDialogModule, MatDialogRef } from '@angular/material/dialog';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';

export interface WitnessDialogData {
  stepTitle: string;
  /** A message from the last attempt (wrong password, not a competent person…). */
  problem?: string;
  email?: string;
}
export interface WitnessCredentials {
  email: string;
  password: string;
}

/** The competent person enters their own sign-in on the trainee's tablet to witness a powered step. */
@Component({
  selector: 'sw-witness-dialog',
  imports: [ReactiveFormsModule, MatDialogModule, MatFormFieldModule, MatInputModule, MatButtonModule, MatIconModule],
  template: `
    <h2 mat-dialog-title>Witness: {{ data.stepTitle }}</h2>
    <form [formGroup]="form" (ngSubmit)="confirm()" novalidate>
      <mat-dialog-content>
        <p class="badge"><mat-icon aria-hidden="true">bolt</mat-icon> Power on — witness needed</p>
        <p>
          A competent person who watched this check enters their own email and password. By doing so they confirm they
          saw it done safely and as the step describes.
        </p>
        @if (data.problem) {
          <p class="problem" role="alert">{{ data.problem }}</p>
        }
        <mat-form-field appearance="outline">
          <mat-label>Witness email</mat-label>
          <input matInput formControlName="email" type="email" autocomplete="off" required />
          @if (form.controls.email.invalid) {
            <mat-error>Enter the witness’s email address.</mat-error>
          }
        </mat-form-field>
        <mat-form-field appearance="outline">
          <mat-label>Witness password</mat-label>
          <input matInput formControlName="password" type="password" autocomplete="off" required />
          @if (form.controls.password.invalid) {
            <mat-error>The witness enters their password.</mat-error>
          }
        </mat-form-field>
      </mat-dialog-content>
      <mat-dialog-actions align="end">
        <button mat-button type="button" mat-dialog-close>Cancel</button>
        <button mat-flat-button class="sw-primary-action" type="submit">Witness and save</button>
      </mat-dialog-actions>
    </form>
  `,
  styles: `
    mat-form-field {
      width: 100%;
    }
    .badge {
      display: inline-flex;
      align-items: center;
      gap: 6px;
      padding: 6px 10px;
      font-weight: 700;
      background: var(--sw-safety-warning);
      color: #000;
      border-radius: 4px;
    }
    .problem {
      color: var(--mat-sys-error);
      font-weight: 500;
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class WitnessDialog {
  protected readonly data = inject<WitnessDialogData>(MAT_DIALOG_DATA);
  private readonly ref = inject(MatDialogRef<WitnessDialog, WitnessCredentials>);
  protected readonly form = inject(FormBuilder).nonNullable.group({
    email: [this.data.email ?? '', [Validators.required, Validators.email]],
    password: ['', Validators.required],
  });

  protected confirm() {
    if (this.form.invalid) {
      this.form.markAllAsTouched();
      return;
    }
    this.ref.close(this.form.getRawValue());
  }
}
