import { MathsInputError } from './errors';
import { positiveSi, si, type Quantity } from './units';

/** Two pulleys on fixed centres. */
export interface PulleyPair {
  readonly driverPulley: Quantity;
  readonly drivenPulley: Quantity;
  readonly centreDistance: Quantity;
}

/** SI diameters and centres, checked so the pulleys clear each other: C > (D + d) ÷ 2. */
function pair(input: PulleyPair): { big: number; small: number; c: number } {
  const a = positiveSi(input.driverPulley, 'length', 'driverPulley');
  const b = positiveSi(input.drivenPulley, 'length', 'drivenPulley');
  const c = positiveSi(input.centreDistance, 'length', 'centreDistance');
  // At or below (D + d) ÷ 2 the pulleys would touch or overlap: no belt drive is laid out so
  // (a hair of slack so that 225 mm on 150 + 300 mm pulleys counts as touching despite float rounding).
  if (c <= ((a + b) / 2) * (1 + 1e-12)) {
    throw new MathsInputError(
      'centreDistance',
      'centreDistance must be more than half the sum of the pulley diameters, or the pulleys overlap',
      'out-of-range',
    );
  }
  return { big: Math.max(a, b), small: Math.min(a, b), c };
}

/** Belt span between tangent points t = √(C² − ((D − d)/2)²). */
export function beltSpan(input: PulleyPair): Quantity {
  const { big, small, c } = pair(input);
  return si(Math.sqrt(c * c - ((big - small) / 2) ** 2), 'length');
}

/** Open-belt length (usual approximation) L = 2C + π(D + d)/2 + (D − d)²/(4C). */
export function openBeltLength(input: PulleyPair): Quantity {
  const { big, small, c } = pair(input);
  return si(2 * c + (Math.PI * (big + small)) / 2 + (big - small) ** 2 / (4 * c), 'length');
}

/** Open-belt length, exact tangent form L = 2t + π(D + d)/2 + (D − d)·asin((D − d)/(2C)). */
export function openBeltLengthExact(input: PulleyPair): Quantity {
  const { big, small, c } = pair(input);
  const span = Math.sqrt(c * c - ((big - small) / 2) ** 2);
  const wrap = (big - small) * Math.asin((big - small) / (2 * c));
  return si(2 * span + (Math.PI * (big + small)) / 2 + wrap, 'length');
}

/** Target mid-span deflection h = t/64 (1/64 in per inch of span). */
export function beltDeflectionTarget(input: { span: Quantity }): Quantity {
  return si(positiveSi(input.span, 'length', 'span') / 64, 'length');
}
