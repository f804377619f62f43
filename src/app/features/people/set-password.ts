import { ChangeDetectionStrategy, Component, inject, input, signal } from '@angular/core';
import { FormBuilder, ReactiveFormsModule, Validators, type AbstractControl, type ValidationErrors } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatInputModule } from '@angular/material/input';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { Router, RouterLink } from '@angular/router';
import { PASSWORD_MAX_BYTES, PASSWORD_MIN } from '@setwright/contracts/people';
import { applyProblemToForm, toProblem } from '../../core/problem';
import { Session } from '../../core/session';
import { PeopleApi } from './people-api';

const sameAsPassword = (control: AbstractControl): ValidationErrors | null => {
  const password = control.parent?.get('password')?.value as string | undefined;
  return control.value && password !== undefined && control.value !== password ? { different: true } : null;
};
const notTooLong = (control: AbstractControl): ValidationErrors | null =>
  new TextEncoder().encode(String(control.value ?? '')).length > PASSWORD_MAX_BYTES ? { tooLong: true } : null;

/** Where an invitation link lands: choose a password, then straight in. Outside the signed-in shell, like sign-in. */
@Component({
  selector: 'sw-set-password',
  imports: [ReactiveFormsModule, MatFormFieldModule, MatInputModule, MatButtonModule, MatProgressBarModule, RouterLink],
  templateUrl: './set-password.html',
  styleUrl: './set-password.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class SetPassword {
  private readonly api = inject(PeopleApi);
  private readonly session = inject(Session);
  private readonly router = inject(Router);

  /** From the link's query string. */
  readonly token = input<string>();

  protected readonly min = PASSWORD_MIN;
  protected readonly form = inject(FormBuilder).nonNullable.group({
    password: ['', [Validators.required, Validators.minLength(PASSWORD_MIN), notTooLong]],
    repeat: ['', [Validators.required, sameAsPassword]],
  });
  protected readonly busy = signal(false);
  protected readonly linkProblem = signal<string | null>(null);

  constructor() {
    // A change to the first field re-checks the second.
    this.form.controls.password.valueChanges.subscribe(() => this.form.controls.repeat.updateValueAndValidity({ emitEvent: false }));
  }

  protected async submit() {
    this.linkProblem.set(null);
    if (this.form.invalid) {
      this.form.markAllAsTouched();
      return;
    }
    this.busy.set(true);
    const password = this.form.getRawValue().password;
    try {
      const { email } = await this.api.setPassword({ token: this.token() ?? '', password });
      await this.session.signIn({ email, password });
      await this.router.navigateByUrl('/today');
    } catch (err) {
      const problem = toProblem(err);
      const left = applyProblemToForm(this.form, problem);
      if (!problem.errors?.length || left.length) this.linkProblem.set(left[0]?.detail ?? problem.detail ?? problem.title);
    } finally {
      this.busy.set(false);
    }
  }
}
