import { describe, test } from 'node:test';
import assert from 'node:assert/strict';
import {
  convert,
  formatQuantity,
  inUnits,
  kindOf,
  quantity as q,
  siValue,
  toDisplay,
  valueIn,
} from '../../procedures/maths/index.ts';
import { near, nearIn, throwsFor } from './helpers.ts';

describe('units', () => {
  test('when 1 kgf is converted to newtons, then it is exactly 9.80665 N (NIST SP 811, appendix B.8)', () => {
    near(valueIn(q(1, 'kgf'), 'N'), 9.80665, 1e-12);
  });

  test('when 1 psi is converted to pascals, then it is 6,894.757 Pa (NIST SP 811, appendix B.8)', () => {
    near(valueIn(q(1, 'psi'), 'Pa'), 6894.757, 0.001);
  });

  test('when 60 rpm is read as SI, then it is 1 Hz (identity: 60 revolutions per 60 s)', () => {
    near(siValue(q(60, 'rpm'), 'rotationalSpeed', 'speed'), 1, 1e-12);
  });

  test('when a rotational speed is given as an angular velocity of 2π rad/s, then it reads as 1 rev/s (identity)', () => {
    near(siValue(q(2 * Math.PI, 'rad/s'), 'rotationalSpeed', 'speed'), 1, 1e-12);
  });

  test('when 1 in is expressed in mm, then it is 25.4 mm (identity: the inch is defined as 25.4 mm)', () => {
    assert.deepEqual(convert(q(1, 'in'), 'mm'), { value: 25.4, unit: 'mm' });
  });

  test('when a blade speed is shown metric and imperial, then it is in m/min and ft/min (identity: 1 ft = 0.3048 m)', () => {
    const v = q(1, 'm/s');
    nearIn(toDisplay(v, 'bladeSpeed'), 'm/min', 60, 1e-9);
    assert.equal(toDisplay(v, 'bladeSpeed', 'imperial').unit, 'ft/min');
    near(toDisplay(v, 'bladeSpeed', 'imperial').value, 60 / 0.3048, 1e-9);
  });

  test('when a tension is shown, then metric is kgf and imperial is lbf; stress is MPa and psi', () => {
    assert.equal(toDisplay(q(9.80665, 'N'), 'tension').unit, 'kgf');
    near(toDisplay(q(9.80665, 'N'), 'tension').value, 1, 1e-12);
    assert.equal(toDisplay(q(1, 'MPa'), 'stress', 'imperial').unit, 'psi');
    assert.equal(toDisplay(q(1, 'MPa'), 'stress', 'metric').unit, 'MPa');
  });

  test('when a force is read in several units, then each reading is the same force (identity)', () => {
    const r = inUnits(q(1, 'kgf'), ['N', 'kgf', 'lbf'] as const);
    near(r.N, 9.80665, 1e-12);
    near(r.kgf, 1, 1e-12);
    near(r.lbf * 4.4482216152605, 9.80665, 1e-9, 'lbf × 4.448 N/lbf');
  });

  test('when the kind of a quantity is asked, then it follows the unit dimensions', () => {
    assert.equal(kindOf(q(1, 'psi')), 'stress');
    assert.equal(kindOf(q(1, 'ft/min')), 'speed');
    assert.equal(kindOf(q(1, 'in^2/min')), 'cuttingRate');
    assert.equal(kindOf(q(1, 'kg')), undefined);
  });

  test('when a quantity is formatted, then it shows the value to the decimals asked and its unit', () => {
    assert.equal(formatQuantity(q(56.5487, 'm/min'), 1), '56.5 m/min');
  });

  test('when a quantity is expressed in an incompatible unit, then the error names the unit', () => {
    throwsFor(() => convert(q(1, 'mm'), 'N'), 'unit', 'unit');
  });

  test('when a display system is neither metric nor imperial, then the error names system', () => {
    throwsFor(() => toDisplay(q(1, 'mm'), 'length', 'cubits' as 'metric'), 'system', 'unknown-name');
  });

  test('when a unit string carries a number of its own, then it is refused rather than ignored', () => {
    throwsFor(() => siValue(q(1, '2 mm'), 'length', 'gap'), 'gap', 'unit');
  });

  test('when a unit is unknown to mathjs, then the error names the argument', () => {
    throwsFor(() => siValue(q(1, 'furlongz'), 'length', 'gap'), 'gap', 'unit');
  });
});
