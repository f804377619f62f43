import { ChangeDetectionStrategy, Component, computed, input } from '@angular/core';
import { ReactiveFormsModule, type AbstractControl, type FormControl } from '@angular/forms';
import type { ErrorStateMatcher } from '@angular/material/core';
import { MatFormFieldModule } from '@angular/material/form-field';
import { MatIconModule } from '@angular/material/icon';
import { MatInputModule } from '@angular/material/input';
import type { InputResult } from '@setwright/procedures/engine';
import { StrictNumber } from './strict-number';

/** A refused figure shows its reason as soon as it is typed, not only after the field is left. */
const AS_TYPED: ErrorStateMatcher = {
  isErrorState: (control: AbstractControl | null) => !!control && control.invalid && (control.dirty || control.touched),
};

/** A reading taken at the saw: a number with its unit, its limits, and whether it is within them, at a glance. */
@Component({
  selector: 'sw-reading-field',
  imports: [ReactiveFormsModule, MatFormFieldModule, MatInputModule, MatIconModule, StrictNumber],
  templateUrl: './reading-field.html',
  styleUrl: './reading-field.scss',
  changeDetection: ChangeDetectionStrategy.OnPush,
  host: { class: 'sw-reading-field', '[attr.data-outcome]': 'result()?.outcome ?? "none"' },
})
export class ReadingField {
  readonly control = input.required<FormControl<number | null>>();
  readonly label = input.required<string>();
  readonly unit = input.required<string>();
  readonly help = input<string>();
  readonly result = input<InputResult>();
  readonly fieldId = input.required<string>();
  protected readonly asTyped = AS_TYPED;

  protected readonly limitsText = computed(() => {
    const l = this.result()?.limits;
    if (!l) return '';
    const u = ` ${this.unit()}`;
    if (l.min !== undefined && l.max !== undefined) return `Limits ${l.min}–${l.max}${u}`;
    if (l.min !== undefined) return `At least ${l.min}${u}`;
    return `At most ${l.max}${u}`;
  });
  protected readonly status = computed(() => {
    switch (this.result()?.outcome) {
      case 'pass':
        return { text: 'Within limits', icon: 'check_circle', cls: 'pass' };
      case 'fail':
        return { text: 'Out of limits', icon: 'cancel', cls: 'fail' };
      default:
        return null;
    }
  });
}
