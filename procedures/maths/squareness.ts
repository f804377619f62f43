import { MathsInputError } from './errors';
import { nonNegativeSi, positiveSi, si, siValue, type Quantity } from './units';
import { requireObject } from './validate';

/** Allowed error: a gap over a length (0.05 mm over 100 mm; 0.003 in per 1 in), or an angle. */
export type SquarenessTolerance =
  | { readonly gap: Quantity; readonly over: Quantity }
  | { readonly angle: Quantity };

export interface SquarenessResult {
  /** θ = atan(g/h), in radians. */
  readonly angle: Quantity;
  readonly degrees: number;
  /** θ in minutes of arc. */
  readonly arcMinutes: number;
  /** θ split into whole degrees and minutes, for display as 0° 3.4′. */
  readonly degreesMinutes: { readonly degrees: number; readonly minutes: number };
  /** Error over 100 mm of height: 100 mm · g/h (metres). */
  readonly errorPer100mm: Quantity;
  /** g/h, the same in any unit (mm per mm, in per in). */
  readonly slope: number;
  /** Present when a tolerance is given. */
  readonly pass?: boolean;
}

/** Squareness from gap g atop a square of height h: θ = atan(g/h); error per 100 mm = 100·g/h. */
export function squarenessError(input: {
  gap: Quantity;
  squareHeight: Quantity;
  tolerance?: SquarenessTolerance;
}): SquarenessResult {
  const g = nonNegativeSi(input.gap, 'length', 'gap');
  const h = positiveSi(input.squareHeight, 'length', 'squareHeight');
  // A square and feelers measure small errors: past a tenth of the height (about 5.7°) the gap is
  // not a squareness reading at all (a gap equal to the height would be 45°). Common practice.
  if (g > h / 10) {
    const message = 'gap must be at most a tenth of squareHeight (about 5.7°); a gap that wide means the square is not against the blade';
    throw new MathsInputError('gap', message, 'out-of-range');
  }
  const slope = g / h;
  const theta = Math.atan(slope);
  const degrees = (theta * 180) / Math.PI;
  const whole = Math.floor(degrees);
  const result: SquarenessResult = {
    angle: si(theta, 'angle'),
    degrees,
    arcMinutes: degrees * 60,
    degreesMinutes: { degrees: whole, minutes: (degrees - whole) * 60 },
    errorPer100mm: si(0.1 * slope, 'length'),
    slope,
  };
  if (input.tolerance === undefined) return result;
  return { ...result, pass: withinTolerance(slope, theta, input.tolerance) };
}

/** Pass when g/h ≤ allowed gap ÷ its length, or θ ≤ allowed angle (a hair of float slack). */
function withinTolerance(slope: number, theta: number, tolerance: SquarenessTolerance): boolean {
  const t = requireObject(tolerance, 'tolerance');
  const slack = 1e-12;
  if ('angle' in t) {
    return theta <= nonNegativeSi(t['angle'], 'angle', 'tolerance.angle') + slack;
  }
  const allowedGap = nonNegativeSi(t['gap'], 'length', 'tolerance.gap');
  const over = positiveSi(t['over'], 'length', 'tolerance.over');
  return slope <= allowedGap / over + slack;
}

/** Allowed gap at the top of a square for a tolerance given as an angle: g = h·tan θ. */
export function allowedGap(input: { squareHeight: Quantity; angle: Quantity }): Quantity {
  const h = positiveSi(input.squareHeight, 'length', 'squareHeight');
  const theta = siValue(input.angle, 'angle', 'angle');
  if (theta < 0 || theta >= Math.PI / 2) {
    const message = 'angle must be at least zero and less than 90 degrees';
    throw new MathsInputError('angle', message, 'out-of-range');
  }
  return si(h * Math.tan(theta), 'length');
}
