import {
  displayUnits,
  toDisplay,
  valueIn,
  type DisplayMeasure,
  type Quantity,
  type Source,
  type UnitSystem,
} from '@setwright/maths';

/** A figure ready for the screen: the number as text and its unit, kept apart for large type. */
export interface Shown {
  readonly value: string;
  readonly unit: string;
}

/** Decimal places for a figure, the same in both systems or one per system. */
export type Decimals = number | Readonly<Record<UnitSystem, number>>;

/** Fixed decimals, never "NaN" or "Infinity" and never "-0.0". */
export function fixed(n: number, decimals: number): string {
  if (!Number.isFinite(n)) return '—';
  // Twelve significant figures first, so unit-conversion noise (1.374999… in) rounds as the true 1.375.
  const text = Number(n.toPrecision(12)).toFixed(decimals);
  return /^-0(\.0+)?$/.test(text) ? text.slice(1) : text;
}

/** mathjs unit text as the workshop writes it: cm^2 → cm², in^2/min → in²/min. */
export function unitText(unit: string): string {
  return unit.replace(/\^2/g, '²').replace(/\^3/g, '³').replace(/\s+/g, '');
}

/** The unit a measure is read in under the chosen system, as printed beside a field. */
export function fieldUnit(measure: DisplayMeasure, system: UnitSystem): string {
  return unitText(displayUnits[measure][system]);
}

/** A library quantity in the measure's display unit for the system. */
export function shown(q: Quantity, measure: DisplayMeasure, system: UnitSystem, decimals: Decimals): Shown {
  const d = toDisplay(q, measure, system);
  return { value: fixed(d.value, typeof decimals === 'number' ? decimals : decimals[system]), unit: unitText(d.unit) };
}

/** A library quantity in one named unit (rpm, s, GPa, mm²). */
export function shownIn(q: Quantity, unit: string, decimals: number): Shown {
  return { value: fixed(valueIn(q, unit), decimals), unit: unitText(unit) };
}

/** A plain number with its own words for a unit (TPI, %, teeth). */
export function plain(n: number, decimals: number, unit = ''): Shown {
  return { value: fixed(n, decimals), unit };
}

/** "+12", "-30": a percentage change with its sign. */
export function signed(n: number, decimals = 0): string {
  const text = fixed(n, Number.isInteger(n) ? 0 : decimals);
  return n > 0 ? `+${text}` : text;
}

/** A source as quoted beside a result, with how sure we are of it when that is less than published. */
export function sourceText(source: Source): string {
  const base = source.section ? `${source.title} — ${source.section}` : source.title;
  const sureness: Record<string, string> = {
    medium: ' (medium confidence)',
    'from memory': ' (from memory)',
    workshop: ' (workshop figure)',
  };
  return base + (source.confidence ? (sureness[source.confidence] ?? '') : '');
}
