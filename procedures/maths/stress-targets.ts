import type { BladeType } from './blade-speed-table';
import { sources, type Source } from './sources';
import { siValue, type Quantity } from './units';
import { oneOf } from './validate';

/** Usual strand-stress targets by blade type, and the ceiling never to pass (source units, psi). */
export const bladeStressTargets = {
  carbon: { low: { value: 15_000, unit: 'psi' }, high: { value: 20_000, unit: 'psi' } },
  'bi-metal': { low: { value: 25_000, unit: 'psi' }, high: { value: 30_000, unit: 'psi' } },
  limit: { value: 35_000, unit: 'psi' },
  source: sources.stressTargets,
} as const satisfies {
  carbon: { low: Quantity; high: Quantity };
  'bi-metal': { low: Quantity; high: Quantity };
  limit: Quantity;
  source: Source;
};

export type StressVerdict = 'low' | 'within' | 'high' | 'over-limit';

export interface StressJudgement {
  readonly verdict: StressVerdict;
  readonly target: { readonly low: Quantity; readonly high: Quantity };
  readonly limit: Quantity;
  readonly source: Source;
  readonly message: string;
}

/** Judges σ: low < target low ≤ within ≤ target high < high ≤ limit < over-limit. */
export function judgeBladeStress(input: { stress: Quantity; blade: BladeType }): StressJudgement {
  const blade = oneOf(input.blade, ['carbon', 'bi-metal'] as const, 'blade');
  const sigma = siValue(input.stress, 'stress', 'stress');
  const target = bladeStressTargets[blade];
  const low = siValue(target.low, 'stress', 'target.low');
  const high = siValue(target.high, 'stress', 'target.high');
  const limit = siValue(bladeStressTargets.limit, 'stress', 'limit');
  const verdict: StressVerdict =
    sigma > limit ? 'over-limit' : sigma > high ? 'high' : sigma < low ? 'low' : 'within';
  const range = `${target.low.value}–${target.high.value} psi`;
  const messages: Record<StressVerdict, string> = {
    low: `Below the usual ${range} for a ${blade} blade.`,
    within: `Within the usual ${range} for a ${blade} blade.`,
    high: `Above the usual ${range} for a ${blade} blade.`,
    'over-limit': `Past the ${bladeStressTargets.limit.value} psi that a blade should never exceed.`,
  };
  return {
    verdict,
    target,
    limit: bladeStressTargets.limit,
    source: bladeStressTargets.source,
    message: messages[verdict],
  };
}
