import { sectionArea, type CutSection } from './sections';
import { sources } from './sources';
import { nonNegativeSi, positiveSi, si, type Quantity } from './units';
import { finiteNumber, requireAtMost, requireList, requireNonNegative, requireObject } from './validate';

/** Break-in cut area from blade makers' practice: about half feed for the first 50–100 in². */
export const breakInAreaRange = {
  low: { value: 50, unit: 'in^2' },
  high: { value: 100, unit: 'in^2' },
  source: sources.breakIn,
} as const;

/** Default break-in area: the top of the range (100 in²), the gentler choice. */
export const defaultBreakInArea: Quantity = breakInAreaRange.high;

/** Feed fraction while breaking in (about half the normal feed). */
export const breakInFeedFraction = 0.5;

/** Total area cut Σ area(section) × count (m²). */
export function totalCutArea(input: {
  cuts: readonly { section: CutSection; count?: number }[];
}): Quantity {
  const cuts = requireList(input.cuts, 'cuts');
  const total = cuts.reduce<number>((sum, raw, i) => {
    const cut = requireObject(raw, `cuts[${i}]`);
    const at = `cuts[${i}].count`;
    const count = cut['count'] === undefined ? 1 : requireAtMost(requireNonNegative(finiteNumber(cut['count'], at), at), 1e6, at);
    return sum + sectionArea(cut['section'] as CutSection, `cuts[${i}].section`).value * count;
  }, 0);
  return si(total, 'area');
}

export interface BreakInProgress {
  readonly breakInArea: Quantity;
  readonly areaCut: Quantity;
  /** max(0, break-in area − area cut), m². */
  readonly remaining: Quantity;
  /** min(100, area cut ÷ break-in area × 100). */
  readonly percentDone: number;
  readonly complete: boolean;
  /** Feed as a fraction of normal: 0.5 while breaking in, then 1 (raise gradually). */
  readonly feedFraction: number;
}

/** Break-in left: remaining = max(0, A_break-in − A_cut); % done = A_cut ÷ A_break-in × 100. */
export function breakInRemaining(input: {
  areaCut: Quantity;
  breakInArea?: Quantity;
}): BreakInProgress {
  const cut = nonNegativeSi(input.areaCut, 'area', 'areaCut');
  const target = positiveSi(input.breakInArea ?? defaultBreakInArea, 'area', 'breakInArea');
  const complete = cut >= target;
  return {
    breakInArea: si(target, 'area'),
    areaCut: si(cut, 'area'),
    remaining: si(Math.max(0, target - cut), 'area'),
    percentDone: Math.min(100, (cut / target) * 100),
    complete,
    feedFraction: complete ? 1 : breakInFeedFraction,
  };
}
