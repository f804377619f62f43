import { positiveNumber } from './validate';
import { positiveSi, si, type Quantity } from './units';

/** The belt (and optional gearbox) between motor and wheel. */
export interface DriveTrain {
  readonly motorSpeed: Quantity;
  readonly driverPulley: Quantity;
  readonly drivenPulley: Quantity;
  /** Gearbox reduction, input turns per output turn; 1 (the default) when there is none. */
  readonly gearboxRatio?: number;
}

/**
 * Reads a gearbox ratio: a plain number greater than zero and at most 10,000, or 1 when the
 * argument is left out (a drive with no gearbox). Screens that ask for the ratio must show that
 * default in the field rather than leave it out for a blank field: null is refused as missing.
 */
export function gearboxRatioOf(ratio: unknown, argument = 'gearboxRatio'): number {
  return ratio === undefined ? 1 : positiveNumber(ratio, argument, 10_000);
}

/** Wheel speed n = n_motor × (driver Ø ÷ driven Ø) ÷ gearbox ratio; returned in Hz (rev/s). */
export function wheelSpeed(input: DriveTrain): Quantity {
  const motor = positiveSi(input.motorSpeed, 'rotationalSpeed', 'motorSpeed');
  const driver = positiveSi(input.driverPulley, 'length', 'driverPulley');
  const driven = positiveSi(input.drivenPulley, 'length', 'drivenPulley');
  const ratio = gearboxRatioOf(input.gearboxRatio);
  return si((motor * (driver / driven)) / ratio, 'rotationalSpeed');
}

/** Surface speed of a wheel, pulley or belt v = π·D·n; returned in m/s. */
export function surfaceSpeed(input: { diameter: Quantity; rotationalSpeed: Quantity }): Quantity {
  const d = positiveSi(input.diameter, 'length', 'diameter');
  const n = positiveSi(input.rotationalSpeed, 'rotationalSpeed', 'rotationalSpeed');
  return si(Math.PI * d * n, 'speed');
}

/** Blade speed through the drive v = π·D_wheel·n_motor·(driver ÷ driven) ÷ ratio; SI results. */
export function wheelSurfaceSpeed(input: DriveTrain & { wheelDiameter: Quantity }): {
  wheelSpeed: Quantity;
  surfaceSpeed: Quantity;
} {
  const diameter = positiveSi(input.wheelDiameter, 'length', 'wheelDiameter');
  const n = wheelSpeed(input);
  return { wheelSpeed: n, surfaceSpeed: si(Math.PI * diameter * n.value, 'speed') };
}
