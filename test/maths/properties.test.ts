import { describe, test } from 'node:test';
import assert from 'node:assert/strict';
import fc from 'fast-check';
import { unit as mathjsUnit } from 'mathjs';
import {
  bladeLength,
  bladeStress,
  centreDistanceForBlade,
  convert,
  feelerStack,
  forceForStress,
  quantity as q,
  siValue,
  wheelSurfaceSpeed,
} from '../../procedures/maths/index.ts';

/** Relative closeness for round trips. */
const close = (a: number, b: number, rel = 1e-9): boolean => Math.abs(a - b) <= rel * Math.max(Math.abs(a), Math.abs(b), 1e-300);

const positive = (min: number, max: number) => fc.double({ min, max, noNaN: true, noDefaultInfinity: true });

describe('properties', () => {
  test('when the motor runs faster, then the blade runs faster', () => {
    fc.assert(
      fc.property(positive(1, 5000), positive(1.0001, 3), positive(20, 300), positive(20, 300), positive(100, 800), positive(1, 40),
        (motor, factor, driver, driven, wheel, ratio) => {
          const speed = (rpm: number) =>
            wheelSurfaceSpeed({ motorSpeed: q(rpm, 'rpm'), driverPulley: q(driver, 'mm'), drivenPulley: q(driven, 'mm'), gearboxRatio: ratio, wheelDiameter: q(wheel, 'mm') }).surfaceSpeed.value;
          return speed(motor * factor) > speed(motor);
        }),
    );
  });

  test('when the wheel is larger, then the blade runs faster', () => {
    fc.assert(
      fc.property(positive(1, 5000), positive(100, 800), positive(1.0001, 3), (motor, wheel, factor) => {
        const speed = (d: number) =>
          wheelSurfaceSpeed({ motorSpeed: q(motor, 'rpm'), driverPulley: q(80, 'mm'), drivenPulley: q(160, 'mm'), wheelDiameter: q(d, 'mm') }).surfaceSpeed.value;
        return speed(wheel * factor) > speed(wheel);
      }),
    );
  });

  test('when the force for a stress is applied, then the stress comes back (force ↔ stress round trip)', () => {
    fc.assert(
      fc.property(positive(1, 400), positive(3, 80), positive(0.3, 2), (mpa, width, thickness) => {
        const section = { width: q(width, 'mm'), thickness: q(thickness, 'mm') };
        const f = forceForStress({ stress: q(mpa, 'MPa'), ...section });
        const byStrand = bladeStress({ force: f.strandForce, reads: 'strand', ...section });
        const byWheel = bladeStress({ force: f.wheelLoad, reads: 'wheel-load', ...section });
        return close(byStrand.stressReadout.MPa, mpa) && close(byWheel.stressReadout.MPa, mpa);
      }),
    );
  });

  test('when a blade length is worked out and read back, then the centre distance comes back (length ↔ centres round trip)', () => {
    fc.assert(
      fc.property(positive(100, 1000), positive(100, 5000), (wheel, centres) => {
        const length = bladeLength({ wheelDiameter: q(wheel, 'mm'), centreDistance: q(centres, 'mm') });
        const back = centreDistanceForBlade({ bladeLength: length, wheelDiameter: q(wheel, 'mm') });
        return close(back.value, centres / 1000, 1e-9);
      }),
    );
  });

  const pairs = [
    ['mm', 'in'],
    ['m/min', 'ft/min'],
    ['kgf', 'lbf'],
    ['N', 'lbf'],
    ['MPa', 'psi'],
    ['cm^2', 'in^2'],
  ] as const;

  test('when a metric value goes to imperial and back, then it is unchanged and agrees with mathjs itself', () => {
    fc.assert(
      fc.property(fc.constantFrom(...pairs), positive(1e-6, 1e6), ([metric, imperial], v) => {
        const there = convert(q(v, metric), imperial);
        const back = convert(there, metric);
        return close(back.value, v, 1e-12) && close(there.value, mathjsUnit(v, metric).toNumber(imperial), 1e-12);
      }),
    );
  });

  test('when a feeler stack is found, then it is within target ± tolerance and uses leaves of the set, each at most once', () => {
    const leafMicrons = fc.array(fc.integer({ min: 10, max: 1000 }), { minLength: 1, maxLength: 12 });
    fc.assert(
      fc.property(leafMicrons, fc.integer({ min: 10, max: 3000 }), fc.integer({ min: 0, max: 20 }), (microns, targetUm, tolUm) => {
        const leaves = microns.map((um) => q(um / 1000, 'mm'));
        const r = feelerStack({ target: q(targetUm / 1000, 'mm'), tolerance: q(tolUm / 1000, 'mm'), leaves });
        if (r === null) return true;
        assert.equal(new Set(r.indexes).size, r.indexes.length, 'each leaf once');
        r.indexes.forEach((i, k) => assert.equal(r.leaves[k], leaves[i], 'leaf comes from the set'));
        const sum = r.indexes.reduce((s, i) => s + siValue(leaves[i], 'length', 'leaf'), 0);
        assert.ok(close(sum, r.total.value, 1e-12), 'total is the sum of the leaves');
        assert.ok(r.total.value <= (targetUm + tolUm) * 1e-6 + 1e-12, 'never over target + tolerance');
        assert.ok(r.total.value >= (targetUm - tolUm) * 1e-6 - 1e-12, 'never under target − tolerance');
        return true;
      }),
    );
  });

  test('when a small set is searched exhaustively, then the stack found has the fewest leaves, and none is found only when none exists', () => {
    const leafMicrons = fc.array(fc.integer({ min: 10, max: 500 }), { minLength: 1, maxLength: 8 });
    fc.assert(
      fc.property(leafMicrons, fc.integer({ min: 10, max: 2000 }), fc.integer({ min: 0, max: 10 }), (microns, targetUm, tolUm) => {
        let fewest = Infinity;
        for (let mask = 1; mask < 1 << microns.length; mask++) {
          let sum = 0;
          let count = 0;
          microns.forEach((um, i) => {
            if (mask & (1 << i)) {
              sum += um;
              count++;
            }
          });
          if (Math.abs(sum - targetUm) <= tolUm) fewest = Math.min(fewest, count);
        }
        const r = feelerStack({ target: q(targetUm, 'um'), tolerance: q(tolUm, 'um'), leaves: microns.map((um) => q(um, 'um')) });
        return fewest === Infinity ? r === null : r !== null && r.leaves.length === fewest;
      }),
    );
  });
});
