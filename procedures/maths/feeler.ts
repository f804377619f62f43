import { MathsInputError } from './errors';
import { nonNegativeSi, positiveSi, si, type Quantity } from './units';

const mm = (value: number): Quantity => ({ value, unit: 'mm' });

// A typical metric set, 0.05–1.00 mm (from memory; leaves within the BS 957:2008 range 0.03–1.00 mm).
// The source list's "0.50 … 1.00" is read as 0.10 mm steps: 0.50, 0.60, 0.70, 0.80, 0.90, 1.00.
/** Default leaves: 0.05–0.10 by 0.01, 0.15–0.30 by 0.05, 0.40–1.00 by 0.10 mm (from memory). */
export const typicalMetricFeelerSet: readonly Quantity[] = [
  0.05, 0.06, 0.07, 0.08, 0.09, 0.1, 0.15, 0.2, 0.25, 0.3, 0.4, 0.5, 0.6, 0.7, 0.8, 0.9, 1.0,
].map(mm);

export interface FeelerStack {
  /** The leaves to stack, as given in the set, thickest first. */
  readonly leaves: readonly Quantity[];
  /** Positions of those leaves in the set. */
  readonly indexes: readonly number[];
  /** Σ leaves, in metres. */
  readonly total: Quantity;
  /** total − target, in metres. */
  readonly error: Quantity;
}

/** Sums are kept as whole tenths of a micrometre so that equal thicknesses compare exactly. */
const STEP = 1e-7;

/** Fewest leaves, each at most once, with |Σ leaves − target| ≤ tolerance (closest wins a tie); null if none. */
export function feelerStack(input: {
  target: Quantity;
  tolerance: Quantity;
  leaves?: readonly Quantity[];
}): FeelerStack | null {
  const target = positiveSi(input.target, 'length', 'target');
  const tolerance = nonNegativeSi(input.tolerance, 'length', 'tolerance');
  const set = input.leaves ?? typicalMetricFeelerSet;
  if (!Array.isArray(set) || set.length === 0) {
    throw new MathsInputError('leaves', 'leaves must list at least one leaf', 'missing');
  }
  const sizes = set.map((leaf, i) => Math.round(positiveSi(leaf, 'length', `leaves[${i}]`) / STEP));
  const lo = Math.round((target - tolerance) / STEP);
  const hi = Math.round((target + tolerance) / STEP);

  // 0/1 knapsack over reachable sums: for each sum keep the stack with the fewest leaves.
  const best = new Map<number, number[]>([[0, []]]);
  sizes.forEach((size, i) => {
    for (const [sum, used] of [...best.entries()]) {
      const next = sum + size;
      if (next > hi) continue;
      const held = best.get(next);
      if (held === undefined || held.length > used.length + 1) best.set(next, [...used, i]);
    }
  });

  // Rounded sums pick the candidates; the exact sum decides, so rounding can never pass a stack.
  const exact = sizes.map((_, i) => positiveSi(set[i], 'length', `leaves[${i}]`));
  let chosen: { total: number; used: number[] } | undefined;
  for (const [sum, used] of best) {
    if (used.length === 0 || sum < lo || sum > hi) continue;
    const total = used.reduce((s, i) => s + (exact[i] ?? 0), 0);
    if (Math.abs(total - target) > tolerance + 1e-12) continue;
    const closer = chosen !== undefined && Math.abs(total - target) < Math.abs(chosen.total - target);
    const better =
      chosen === undefined ||
      used.length < chosen.used.length ||
      (used.length === chosen.used.length && closer);
    if (better) chosen = { total, used };
  }
  if (chosen === undefined) return null;
  const indexes = [...chosen.used].sort((a, b) => (exact[b] ?? 0) - (exact[a] ?? 0));
  const total = chosen.total;
  return {
    leaves: indexes.map((i) => set[i] as Quantity),
    indexes,
    total: si(total, 'length'),
    error: si(total - target, 'length'),
  };
}
