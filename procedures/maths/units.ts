import { create, createUnitDependencies, unitDependencies, type Unit } from 'mathjs';
import { MathsInputError } from './errors';
import { finiteNumber, requireNonNegative, requirePositive } from './validate';

/** The library's own mathjs instance: every unit conversion goes through it. */
// Only the unit system is loaded (not all of mathjs): a far smaller bundle and heap.
export const math = create({ unitDependencies, createUnitDependencies }, {});

// mathjs 15 already knows kgf; add it (1 kgf = 9.80665 N, NIST SP 811 B.8) only if a build lacks it.
if (!math.Unit.isValuelessUnit('kgf')) {
  math.createUnit('kgf', '9.80665 N');
}
// mathjs has no revolutions-per-minute unit; a revolution is counted as one cycle, so rpm = 1/min.
if (!math.Unit.isValuelessUnit('rpm')) {
  math.createUnit('rpm', '1/min');
}

/** A number with its unit, e.g. { value: 300, unit: 'mm' }; unit is any mathjs unit string. */
export interface Quantity {
  readonly value: number;
  readonly unit: string;
}

/** Builds a quantity: quantity(300, 'mm'). */
export function quantity(value: number, unit: string): Quantity {
  return { value, unit };
}

/** The physical kinds the workshop maths works with, each with its SI unit. */
export const siUnits = {
  length: 'm',
  area: 'm^2',
  time: 's',
  speed: 'm/s',
  rotationalSpeed: 'Hz',
  force: 'N',
  stress: 'Pa',
  angle: 'rad',
  cuttingRate: 'm^2/s',
} as const;

export type QuantityKind = keyof typeof siUnits;

const kindWords: Record<QuantityKind, string> = {
  length: 'a length (e.g. mm, in)',
  area: 'an area (e.g. mm^2, in^2)',
  time: 'a time (e.g. s, min)',
  speed: 'a speed (e.g. m/min, ft/min)',
  rotationalSpeed: 'a rotational speed (e.g. rpm)',
  force: 'a force (e.g. N, kgf, lbf)',
  stress: 'a stress (e.g. MPa, psi)',
  angle: 'an angle (e.g. deg, arcmin)',
  cuttingRate: 'an area per time (e.g. cm^2/min, in^2/min)',
};

/**
 * Plausible workshop sizes per kind, in SI: the smallest figure other than zero and the largest.
 * Generous on purpose (a 100 m length, 120,000 rpm, 1 TPa for a modulus): they exist to refuse
 * slips of the finger such as 1e308 or a reading typed in the wrong unit by a factor of millions,
 * which would otherwise reach the screen as Infinity or a 306-digit figure.
 */
export const plausibleSi: Record<QuantityKind, { readonly min: number; readonly max: number }> = {
  length: { min: 1e-7, max: 100 },
  area: { min: 1e-12, max: 100 },
  time: { min: 1e-3, max: 1e7 },
  speed: { min: 1e-9, max: 1000 },
  rotationalSpeed: { min: 1e-4, max: 2000 },
  force: { min: 1e-4, max: 1e7 },
  stress: { min: 1e-3, max: 1e12 },
  angle: { min: 1e-12, max: 2 * Math.PI },
  cuttingRate: { min: 1e-12, max: 1 },
};

/** A figure for a message: six significant figures, never exponent notation for workshop sizes. */
function sig(n: number): string {
  return String(Number(n.toPrecision(6)));
}

/** Throws unless an SI value (or zero) lies within the kind's plausible workshop sizes. */
function requirePlausible(v: number, kind: QuantityKind, argument: string, unit: string): number {
  const { min, max } = plausibleSi[kind];
  const size = Math.abs(v);
  if (size === 0 || (size >= min && size <= max)) return v;
  const inUnit = (x: number) => {
    try {
      return `${sig(math.unit(x, siUnits[kind]).toNumber(unit))} ${unit}`;
    } catch {
      return `${sig(x)} ${siUnits[kind]}`; // an angular velocity has no plain conversion from Hz
    }
  };
  const message =
    size > max
      ? `${argument} is beyond any workshop size (at most ${inUnit(max)})`
      : `${argument} is too small to measure in a workshop (at least ${inUnit(min)}, or 0)`;
  throw new MathsInputError(argument, message, 'out-of-range');
}

/** Parses a unit string with mathjs; refuses strings that carry a number of their own. */
export function parseUnit(unit: unknown, argument: string): Unit {
  if (typeof unit !== 'string' || unit.trim() === '') {
    throw new MathsInputError(argument, `${argument} must have a unit`, 'unit');
  }
  let parsed: Unit;
  try {
    parsed = math.unit(unit);
  } catch {
    throw new MathsInputError(argument, `${argument} has an unknown unit "${unit}"`, 'unit');
  }
  if (parsed.value !== null && parsed.toNumber() !== 1) {
    const message = `${argument} unit "${unit}" must not contain a number`;
    throw new MathsInputError(argument, message, 'unit');
  }
  return parsed;
}

/** Reads a quantity of the given kind and returns its value in that kind's SI unit. */
export function siValue(input: unknown, kind: QuantityKind, argument: string): number {
  if (typeof input !== 'object' || input === null) {
    throw new MathsInputError(argument, `${argument} is required, as { value, unit }`, 'missing');
  }
  const { value, unit } = input as { value?: unknown; unit?: unknown };
  const n = finiteNumber(value, argument);
  const parsed = parseUnit(unit, argument);
  const si = math.unit(siUnits[kind]);
  if (parsed.equalBase(si)) {
    return requirePlausible(math.unit(n, unit as string).toNumber(siUnits[kind]), kind, argument, unit as string);
  }
  // A rotational speed may also be given as an angular velocity (rad/s, deg/s): one cycle per revolution.
  if (kind === 'rotationalSpeed' && parsed.equalBase(math.unit('rad/s'))) {
    return requirePlausible(math.unit(n, unit as string).toNumber('cycle/s'), kind, argument, unit as string);
  }
  throw new MathsInputError(
    argument,
    `${argument} must be ${kindWords[kind]}; "${String(unit)}" is not`,
    'unit',
  );
}

/** Quotes a quantity for an error message. */
function shown(input: unknown): string {
  const q = input as Quantity;
  return `${q.value} ${q.unit}`;
}

/** SI value of a quantity that must be greater than zero. */
export function positiveSi(input: unknown, kind: QuantityKind, argument: string): number {
  return requirePositive(siValue(input, kind, argument), argument, shown(input));
}

/** SI value of a quantity that must not be negative. */
export function nonNegativeSi(input: unknown, kind: QuantityKind, argument: string): number {
  return requireNonNegative(siValue(input, kind, argument), argument, shown(input));
}

/**
 * Wraps an SI number as a quantity of the given kind. Every result of the maths is built here, so
 * a result that is not a finite number (NaN, Infinity) is refused here rather than shown.
 */
export function si(value: number, kind: QuantityKind): Quantity {
  if (!Number.isFinite(value)) {
    throw new MathsInputError('result', 'these figures give no finite result; check each of them', 'not-finite');
  }
  return { value, unit: siUnits[kind] };
}

/** Converts a quantity to another compatible unit through mathjs: convert({300,'mm'}, 'in'). */
export function convert(q: Quantity, unit: string, argument = 'quantity'): Quantity {
  const n = finiteNumber((q as Partial<Quantity> | null)?.value, argument);
  const from = parseUnit(q.unit, argument);
  const to = parseUnit(unit, 'unit');
  if (!from.equalBase(to)) {
    const message = `unit "${unit}" cannot express ${argument}, given in "${q.unit}"`;
    throw new MathsInputError('unit', message, 'unit');
  }
  return { value: math.unit(n, q.unit).toNumber(unit), unit };
}

/** The number a quantity has in the given unit: valueIn({1,'in'}, 'mm') = 25.4. */
export function valueIn(q: Quantity, unit: string, argument = 'quantity'): number {
  return convert(q, unit, argument).value;
}

/** The same quantity read in several units at once, e.g. { N: …, kgf: …, lbf: … }. */
export function inUnits<U extends string>(q: Quantity, units: readonly U[]): Record<U, number> {
  const out = {} as Record<U, number>;
  for (const u of units) {
    out[u] = valueIn(q, u);
  }
  return out;
}

/** The kind of a quantity by its unit's dimensions, or undefined if it is none of ours. */
export function kindOf(q: Quantity): QuantityKind | undefined {
  const parsed = parseUnit(q.unit, 'quantity');
  const kinds = Object.keys(siUnits) as QuantityKind[];
  return kinds.find((k) => parsed.equalBase(math.unit(siUnits[k])));
}

/** Display systems offered to the workshop. */
export type UnitSystem = 'metric' | 'imperial';

/** Display units per measure: metric and imperial forms the workshop reads. */
export const displayUnits = {
  bladeSpeed: { metric: 'm/min', imperial: 'ft/min' },
  feedRate: { metric: 'mm/s', imperial: 'in/min' },
  length: { metric: 'mm', imperial: 'in' },
  area: { metric: 'cm^2', imperial: 'in^2' },
  cuttingRate: { metric: 'cm^2/min', imperial: 'in^2/min' },
  force: { metric: 'N', imperial: 'lbf' },
  tension: { metric: 'kgf', imperial: 'lbf' },
  stress: { metric: 'MPa', imperial: 'psi' },
  wheelSpeed: { metric: 'rpm', imperial: 'rpm' },
  time: { metric: 'min', imperial: 'min' },
  angle: { metric: 'deg', imperial: 'deg' },
} as const satisfies Record<string, Record<UnitSystem, string>>;

export type DisplayMeasure = keyof typeof displayUnits;

/** Expresses a quantity in a measure's display unit: toDisplay(v, 'bladeSpeed', 'imperial') → ft/min. */
export function toDisplay(
  q: Quantity,
  measure: DisplayMeasure,
  system: UnitSystem = 'metric',
): Quantity {
  const units = displayUnits[measure] as Record<UnitSystem, string> | undefined;
  if (units === undefined) {
    const message = `measure "${String(measure)}" is not a display measure`;
    throw new MathsInputError('measure', message, 'unknown-name');
  }
  const unit = units[system];
  if (unit === undefined) {
    throw new MathsInputError('system', 'system must be "metric" or "imperial"', 'unknown-name');
  }
  return convert(q, unit);
}

/** Text for a screen or print: formatQuantity({56.549,'m/min'}, 1) → "56.5 m/min". */
export function formatQuantity(q: Quantity, decimals = 2): string {
  return `${q.value.toFixed(decimals)} ${q.unit}`;
}
