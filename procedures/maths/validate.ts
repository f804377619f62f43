import { MathsInputError } from './errors';

/** Returns x as a finite number, or throws naming the argument. */
export function finiteNumber(x: unknown, argument: string): number {
  if (x === undefined || x === null) {
    throw new MathsInputError(argument, `${argument} is required`, 'missing');
  }
  if (typeof x !== 'number' || Number.isNaN(x)) {
    throw new MathsInputError(argument, `${argument} must be a number`, 'not-a-number');
  }
  if (!Number.isFinite(x)) {
    throw new MathsInputError(argument, `${argument} must be a finite number`, 'not-finite');
  }
  return x;
}

/** Throws unless value > 0; `shown` is how the value is quoted in the message. */
export function requirePositive(value: number, argument: string, shown = String(value)): number {
  if (value <= 0) {
    const message = `${argument} must be greater than zero (got ${shown})`;
    throw new MathsInputError(argument, message, value < 0 ? 'negative' : 'zero');
  }
  return value;
}

/** Throws unless value ≥ 0. */
export function requireNonNegative(value: number, argument: string, shown = String(value)): number {
  if (value < 0) {
    const message = `${argument} must not be negative (got ${shown})`;
    throw new MathsInputError(argument, message, 'negative');
  }
  return value;
}

/** Throws unless |value| ≤ max: a plain number (a ratio, a count) no workshop would see beyond. */
export function requireAtMost(value: number, max: number, argument: string): number {
  if (Math.abs(value) > max) {
    const message = `${argument} of ${value} is beyond any workshop figure (at most ${max})`;
    throw new MathsInputError(argument, message, 'out-of-range');
  }
  return value;
}

/** A finite number greater than zero and at most `max` (ratios, tooth counts). */
export function positiveNumber(x: unknown, argument: string, max = 1e6): number {
  return requireAtMost(requirePositive(finiteNumber(x, argument), argument), max, argument);
}

/** Returns x as a plain object, or throws naming the argument. */
export function requireObject(x: unknown, argument: string): Record<string, unknown> {
  if (typeof x !== 'object' || x === null || Array.isArray(x)) {
    throw new MathsInputError(argument, `${argument} must be an object`, 'missing');
  }
  return x as Record<string, unknown>;
}

/** Returns x as a non-empty array, or throws naming the argument. */
export function requireList(x: unknown, argument: string): readonly unknown[] {
  if (!Array.isArray(x) || x.length === 0) {
    throw new MathsInputError(argument, `${argument} must list at least one entry`, 'missing');
  }
  return x;
}

/** Returns x if it is one of the allowed strings, or throws naming the argument. */
export function oneOf<T extends string>(x: unknown, allowed: readonly T[], argument: string): T {
  if (typeof x === 'string' && (allowed as readonly string[]).includes(x)) {
    return x as T;
  }
  throw new MathsInputError(
    argument,
    `${argument} must be one of ${allowed.map((a) => `"${a}"`).join(', ')}`,
    'unknown-name',
  );
}
