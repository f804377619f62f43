import { ChangeDetectionStrategy, Component, inject, signal } from '@angular/core';
import { FormBuilder, ReactiveFormsModule, Validators } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatChipsModule } from '@angular/material/chips';
import { MatDialogModule, MatDialogRef } from '@angular/material/dialog';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatInputModule } from '@angular/material/input';
import type { PersonSummary } from '@setwright/contracts/people';
import type { Role } from '@setwright/contracts/roles';
import { applyProblemToForm, toProblem } from '../../core/problem';
import { PeopleApi } from './people-api';
import { ROLE_CHOICES } from './role-words';

/** Invite someone: their email, the name that prints on records, and their roles. Closes with the new person. */
@Component({
  selector: 'sw-invite-dialog',
  imports: [ReactiveFormsModule, MatDialogModule, MatFormFieldModule, MatInputModule, MatButtonModule, MatChipsModule],
  template: `
    <h2 mat-dialog-title>Invite someone</h2>
    <form [formGroup]="form" (ngSubmit)="send()" novalidate>
      <mat-dialog-content>
        <p>They get an e-mail with a link to choose their password. The link works once, for 72 hours.</p>
        <mat-form-field appearance="outline" class="wide">
          <mat-label>Email</mat-label>
          <input matInput formControlName="email" type="email" inputmode="email" autocomplete="off" required />
          @if (form.controls.email.hasError('required')) {
            <mat-error>Enter their email address.</mat-error>
          } @else if (form.controls.email.hasError('email')) {
            <mat-error>Enter a valid email address.</mat-error>
          } @else if (form.controls.email.hasError('server')) {
            <mat-error>{{ form.controls.email.getError('server') }}</mat-error>
          }
        </mat-form-field>
        <mat-form-field appearance="outline" class="wide">
          <mat-label>Name as it prints on records</mat-label>
          <input matInput formControlName="displayName" autocomplete="off" maxlength="120" required />
          @if (form.controls.displayName.hasError('required') || form.controls.displayName.hasError('minlength')) {
            <mat-error>Enter their name as it should print on records.</mat-error>
          } @else if (form.controls.displayName.hasError('server')) {
            <mat-error>{{ form.controls.displayName.getError('server') }}</mat-error>
          }
        </mat-form-field>
        <p class="label" id="invite-roles">Roles</p>
        <mat-chip-listbox formControlName="roles" multiple aria-labelledby="invite-roles" class="roles">
          @for (c of choices; track c.role) {
            <mat-chip-option [value]="c.role">{{ c.label }}</mat-chip-option>
          }
        </mat-chip-listbox>
        @if (form.controls.roles.touched && form.controls.roles.invalid) {
          <p class="field-error" role="alert">{{ form.controls.roles.getError('server') ?? 'Give at least one role.' }}</p>
        }
        @if (problem(); as message) {
          <p class="field-error" role="alert">{{ message }}</p>
        }
      </mat-dialog-content>
      <mat-dialog-actions align="end">
        <button mat-button type="button" mat-dialog-close>Cancel</button>
        <button mat-flat-button type="submit" [disabled]="busy()">{{ busy() ? 'Sending…' : 'Send invitation' }}</button>
      </mat-dialog-actions>
    </form>
  `,
  styleUrl: './people-dialog.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class InviteDialog {
  private readonly api = inject(PeopleApi);
  private readonly ref = inject(MatDialogRef<InviteDialog, PersonSummary>);
  protected readonly choices = ROLE_CHOICES;
  protected readonly form = inject(FormBuilder).nonNullable.group({
    email: ['', [Validators.required, Validators.email]],
    displayName: ['', [Validators.required, Validators.minLength(2)]],
    roles: [[] as Role[], Validators.required],
  });
  protected readonly busy = signal(false);
  protected readonly problem = signal<string | null>(null);

  protected async send() {
    this.problem.set(null);
    if (this.form.invalid) {
      this.form.markAllAsTouched();
      return;
    }
    this.busy.set(true);
    try {
      const { email, displayName, roles } = this.form.getRawValue();
      this.ref.close(await this.api.invite({ email: email.trim(), displayName: displayName.trim(), roles }));
    } catch (err) {
      const problem = toProblem(err);
      const left = applyProblemToForm(this.form, problem);
      if (!problem.errors?.length || left.length) this.problem.set(problem.detail ?? problem.title);
    } finally {
      this.busy.set(false);
    }
  }
}
