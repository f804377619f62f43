import { MathsInputError } from './errors';
import { positiveSi, si, type Quantity } from './units';

/** Blade length on two equal wheels L = π·D + 2·C. */
export function bladeLength(input: {
  wheelDiameter: Quantity;
  centreDistance: Quantity;
}): Quantity {
  const d = positiveSi(input.wheelDiameter, 'length', 'wheelDiameter');
  const c = positiveSi(input.centreDistance, 'length', 'centreDistance');
  return si(Math.PI * d + 2 * c, 'length');
}

/** Centre distance for a blade on two equal wheels C = (L − π·D) ÷ 2. */
export function centreDistanceForBlade(input: {
  bladeLength: Quantity;
  wheelDiameter: Quantity;
}): Quantity {
  const l = positiveSi(input.bladeLength, 'length', 'bladeLength');
  const d = positiveSi(input.wheelDiameter, 'length', 'wheelDiameter');
  if (l <= Math.PI * d) {
    throw new MathsInputError(
      'bladeLength',
      'bladeLength must be longer than one wheel circumference (π × wheelDiameter)',
      'out-of-range',
    );
  }
  return si((l - Math.PI * d) / 2, 'length');
}
