import { computed, effect, signal, untracked, type Signal } from '@angular/core';
import { toSignal } from '@angular/core/rxjs-interop';
import type { AbstractControl, FormGroup } from '@angular/forms';
import type { ErrorStateMatcher } from '@angular/material/core';
import { map } from 'rxjs';
import { displayUnits, MathsInputError, parseFigure, valueIn, type DisplayMeasure, type Quantity, type UnitSystem } from '@setwright/maths';

/**
 * Glue between a calculator card's form and the workshop maths library. Nothing here works
 * anything out: figures are read from the fields, handed to the library, and its answer or
 * its refusal (a MathsInputError naming the argument) is put back on the screen.
 */

/**
 * A typed figure, read by the one strict reader the server uses too (parseFigure): '' → undefined
 * (not filled in yet), a plain decimal → its number, anything else ("1,200", "0x4B0", "1e3") → NaN,
 * which the maths refuses on the field; refusalText then says why in the reader's words.
 */
export function figure(text: string): number | undefined {
  const parsed = parseFigure(text, '');
  if (!parsed.ok) return Number.NaN;
  return parsed.value ?? undefined;
}

/** A figure that has a stated default in its field (a gearbox ratio of 1): blank is missing, never the default. */
export function requiredFigure(text: string): number | null {
  return figure(text) ?? null;
}

/**
 * A field's figure with its unit, for the library. An empty field gives no value at all, so the
 * library reports it as missing by its own argument name; that is how a card knows it is waiting.
 */
export function qty(text: string, unit: string): Quantity {
  return { value: figure(text) as number, unit };
}

/** A field's figure with its unit, or undefined when the field is empty (for optional arguments). */
export function optionalQty(text: string, unit: string): Quantity | undefined {
  return text.trim() === '' ? undefined : qty(text, unit);
}

/** The unit a measure's fields take in the chosen system (mathjs spelling). */
export function unitOf(measure: DisplayMeasure, system: UnitSystem): string {
  return displayUnits[measure][system];
}

/** What a library argument is called on screen, and which control holds it (none when it is worked out elsewhere). */
export interface Field {
  readonly control: AbstractControl | null;
  readonly label: string;
  /** What to say while this argument is missing, when "Enter the …" would not fit. */
  readonly waiting?: string;
}
export type Fields = Readonly<Record<string, Field>>;

/** A card's answer: the library's result, a wait for a field, or a refusal on a field or the card. */
export type Outcome<T> =
  | { readonly state: 'ready'; readonly value: T }
  | { readonly state: 'waiting'; readonly message: string }
  | { readonly state: 'refused'; readonly message: string; readonly control: AbstractControl | null };

/** First letter down, for a label used mid-sentence. */
function midSentence(label: string): string {
  return label.charAt(0).toLowerCase() + label.slice(1);
}

/** The library's words for a refusal, told in ours (argument names become field labels). */
export function refusalText(error: MathsInputError, fields: Fields): string {
  const field = fields[error.argument];
  switch (error.reason) {
    case 'not-a-number':
    case 'not-finite': {
      // Say what is wrong with what was typed, in the field's own name.
      const typed: unknown = field?.control?.value;
      const parsed = typeof typed === 'string' ? parseFigure(typed, field!.label) : null;
      if (parsed && !parsed.ok) return parsed.message;
      if (field) return `${field.label}: type a number, such as 250 or 0.9.`;
      return 'These figures give no result that can be trusted; check each of them.';
    }
    case 'zero':
      return 'Must be more than zero.';
    case 'negative':
      return /greater than zero/.test(error.message) ? 'Must be more than zero.' : 'Must not be below zero.';
    case 'unknown-name':
      return 'Choose one of the options.';
    default: {
      const names = Object.keys(fields).sort((a, b) => b.length - a.length);
      let text = error.message;
      for (const name of names) {
        const pattern = new RegExp(`(?<![\\w.\\[])${name.replace(/[.[\]]/g, '\\$&')}(?![\\w\\[])`, 'g');
        text = text.replace(pattern, midSentence(fields[name].label));
      }
      return `${text.charAt(0).toUpperCase()}${text.slice(1)}${text.endsWith('.') ? '' : '.'}`;
    }
  }
}

/** Runs one library call and sorts its result or refusal into an Outcome. */
export function outcomeOf<T>(run: () => T, fields: Fields): Outcome<T> {
  try {
    return { state: 'ready', value: run() };
  } catch (error) {
    if (!(error instanceof MathsInputError)) {
      console.error(error);
      return { state: 'refused', message: 'This could not be worked out from these figures.', control: null };
    }
    const field = fields[error.argument];
    if (error.reason === 'missing' && field) {
      return { state: 'waiting', message: field.waiting ?? `Enter the ${midSentence(field.label)} to see the result.` };
    }
    return { state: 'refused', message: refusalText(error, fields), control: field?.control ?? null };
  }
}

/** Marks a field as in error only while the library refuses that field's figure. */
class RefusedField implements ErrorStateMatcher {
  constructor(private readonly outcome: Signal<Outcome<unknown>>) {}

  isErrorState(control: AbstractControl | null): boolean {
    const o = this.outcome();
    return o.state === 'refused' && o.control !== null && o.control === control;
  }
}

/** A live calculation: its outcome, its result when there is one, and the matcher that puts a refusal on its field. */
export interface Calculation<T> {
  readonly outcome: Signal<Outcome<T>>;
  readonly ready: Signal<T | null>;
  /** The refusal's words, for the field's mat-error. */
  readonly refusal: Signal<string>;
  readonly matcher: ErrorStateMatcher;
}

/** Recomputes whenever a signal it reads changes (form values, the unit switch). */
export function calculation<T>(run: () => T, fields: Fields | (() => Fields)): Calculation<T> {
  const outcome = computed(() => outcomeOf(run, typeof fields === 'function' ? fields() : fields));
  return {
    outcome,
    ready: computed(() => {
      const o = outcome();
      return o.state === 'ready' ? o.value : null;
    }),
    refusal: computed(() => {
      const o = outcome();
      return o.state === 'refused' ? o.message : '';
    }),
    matcher: new RefusedField(outcome),
  };
}

/** A form's raw value as a signal that follows every change. */
export function formValue<F extends FormGroup>(form: F): Signal<ReturnType<F['getRawValue']>> {
  return toSignal(form.valueChanges.pipe(map(() => form.getRawValue() as ReturnType<F['getRawValue']>)), {
    initialValue: form.getRawValue() as ReturnType<F['getRawValue']>,
  });
}

/** A figure converted from one unit to another by the library, as field text (six significant figures). */
export function convertedText(value: number, from: string, to: string): string {
  return String(Number(valueIn({ value, unit: from }, to).toPrecision(6)));
}

/** A machine's figure (stored in mm, kgf …) as field text in the unit a field takes now. */
export function machineText(value: number, unit: string, measure: DisplayMeasure, system: UnitSystem): string {
  return convertedText(value, unit, unitOf(measure, system));
}

/**
 * Keeps a card's figures in step with the metric/imperial switch: each field that holds a
 * measure is converted by the library when the system changes. Figures start out metric.
 * Switching straight back restores what was typed, so 300 mm does not come back as 299.999 mm.
 * A field still holding its starting figure takes the other system's round figure instead
 * (100 mm ↔ 4 in), when the card gives one, and only while its guard allows (a tolerance's length
 * keeps its exact basis once the allowed gap is typed: 0.10 mm over 100 mm is not 0.0039 in over 4 in).
 * Only what the field holds is converted, read strictly: typed digits are never re-read in the new unit.
 * Returns the system the fields are in now, which the card reads its figures and shows its results in.
 */
export function followUnits(
  system: Signal<UnitSystem>,
  fields: () => readonly (
    | readonly [AbstractControl<string>, DisplayMeasure]
    | readonly [AbstractControl<string>, DisplayMeasure, Readonly<Record<UnitSystem, string>>]
    | readonly [AbstractControl<string>, DisplayMeasure, Readonly<Record<UnitSystem, string>>, () => boolean]
  )[],
): Signal<UnitSystem> {
  const current = signal<UnitSystem>('metric');
  let memory: { system: UnitSystem; typed: Map<AbstractControl, string>; converted: Map<AbstractControl, string> } | null = null;
  effect(() => {
    const next = system();
    untracked(() => {
      const from = current();
      if (next === from) return;
      const typed = new Map<AbstractControl, string>();
      const converted = new Map<AbstractControl, string>();
      for (const [control, measure, start, roundAllowed] of fields()) {
        const text = control.value;
        let out = text;
        // Back to the system it was typed in, with the same figure (even if "1.37795" became "1.377950"): what was typed.
        const back = memory?.system === next && sameFigure(memory.converted.get(control), text) ? memory.typed.get(control) : undefined;
        if (back !== undefined) {
          out = back;
        } else if (start !== undefined && text === start[from] && (roundAllowed?.() ?? true)) {
          out = start[next];
        } else {
          const n = figure(text);
          if (n !== undefined && Number.isFinite(n)) out = convertedText(n, unitOf(measure, from), unitOf(measure, next));
        }
        typed.set(control, text);
        converted.set(control, out);
        if (out !== text) control.setValue(out);
      }
      memory = { system: from, typed, converted };
      current.set(next);
    });
  });
  return current.asReadonly();
}

/** Two field texts that read as the same number (never true for blank or refused text). */
function sameFigure(a: string | undefined, b: string): boolean {
  if (a === undefined) return false;
  const x = figure(a);
  return x !== undefined && Number.isFinite(x) && x === figure(b);
}

/** A figure for a field: from a machine's specification (value and its unit), or a plain number. */
export type MachineFigure =
  | readonly [value: number | undefined, unit: string, measure: DisplayMeasure]
  | readonly [value: number | undefined];

/**
 * Fills fields from a machine's figures, converted by the library to the units the fields are
 * in; figures the machine lacks leave their field alone.
 */
export function fillFromMachine(form: FormGroup, figures: Readonly<Record<string, MachineFigure>>, system: UnitSystem): void {
  const patch: Record<string, string> = {};
  for (const [name, f] of Object.entries(figures)) {
    const value = f[0];
    if (value === undefined) continue;
    patch[name] = f.length === 3 ? machineText(value, f[1], f[2], system) : String(value);
  }
  form.patchValue(patch);
}
