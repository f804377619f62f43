import { ChangeDetectionStrategy, Component, inject, signal } from '@angular/core';
import { FormBuilder, ReactiveFormsModule, Validators } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatChipsModule } from '@angular/material/chips';
import { MAT_DIALOG_DATA, MatDialogModule, MatDialogRef } from '@angular/material/dialog';
import type { PersonSummary } from '@setwright/contracts/people';
import type { Role } from '@setwright/contracts/roles';
import { applyProblemToForm, toProblem } from '../../core/problem';
import { PeopleApi } from './people-api';
import { ROLE_CHOICES } from './role-words';

export interface RolesDialogData {
  person: PersonSummary;
  /** The admin is changing their own roles: they cannot take workshop admin from themselves. */
  self: boolean;
}

/** Change someone's roles. Closes with the person as stored afterwards. */
@Component({
  selector: 'sw-roles-dialog',
  imports: [ReactiveFormsModule, MatDialogModule, MatButtonModule, MatChipsModule],
  template: `
    <h2 mat-dialog-title>Roles of {{ data.person.displayName }}</h2>
    <form [formGroup]="form" (ngSubmit)="save()" novalidate>
      <mat-dialog-content>
        <mat-chip-listbox formControlName="roles" multiple aria-label="Roles" class="roles">
          @for (c of choices; track c.role) {
            <mat-chip-option [value]="c.role" [disabled]="data.self && c.role === 'workshop_admin'">{{ c.label }}</mat-chip-option>
          }
        </mat-chip-listbox>
        <ul class="hint">
          @for (c of choices; track c.role) {
            <li><strong>{{ c.label }}</strong> {{ c.does }}</li>
          }
        </ul>
        @if (data.self) {
          <p class="hint">You cannot take Workshop admin from yourself; another workshop admin can.</p>
        }
        @if (form.controls.roles.touched && form.controls.roles.invalid) {
          <p class="field-error" role="alert">{{ form.controls.roles.getError('server') ?? 'Give at least one role.' }}</p>
        }
        @if (problem(); as message) {
          <p class="field-error" role="alert">{{ message }}</p>
        }
      </mat-dialog-content>
      <mat-dialog-actions align="end">
        <button mat-button type="button" mat-dialog-close>Cancel</button>
        <button mat-flat-button type="submit" [disabled]="busy()">{{ busy() ? 'Saving…' : 'Save roles' }}</button>
      </mat-dialog-actions>
    </form>
  `,
  styleUrl: './people-dialog.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class RolesDialog {
  private readonly api = inject(PeopleApi);
  private readonly ref = inject(MatDialogRef<RolesDialog, PersonSummary>);
  protected readonly data = inject<RolesDialogData>(MAT_DIALOG_DATA);
  protected readonly choices = ROLE_CHOICES;
  protected readonly form = inject(FormBuilder).nonNullable.group({
    roles: [[...this.data.person.roles] as Role[], Validators.required],
  });
  protected readonly busy = signal(false);
  protected readonly problem = signal<string | null>(null);

  protected async save() {
    this.problem.set(null);
    if (this.form.invalid) {
      this.form.markAllAsTouched();
      return;
    }
    this.busy.set(true);
    try {
      this.ref.close(await this.api.setRoles(this.data.person.id, this.form.getRawValue().roles));
    } catch (err) {
      const problem = toProblem(err);
      const left = applyProblemToForm(this.form, problem);
      if (!problem.errors?.length || left.length) this.problem.set(problem.detail ?? problem.title);
    } finally {
      this.busy.set(false);
    }
  }
}
