import { describe, test } from 'node:test';
import assert from 'node:assert/strict';
import {
  nearestSpeedStep,
  quantity as q,
  speedSteps,
  surfaceSpeed,
  toDisplay,
  wheelSpeed,
  wheelSurfaceSpeed,
  type SpeedTable,
} from '../../procedures/maths/index.ts';
import { near, nearIn } from './helpers.ts';

// Source for the speed formula and worked value: F. D. Jones, Turning and Boring (cutting speed formula).
const JONES = 'Jones, Turning and Boring, cutting speed formula';

describe('surface speed', () => {
  test(`when a 300 mm wheel turns at 60 rpm, then the blade runs at 56.55 m/min (${JONES})`, () => {
    const v = surfaceSpeed({ diameter: q(300, 'mm'), rotationalSpeed: q(60, 'rpm') });
    nearIn(v, 'm/min', 56.55, 0.005);
  });

  test(`when a 300 mm wheel turns at 60 rpm, then the blade runs at 185.5 ft/min (${JONES})`, () => {
    const v = surfaceSpeed({ diameter: q(300, 'mm'), rotationalSpeed: q(60, 'rpm') });
    near(toDisplay(v, 'bladeSpeed', 'imperial').value, 185.5, 0.05, 'ft/min');
  });

  test('when the diameter is given in inches, then the imperial formula v = π·d·n/12 holds (Jones; 12 in at 10 rpm is 10π ft/min)', () => {
    const v = surfaceSpeed({ diameter: q(12, 'in'), rotationalSpeed: q(10, 'rpm') });
    nearIn(v, 'ft/min', 10 * Math.PI, 1e-9);
  });

  test(`when the motor turns 1,440 rpm through 50/200 mm pulleys and a 6:1 gearbox, then the wheel turns 60 rpm (CHECKS drive formula: 1440 × 50/200 ÷ 6)`, () => {
    const n = wheelSpeed({ motorSpeed: q(1440, 'rpm'), driverPulley: q(50, 'mm'), drivenPulley: q(200, 'mm'), gearboxRatio: 6 });
    nearIn(n, 'rpm', 60, 1e-9);
  });

  test(`when that drive turns a 300 mm wheel, then the blade runs at 56.55 m/min and 185.5 ft/min (${JONES}, worked value)`, () => {
    const r = wheelSurfaceSpeed({
      motorSpeed: q(1440, 'rpm'),
      driverPulley: q(50, 'mm'),
      drivenPulley: q(200, 'mm'),
      gearboxRatio: 6,
      wheelDiameter: q(300, 'mm'),
    });
    nearIn(r.surfaceSpeed, 'm/min', 56.55, 0.005);
    nearIn(r.surfaceSpeed, 'ft/min', 185.5, 0.05);
    assert.equal(r.surfaceSpeed.unit, 'm/s');
  });

  test('when there is no gearbox, then the ratio is taken as 1 (identity: equal pulleys pass motor speed through)', () => {
    const n = wheelSpeed({ motorSpeed: q(60, 'rpm'), driverPulley: q(4, 'in'), drivenPulley: q(101.6, 'mm') });
    nearIn(n, 'rpm', 60, 1e-9);
  });
});

// A made-up three-step table built so that the wheel turns 30, 60 and 90 rpm (1440 × driver/200 ÷ 6):
// its speeds are then ½, 1 and 1½ times the worked value 56.55 m/min (Jones, Turning and Boring).
const table: SpeedTable = {
  motorSpeed: q(1440, 'rpm'),
  wheelDiameter: q(300, 'mm'),
  gearboxRatio: 6,
  steps: [
    { label: 'low', driverPulley: q(25, 'mm'), drivenPulley: q(200, 'mm') },
    { label: 'middle', driverPulley: q(50, 'mm'), drivenPulley: q(200, 'mm') },
    { label: 'high', driverPulley: q(75, 'mm'), drivenPulley: q(200, 'mm') },
  ],
};

describe('speed steps', () => {
  test('when the speed table is worked out, then the steps run at 28.27, 56.55 and 84.82 m/min (½, 1, 1½ × the Jones worked value)', () => {
    const steps = speedSteps(table);
    assert.deepEqual(steps.map((s) => s.label), ['low', 'middle', 'high']);
    nearIn(steps[0]!.surfaceSpeed, 'm/min', 56.55 / 2, 0.005);
    nearIn(steps[1]!.surfaceSpeed, 'm/min', 56.55, 0.005);
    nearIn(steps[2]!.surfaceSpeed, 'm/min', 56.55 * 1.5, 0.01);
  });

  test("when 120 ft/min is recommended (Machinery's Handbook 31st ed., p. 1245, 304 stainless), then the low step is nearest, 22.7 % slow (28.27 ÷ 36.58 − 1)", () => {
    const r = nearestSpeedStep({ table, recommended: q(120, 'ft/min') });
    assert.equal(r.step.label, 'low');
    assert.equal(r.rule, 'nearest');
    near(r.differencePercent, -22.7, 0.1, '% difference');
    nearIn(r.difference, 'm/min', 28.27 - 36.58, 0.01);
  });

  test('when 50 m/min is recommended, then the middle step is nearest but the low step is the fastest not over it (identity: 56.55 vs 28.27 m/min)', () => {
    assert.equal(nearestSpeedStep({ table, recommended: q(50, 'm/min') }).step.label, 'middle');
    const kind = nearestSpeedStep({ table, recommended: q(50, 'm/min'), notFaster: true });
    assert.equal(kind.step.label, 'low');
    assert.equal(kind.rule, 'fastest-not-over');
  });

  test('when every step is faster than asked and notFaster is set, then the slowest step is offered', () => {
    const r = nearestSpeedStep({ table, recommended: q(20, 'm/min'), notFaster: true });
    assert.equal(r.step.label, 'low');
    assert.equal(r.rule, 'slowest');
    assert.ok(r.differencePercent > 0);
  });

  test('when a step names its own gearbox ratio, then it overrides the table ratio (identity: ratio 3 doubles the 60 rpm step)', () => {
    const steps = speedSteps({ ...table, steps: [{ label: 'fast gear', driverPulley: q(50, 'mm'), drivenPulley: q(200, 'mm'), gearboxRatio: 3 }] });
    nearIn(steps[0]!.wheelSpeed, 'rpm', 120, 1e-9);
  });
});
