import { ChangeDetectionStrategy, Component, inject } from '@angular/core';
import { FormBuilder, ReactiveFormsModule, Validators } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatDialogModule, MatDialogRef } from '@angular/material/dialog';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatInputModule } from '@angular/material/input';

/** Send a record back: the reason goes to the trainee, and stays in the record's history. */
@Component({
  selector: 'sw-send-back-dialog',
  imports: [ReactiveFormsModule, MatDialogModule, MatFormFieldModule, MatInputModule, MatButtonModule],
  template: `
    <h2 mat-dialog-title>Send back for correction</h2>
    <form [formGroup]="form" (ngSubmit)="send()" novalidate>
      <mat-dialog-content>
        <p>Say what needs correcting. The trainee sees this, corrects the steps, and finishes the record again. Both versions are kept.</p>
        <mat-form-field appearance="outline" class="wide">
          <mat-label>What needs correcting</mat-label>
          <textarea matInput formControlName="reason" rows="4" maxlength="2000" required></textarea>
          @if (form.controls.reason.invalid) {
            <mat-error>Say what needs correcting (at least a few words).</mat-error>
          }
        </mat-form-field>
      </mat-dialog-content>
      <mat-dialog-actions align="end">
        <button mat-button type="button" mat-dialog-close>Cancel</button>
        <button mat-flat-button type="submit">Send back</button>
      </mat-dialog-actions>
    </form>
  `,
  styles: `
    .wide {
      width: 100%;
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class SendBackDialog {
  private readonly ref = inject(MatDialogRef<SendBackDialog, string>);
  protected readonly form = inject(FormBuilder).nonNullable.group({ reason: ['', [Validators.required, Validators.minLength(5)]] });

  protected send() {
    if (this.form.invalid) {
      this.form.markAllAsTouched();
      return;
    }
    this.ref.close(this.form.getRawValue().reason.trim());
  }
}
