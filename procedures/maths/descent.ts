import { positiveSi, si, type Quantity } from './units';

/** Bow-arm descent rate from a timed drop v = distance ÷ time (m/s). */
export function descentRate(input: { distance: Quantity; time: Quantity }): Quantity {
  const d = positiveSi(input.distance, 'length', 'distance');
  const t = positiveSi(input.time, 'time', 'time');
  return si(d / t, 'speed');
}

/** Time to drop a distance at a descent rate t = distance ÷ rate (s). */
export function descentTime(input: { distance: Quantity; rate: Quantity }): Quantity {
  const d = positiveSi(input.distance, 'length', 'distance');
  const v = positiveSi(input.rate, 'speed', 'rate');
  return si(d / v, 'time');
}

/** Cut time from section area and cutting rate t = area ÷ rate (s). */
export function cutTime(input: { area: Quantity; cuttingRate: Quantity }): Quantity {
  const a = positiveSi(input.area, 'area', 'area');
  const r = positiveSi(input.cuttingRate, 'cuttingRate', 'cuttingRate');
  return si(a / r, 'time');
}
