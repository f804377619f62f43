import { ChangeDetectionStrategy, Component, input } from '@angular/core';
import { ReactiveFormsModule, type FormControl } from '@angular/forms';
import { ErrorStateMatcher } from '@angular/material/core';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatInputModule } from '@angular/material/input';

/** A field for one figure: a numeric keypad, its unit beside it, and the maths' refusal under it. */
@Component({
  selector: 'sw-figure-field',
  imports: [ReactiveFormsModule, MatFormFieldModule, MatInputModule],
  template: `
    <mat-form-field appearance="outline" subscriptSizing="dynamic" floatLabel="always">
      <mat-label>{{ label() }}@if (unit()) {<span class="sw-visually-hidden">, in {{ unit() }}</span>}</mat-label>
      <input matInput [formControl]="control()" type="text" inputmode="decimal" autocomplete="off" spellcheck="false"
             enterkeyhint="next" [errorStateMatcher]="matcher()" />
      @if (unit()) {
        <span matTextSuffix class="unit" aria-hidden="true">{{ unit() }}</span>
      }
      @if (hint()) {
        <mat-hint>{{ hint() }}</mat-hint>
      }
      <mat-error>{{ error() }}</mat-error>
    </mat-form-field>
  `,
  styles: `
    :host {
      display: block;
    }
    mat-form-field {
      width: 100%;
    }
    input {
      font-size: 1.25rem;
    }
    .unit {
      padding-left: 6px;
      color: var(--mat-sys-on-surface-variant);
      white-space: nowrap;
    }
  `,
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class FigureField {
  readonly control = input.required<FormControl<string>>();
  readonly label = input.required<string>();
  readonly unit = input('');
  readonly hint = input('');
  /** Puts the field in error while the calculation refuses its figure. */
  readonly matcher = input.required<ErrorStateMatcher>();
  readonly error = input('');
}
