import { describe, test } from 'node:test';
import assert from 'node:assert/strict';
import {
  bladeLength,
  bladeStress,
  MathsInputError,
  nearestSpeedStep,
  quantity as q,
  squarenessError,
  surfaceSpeed,
  wheelSpeed,
  wheelSurfaceSpeed,
  type Quantity,
} from '../../procedures/maths/index.ts';
import { throwsFor } from './helpers.ts';

const drive = { motorSpeed: q(1440, 'rpm'), driverPulley: q(50, 'mm'), drivenPulley: q(200, 'mm'), wheelDiameter: q(300, 'mm') };

describe('bad inputs are refused with a MathsInputError naming the argument', () => {
  test('when the wheel diameter is negative, then the error names wheelDiameter and says it must be greater than zero', () => {
    throwsFor(() => wheelSurfaceSpeed({ ...drive, wheelDiameter: q(-300, 'mm') }), 'wheelDiameter', 'negative');
    assert.throws(() => wheelSurfaceSpeed({ ...drive, wheelDiameter: q(-300, 'mm') }), /wheelDiameter must be greater than zero/);
  });

  test('when the centre distance is zero, then the message is "centreDistance must be greater than zero"', () => {
    assert.throws(
      () => bladeLength({ wheelDiameter: q(300, 'mm'), centreDistance: q(0, 'mm') }),
      (e: unknown) => e instanceof MathsInputError && e.message.startsWith('centreDistance must be greater than zero'),
    );
  });

  test('when the motor speed is NaN, then the error names motorSpeed, never a silent NaN', () => {
    throwsFor(() => wheelSpeed({ ...drive, motorSpeed: q(Number.NaN, 'rpm') }), 'motorSpeed', 'not-a-number');
  });

  test('when the gap is Infinity, then the error names gap', () => {
    throwsFor(() => squarenessError({ gap: q(Number.POSITIVE_INFINITY, 'mm'), squareHeight: q(100, 'mm') }), 'gap', 'not-finite');
  });

  test('when the feeler gap is larger than the square, then the error names gap', () => {
    throwsFor(() => squarenessError({ gap: q(2, 'in'), squareHeight: q(50, 'mm') }), 'gap', 'out-of-range');
  });

  test('when a diameter is given in a speed unit, then the error names the argument and says what kind it must be', () => {
    throwsFor(() => surfaceSpeed({ diameter: q(300, 'rpm'), rotationalSpeed: q(60, 'rpm') }), 'diameter', 'unit');
    assert.throws(() => surfaceSpeed({ diameter: q(300, 'rpm'), rotationalSpeed: q(60, 'rpm') }), /diameter must be a length/);
  });

  test('when a force is given in psi, then the error names force', () => {
    throwsFor(() => bladeStress({ force: q(500, 'psi'), reads: 'strand', width: q(27, 'mm'), thickness: q(0.9, 'mm') }), 'force', 'unit');
  });

  test('when the gearbox ratio is zero, then the error names gearboxRatio', () => {
    throwsFor(() => wheelSpeed({ ...drive, gearboxRatio: 0 }), 'gearboxRatio', 'zero');
  });

  test('when a quantity is missing, then the error names it', () => {
    throwsFor(() => wheelSpeed({ ...drive, driverPulley: undefined as unknown as Quantity }), 'driverPulley', 'missing');
  });

  test('when a quantity has no unit, then the error names it', () => {
    throwsFor(() => wheelSpeed({ ...drive, driverPulley: { value: 50 } as Quantity }), 'driverPulley', 'unit');
  });

  test('when a value arrives as a string, then the error names it rather than coercing', () => {
    throwsFor(() => wheelSpeed({ ...drive, driverPulley: { value: '50', unit: 'mm' } as unknown as Quantity }), 'driverPulley', 'not-a-number');
  });

  test('when what the gauge reads is not said, then the error names reads', () => {
    throwsFor(
      () => bladeStress({ force: q(500, 'kgf'), reads: undefined as unknown as 'strand', width: q(27, 'mm'), thickness: q(0.9, 'mm') }),
      'reads',
      'unknown-name',
    );
  });

  test('when a speed table has no steps, then the error names steps', () => {
    throwsFor(
      () => nearestSpeedStep({ table: { motorSpeed: q(1440, 'rpm'), wheelDiameter: q(300, 'mm'), steps: [] }, recommended: q(30, 'm/min') }),
      'steps',
      'missing',
    );
  });

  test('when one step of a table is bad, then the error names that step', () => {
    throwsFor(
      () =>
        nearestSpeedStep({
          table: { motorSpeed: q(1440, 'rpm'), wheelDiameter: q(300, 'mm'), steps: [{ label: 'a', driverPulley: q(50, 'mm'), drivenPulley: q(-1, 'mm') }] },
          recommended: q(30, 'm/min'),
        }),
      'steps[0].drivenPulley',
      'negative',
    );
  });
});
