import { Directive, ElementRef, forwardRef, inject, input } from '@angular/core';
import { NG_VALIDATORS, NG_VALUE_ACCESSOR, type ControlValueAccessor, type ValidationErrors, type Validator } from '@angular/forms';
import { parseFigure, readingProblem } from '@setwright/maths';

/**
 * Puts a reading's typed text into a number control through the one strict reader the server uses
 * too: "1200", "0.05", "-0.05" and ".5" are numbers; "1,200", "0x4B0", "1e3" and the like leave the
 * control empty and invalid, with the reason (naming the field) as its `figure` error, so nothing
 * silently becomes a number. Figures past any workshop size for the unit are refused the same way.
 */
@Directive({
  selector: 'input[swStrictNumber]',
  host: { '(input)': 'typed()', '(blur)': 'touched()' },
  providers: [
    { provide: NG_VALUE_ACCESSOR, useExisting: forwardRef(() => StrictNumber), multi: true },
    { provide: NG_VALIDATORS, useExisting: forwardRef(() => StrictNumber), multi: true },
  ],
})
export class StrictNumber implements ControlValueAccessor, Validator {
  private readonly element = inject<ElementRef<HTMLInputElement>>(ElementRef);
  /** The field's name as shown, for the words of a refusal. */
  readonly swStrictNumber = input.required<string>();
  readonly unit = input.required<string>();

  private problem: string | null = null;
  private onChange: (value: number | null) => void = () => undefined;
  private onTouched: () => void = () => undefined;

  writeValue(value: unknown): void {
    this.problem = null;
    this.element.nativeElement.value = typeof value === 'number' && Number.isFinite(value) ? String(value) : '';
  }

  registerOnChange(fn: (value: number | null) => void): void {
    this.onChange = fn;
  }

  registerOnTouched(fn: () => void): void {
    this.onTouched = fn;
  }

  setDisabledState(disabled: boolean): void {
    this.element.nativeElement.disabled = disabled;
  }

  validate(): ValidationErrors | null {
    return this.problem === null ? null : { figure: this.problem };
  }

  protected typed(): void {
    const text = this.element.nativeElement.value;
    const label = this.swStrictNumber();
    const parsed = parseFigure(text, label);
    if (!parsed.ok) {
      this.problem = parsed.message;
      this.onChange(null);
      return;
    }
    this.problem = parsed.value === null ? null : readingProblem(parsed.value, this.unit(), label);
    this.onChange(this.problem === null ? parsed.value : null);
  }

  protected touched(): void {
    this.onTouched();
  }
}
