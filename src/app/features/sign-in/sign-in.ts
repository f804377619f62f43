import { ChangeDetectionStrategy, Component, inject, input, signal } from '@angular/core';
import { FormBuilder, ReactiveFormsModule, Validators } from '@angular/forms';
import { MatButtonModule } from '@angular/material/button';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import { MatProgressBarModule } from '@angular/material/progress-bar';
import { Router } from '@angular/router';
import { applyProblemToForm, toProblem, type Problem } from '../../core/problem';
import { Session } from '../../core/session';
import { SafetyNote } from '../../shared/ui/safety-note';

@Component({
  selector: 'sw-sign-in',
  imports: [ReactiveFormsModule, MatFormFieldModule, MatInputModule, MatButtonModule, MatIconModule, MatProgressBarModule, SafetyNote],
  templateUrl: './sign-in.html',
  styleUrl: './sign-in.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class SignIn {
  private readonly session = inject(Session);
  private readonly router = inject(Router);

  /** Where to go afterwards (from the query string). */
  readonly next = input<string>();
  /** Set when the previous session ended on its own. */
  readonly ended = input<string>();

  protected readonly form = inject(FormBuilder).nonNullable.group({
    email: ['', [Validators.required, Validators.email]],
    password: ['', Validators.required],
  });
  protected readonly busy = signal(false);
  protected readonly formProblem = signal<string | null>(null);

  protected async submit() {
    this.formProblem.set(null);
    if (this.form.invalid) {
      this.form.markAllAsTouched();
      return;
    }
    this.busy.set(true);
    try {
      await this.session.signIn(this.form.getRawValue());
      const next = this.next();
      await this.router.navigateByUrl(next && next.startsWith('/') && !next.startsWith('//') ? next : '/today');
    } catch (err) {
      const problem: Problem = toProblem(err);
      const left = applyProblemToForm(this.form, problem);
      if (!problem.errors?.length || left.length) this.formProblem.set(problem.detail ?? problem.title);
    } finally {
      this.busy.set(false);
    }
  }
}
