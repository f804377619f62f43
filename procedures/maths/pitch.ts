import { MathsInputError } from './errors';
import { sectionArea, tubeDiameters, type TubeSection } from './sections';
import { positiveSi, si, valueIn, type Quantity } from './units';
import { positiveNumber, requireList, requireObject } from './validate';

/** The section the blade cuts, for tooth pitch. */
export type PitchSection =
  /** Solid bar: size is the diameter, or the width of material along the blade. */
  | { readonly shape: 'solid'; readonly size: Quantity }
  | TubeSection
  /** Any other profile (angle, channel, box): its area and the blade's travel through it. */
  | { readonly shape: 'structural'; readonly area: Quantity; readonly travel: Quantity };

/** Common constant pitches in teeth per inch (common practice). */
export const constantPitches: readonly number[] = [2, 3, 4, 6, 8, 10, 14, 18, 24];

/** Common variable pitches, coarse/fine teeth per inch (common practice). */
export const variablePitches: readonly (readonly [number, number])[] = [
  [2, 3],
  [3, 4],
  [4, 6],
  [5, 8],
  [6, 10],
  [8, 12],
  [10, 14],
];

/** A standard blade pitch judged against the section. */
export interface PitchChoice {
  readonly label: string;
  readonly coarseTpi: number;
  readonly fineTpi: number;
  /** Teeth per inch; the mean of coarse and fine for a variable pitch. */
  readonly tpi: number;
  /** Tooth spacing 1 in ÷ tpi, in metres. */
  readonly pitch: Quantity;
  readonly teethInCut: number;
  readonly withinRange: boolean;
}

export interface ToothPitchResult {
  readonly widthOfCut: Quantity;
  /** Fewest teeth per inch that keep minTeeth in the cut: minTeeth ÷ t[in]. */
  readonly minTpi: number;
  /** Most teeth per inch before exceeding maxTeeth in the cut: maxTeeth ÷ t[in]. */
  readonly maxTpi: number;
  /** Aim point: targetTeeth ÷ t[in]. */
  readonly targetTpi: number;
  /** Coarsest tooth spacing allowed, p = t ÷ minTeeth (metres). */
  readonly coarsestPitch: Quantity;
  /** Finest tooth spacing allowed, p = t ÷ maxTeeth (metres). */
  readonly finestPitch: Quantity;
  readonly constant: PitchChoice;
  readonly variable: PitchChoice;
  readonly allowedConstant: readonly string[];
  readonly allowedVariable: readonly string[];
}

/** Width of cut: solid t = size; tube and structural t = area ÷ travel (tube travel = outside Ø). */
export function averageWidthOfCut(section: PitchSection): Quantity {
  const s = requireObject(section, 'section') as unknown as PitchSection;
  switch (s.shape) {
    case 'solid':
      return si(positiveSi(s.size, 'length', 'section.size'), 'length');
    case 'tube': {
      const area = sectionArea(s).value;
      return si(area / tubeDiameters(s).outside, 'length');
    }
    case 'structural': {
      const area = positiveSi(s.area, 'area', 'section.area');
      const travel = positiveSi(s.travel, 'length', 'section.travel');
      return si(area / travel, 'length');
    }
    default:
      throw new MathsInputError(
        'section.shape',
        'section.shape must be one of "solid", "tube", "structural"',
        'unknown-name',
      );
  }
}

/** Tooth pitch: minTeeth ÷ t[in] ≤ TPI ≤ maxTeeth ÷ t[in] (three-teeth rule p ≤ t/3); nearest = in range, closest by ratio to targetTeeth ÷ t. */
export function toothPitch(input: {
  section: PitchSection;
  minTeeth?: number;
  maxTeeth?: number;
  /** Default √(minTeeth·maxTeeth), the middle of the range by ratio (6 for 3…12). */
  targetTeeth?: number;
  constantPitches?: readonly number[];
  variablePitches?: readonly (readonly [number, number])[];
}): ToothPitchResult {
  const minTeeth = input.minTeeth === undefined ? 3 : positiveCount(input.minTeeth, 'minTeeth');
  const maxTeeth = input.maxTeeth === undefined ? 12 : positiveCount(input.maxTeeth, 'maxTeeth');
  if (maxTeeth < minTeeth) {
    throw new MathsInputError(
      'maxTeeth',
      `maxTeeth must not be less than minTeeth (${minTeeth})`,
      'out-of-range',
    );
  }
  const targetTeeth =
    input.targetTeeth === undefined
      ? Math.sqrt(minTeeth * maxTeeth)
      : positiveCount(input.targetTeeth, 'targetTeeth');
  const width = averageWidthOfCut(input.section);
  const t = valueIn(width, 'in');
  const minTpi = minTeeth / t;
  const maxTpi = maxTeeth / t;
  const targetTpi = targetTeeth / t;
  const oneInch = valueIn({ value: 1, unit: 'in' }, 'm');

  const choice = (coarse: number, fine: number, label: string): PitchChoice => {
    const tpi = (coarse + fine) / 2;
    const slack = 1e-9 * tpi;
    return {
      label,
      coarseTpi: coarse,
      fineTpi: fine,
      tpi,
      pitch: si(oneInch / tpi, 'length'),
      teethInCut: tpi * t,
      withinRange: tpi >= minTpi - slack && tpi <= maxTpi + slack,
    };
  };
  const constantList = requireList(input.constantPitches ?? constantPitches, 'constantPitches');
  const constants = constantList.map((p, i) => {
    const tpi = positiveCount(p, `constantPitches[${i}]`);
    return choice(tpi, tpi, String(tpi));
  });
  const variableList = requireList(input.variablePitches ?? variablePitches, 'variablePitches');
  const variables = variableList.map((pair, i) => {
    const at = `variablePitches[${i}]`;
    if (!Array.isArray(pair) || pair.length !== 2) {
      throw new MathsInputError(at, `${at} must be [coarse, fine]`, 'missing');
    }
    const a = positiveCount(pair[0], at);
    const b = positiveCount(pair[1], at);
    const [coarse, fine] = a <= b ? [a, b] : [b, a];
    return choice(coarse, fine, `${coarse}/${fine}`);
  });
  const outside = (c: PitchChoice): number =>
    c.tpi < minTpi ? Math.log(minTpi / c.tpi) : c.tpi > maxTpi ? Math.log(c.tpi / maxTpi) : 0;
  const offTarget = (c: PitchChoice): number => Math.abs(Math.log(c.tpi / targetTpi));
  const nearest = (list: PitchChoice[]): PitchChoice =>
    list.reduce((a, b) => {
      const d = outside(b) - outside(a);
      return d < -1e-12 || (Math.abs(d) <= 1e-12 && offTarget(b) < offTarget(a)) ? b : a;
    });

  return {
    widthOfCut: width,
    minTpi,
    maxTpi,
    targetTpi,
    coarsestPitch: si(width.value / minTeeth, 'length'),
    finestPitch: si(width.value / maxTeeth, 'length'),
    constant: nearest(constants),
    variable: nearest(variables),
    allowedConstant: constants.filter((c) => c.withinRange).map((c) => c.label),
    allowedVariable: variables.filter((c) => c.withinRange).map((c) => c.label),
  };
}

/** A tooth count or teeth per inch: a finite number greater than zero. */
function positiveCount(x: unknown, argument: string): number {
  return positiveNumber(x, argument, 1000);
}
