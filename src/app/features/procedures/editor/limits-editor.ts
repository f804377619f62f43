import { ChangeDetectionStrategy, Component, input } from '@angular/core';
import { ReactiveFormsModule } from '@angular/forms';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatInputModule } from '@angular/material/input';
import { MatSelectModule } from '@angular/material/select';
import { problemOf, type LimitsForm } from './draft-form';

/** Lowest and highest allowed values: each none, a fixed number, or a figure from the machine's specification. */
@Component({
  selector: 'sw-limits-editor',
  imports: [ReactiveFormsModule, MatFormFieldModule, MatInputModule, MatSelectModule],
  template: `
    <fieldset class="limits">
      <legend>{{ legend() }}</legend>
      @for (side of sides; track side.key) {
        @let bound = limits().controls[side.key];
        <div class="bound" role="group" [attr.aria-label]="side.label">
          <mat-form-field appearance="outline">
            <mat-label>{{ side.label }}</mat-label>
            <mat-select [formControl]="bound.controls.mode">
              <mat-option value="none">{{ side.none }}</mat-option>
              <mat-option value="number">A number</mat-option>
              <mat-option value="spec">A figure from the machine</mat-option>
            </mat-select>
            <mat-error>{{ problem(bound.controls.mode) }}</mat-error>
          </mat-form-field>
          @if (bound.controls.mode.value === 'number') {
            <mat-form-field appearance="outline">
              <mat-label>{{ side.label }}{{ unit() ? ' (' + unit() + ')' : '' }}</mat-label>
              <input matInput type="number" inputmode="decimal" [formControl]="bound.controls.value" />
              <mat-error>{{ problem(bound.controls.value) }}</mat-error>
            </mat-form-field>
          } @else if (bound.controls.mode.value === 'spec') {
            <mat-form-field appearance="outline">
              <mat-label>Machine figure</mat-label>
              <input matInput [formControl]="bound.controls.$spec" autocomplete="off" spellcheck="false" />
              <mat-hint>A path in the machine’s specification, e.g. tensionRangeKgf.min</mat-hint>
              <mat-error>{{ problem(bound.controls.$spec) }}</mat-error>
            </mat-form-field>
            <mat-form-field appearance="outline" class="unit">
              <mat-label>Its unit</mat-label>
              <input matInput [formControl]="bound.controls.unit" autocomplete="off" />
              <mat-error>{{ problem(bound.controls.unit) }}</mat-error>
            </mat-form-field>
          }
          @if (problem(bound); as p) {
            <p class="problem" role="alert">{{ p }}</p>
          }
        </div>
      }
      @if (problem(limits()); as p) {
        <p class="problem" role="alert">{{ p }}</p>
      }
    </fieldset>
  `,
  styleUrl: './editor.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
})
export class LimitsEditor {
  readonly limits = input.required<LimitsForm>();
  /** The value's unit, shown beside a fixed number. */
  readonly unit = input('');
  readonly legend = input('Limits');
  /** Bumped by the editor when problems are shown, so this view looks again. */
  readonly revision = input(0);

  protected readonly sides = [
    { key: 'min', label: 'Lowest allowed', none: 'No lower limit' },
    { key: 'max', label: 'Highest allowed', none: 'No upper limit' },
  ] as const;
  protected readonly problem = problemOf;
}
