import { MathsInputError } from './errors';
import { math, parseUnit, plausibleSi, siUnits, type QuantityKind } from './units';

/**
 * The one reading of typed figures, shared by the workshop maths page, the runner's reading
 * fields and the server. Only plain decimals are numbers: an optional sign, digits, at most one
 * decimal point ("1200", "1200.5", "-0.05", ".5", "5."). Everything else is refused with words
 * that name the field: thousands separators ("1,200" is never 1.2 nor silently 1200), spaces
 * inside the figure, hex ("0x4B0"), exponents ("1e3"), fractions, "Infinity" and "NaN".
 */

/** What a figure's text gives: nothing yet, a number, or a refusal in our words. */
export type ParsedFigure =
  | { readonly ok: true; readonly value: number | null }
  | { readonly ok: false; readonly message: string };

const PLAIN_DECIMAL = /^[+-]?(?:\d+\.?\d*|\.\d+)$/;

/** The rule, as told on a refused field. */
export const PLAIN_DECIMAL_RULE = 'type digits with at most one decimal point, such as 1200, 0.05 or -0.05 (no commas, spaces, letters or exponents)';

/** Why a text is not a plain decimal, in a few words. */
function why(text: string): string {
  if (/^[+-]?\d{1,3}(?:,\d{3})+(?:\.\d+)?$/.test(text)) return 'has a thousands separator';
  if (text.includes(',')) return 'has a comma; use a point for decimals';
  if (/^[+-]?0[xob]/i.test(text)) return 'is not a decimal number (hex, octal and binary are not read)';
  if (/^[+-]?(?:\d+\.?\d*|\.\d+)e[+-]?\d+$/i.test(text)) return 'is written with an exponent';
  if (/[^\d\s.+-]/.test(text)) return 'is not a plain number';
  if (/\s/.test(text)) return 'has a space inside it';
  if ((text.match(/\./g) ?? []).length > 1) return 'has more than one decimal point';
  return 'is not a plain number';
}

/**
 * Reads a typed figure strictly. Blank (or only spaces) gives value null; a plain decimal gives its
 * number; anything else gives a message naming `label`, e.g. 'Blade length: "1,200" has a
 * thousands separator — type digits with at most one decimal point, such as 1200 …'.
 */
export function parseFigure(text: string, label: string): ParsedFigure {
  // A typed minus sign (U+2212) from a tablet keyboard counts as the hyphen-minus.
  const t = text.trim().replace(/^\u2212/, '-');
  if (t === '') return { ok: true, value: null };
  if (!PLAIN_DECIMAL.test(t)) {
    return { ok: false, message: `${label}: "${text.trim()}" ${why(t)} — ${PLAIN_DECIMAL_RULE}.` };
  }
  const value = Number(t);
  if (!Number.isFinite(value)) {
    return { ok: false, message: `${label}: "${t.slice(0, 12)}…" is far too large a figure for any workshop reading.` };
  }
  return { ok: true, value: Object.is(value, -0) ? 0 : value };
}

/** A figure that must be given: the number, or a MathsInputError naming `argument`. */
export function requireFigure(text: string, argument: string): number {
  const parsed = parseFigure(text, argument);
  if (!parsed.ok) throw new MathsInputError(argument, parsed.message, 'not-a-number');
  if (parsed.value === null) throw new MathsInputError(argument, `${argument} is required`, 'missing');
  return parsed.value;
}

/** How close to a limit counts as on it: float noise from unit conversion, nothing a gauge could show. */
function onBound(value: number, bound: number): boolean {
  return Math.abs(value - bound) <= 1e-9 * Math.max(Math.abs(bound), 1e-9);
}

/** Value against a lower or upper bound on the raw, unrounded figure (a hair of float slack only). */
export function isBelow(value: number, bound: number): boolean {
  return value < bound && !onBound(value, bound);
}
export function isAbove(value: number, bound: number): boolean {
  return value > bound && !onBound(value, bound);
}

/**
 * Decimal places to show a value beside its limits: at least `decimals`, and as many more (up to
 * 10) as it takes for a value over or under a limit never to show as equal to it or on its other
 * side. 0.1047 against a 0.10 maximum at 2 decimals gives 3 ("0.105"); 0.10004 gives 5.
 */
export function decimalsBeside(value: number, decimals: number, bounds: readonly (number | undefined)[]): number {
  let d = Math.max(0, Math.min(decimals, 10));
  const honest = (places: number) =>
    bounds.every((b) => {
      if (b === undefined || onBound(value, b)) return true;
      const shown = Number(value.toFixed(places));
      return value > b ? shown > b && !onBound(shown, b) : shown < b && !onBound(shown, b);
    });
  while (d < 10 && !honest(d)) d += 1;
  return d;
}

/** A value as fixed-point text that never contradicts its limits (see decimalsBeside); "-0" shows as "0". */
export function textBeside(value: number, decimals: number, bounds: readonly (number | undefined)[]): string {
  const text = value.toFixed(decimalsBeside(value, decimals, bounds));
  return /^-0(\.0+)?$/.test(text) ? text.slice(1) : text;
}

/** A figure for a message: six significant figures. */
function sig(n: number): string {
  return String(Number(n.toPrecision(6)));
}

/** Largest plain figure accepted where a reading's unit is none of the physical kinds (%, teeth…). */
export const PLAIN_READING_MAX = 1e9;

/**
 * What is wrong with a reading's number for its unit, or null when it will do: it must be finite and
 * within the plausible workshop sizes of its kind (the same bounds the maths holds its inputs to).
 * Used by the runner's reading field and by the server before it stores a value.
 */
export function readingProblem(value: number, unit: string, label: string): string | null {
  if (typeof value !== 'number' || !Number.isFinite(value)) return `${label}: enter a finite number in ${unit}.`;
  let kind: QuantityKind | undefined;
  try {
    const parsed = parseUnit(unit, label);
    kind = (Object.keys(siUnits) as QuantityKind[]).find((k) => parsed.equalBase(math.unit(siUnits[k])));
  } catch {
    kind = undefined;
  }
  if (kind === undefined) {
    return Math.abs(value) > PLAIN_READING_MAX ? `${label}: ${value} is beyond any workshop reading (at most ${PLAIN_READING_MAX}).` : null;
  }
  const { min, max } = plausibleSi[kind];
  const size = Math.abs(math.unit(value, unit).toNumber(siUnits[kind]));
  const inUnit = (x: number) => `${sig(math.unit(x, siUnits[kind]).toNumber(unit))} ${unit}`;
  if (size > max) return `${label}: ${value} ${unit} is beyond any workshop reading (at most ${inUnit(max)}).`;
  if (size !== 0 && size < min) return `${label}: ${value} ${unit} is too small to measure in a workshop (at least ${inUnit(min)}, or 0).`;
  return null;
}
