import { describe, test } from 'node:test';
import assert from 'node:assert/strict';
import {
  beltDeflectionForce,
  beltDeflectionTarget,
  beltSpan,
  openBeltLength,
  openBeltLengthExact,
  quantity as q,
} from '../../procedures/maths/index.ts';
import { nearIn, throwsFor } from './helpers.ts';

const TEXTBOOK = 'A Textbook of Engineering Mechanics, ch. 33 (open-belt length)';
const DEFLECTION = 'US Army TM 5-3820-233-12, fig. 4-51; H. P. Bloch, Practical Machinery Management for Process Plants, fig. 7-14';
const FORCE = "belt maker's installation guide, table 5";
const pulleys = { driverPulley: q(150, 'mm'), drivenPulley: q(300, 'mm'), centreDistance: q(600, 'mm') };

describe('V-belt geometry', () => {
  test(`when d = 150, D = 300, C = 600 mm, then the open belt is 1,916.2 mm long (${TEXTBOOK})`, () => {
    nearIn(openBeltLength(pulleys), 'mm', 1916.2, 0.05);
  });

  test(`when the same drive is worked by the exact tangent formula, then 1,916.25 mm (${TEXTBOOK}, CHECKS note)`, () => {
    nearIn(openBeltLengthExact(pulleys), 'mm', 1916.25, 0.005);
  });

  test(`when d = 150, D = 300, C = 600 mm, then the span is 595.3 mm (CHECKS worked example, t = √(C² − ((D−d)/2)²))`, () => {
    nearIn(beltSpan(pulleys), 'mm', 595.3, 0.05);
  });

  test('when driver and driven are swapped, then span and length are unchanged (identity: only D − d squared enters)', () => {
    const swapped = { ...pulleys, driverPulley: pulleys.drivenPulley, drivenPulley: pulleys.driverPulley };
    assert.deepEqual(beltSpan(swapped), beltSpan(pulleys));
    assert.deepEqual(openBeltLength(swapped), openBeltLength(pulleys));
  });

  test('when the pulleys are equal, then the span equals the centre distance (identity)', () => {
    nearIn(beltSpan({ driverPulley: q(4, 'in'), drivenPulley: q(4, 'in'), centreDistance: q(20, 'in') }), 'in', 20, 1e-12);
  });

  test('when the centres are at half the sum of the diameters (the pulleys touch), then the error names centreDistance (CHECKS.md, V-belts: the open-belt formula needs pulleys clear of each other, from memory)', () => {
    throwsFor(() => openBeltLength({ ...pulleys, centreDistance: q(225, 'mm') }), 'centreDistance', 'out-of-range');
    throwsFor(() => beltSpan({ ...pulleys, centreDistance: q(200, 'mm') }), 'centreDistance', 'out-of-range');
    nearIn(beltSpan({ ...pulleys, centreDistance: q(226, 'mm') }), 'mm', Math.sqrt(226 ** 2 - 75 ** 2), 1e-9);
  });

  test('when the centres are closer than half the diameter difference, then the error names centreDistance', () => {
    throwsFor(() => beltSpan({ ...pulleys, centreDistance: q(70, 'mm') }), 'centreDistance', 'out-of-range');
  });
});

describe('V-belt deflection', () => {
  test(`when the span is 595.3 mm, then the target deflection is 9.30 mm (CHECKS worked example; ${DEFLECTION})`, () => {
    nearIn(beltDeflectionTarget({ span: q(595.3, 'mm') }), 'mm', 9.3, 0.005);
  });

  test(`when the span is 100 in, then the target deflection is 1 9/16 in (${DEFLECTION})`, () => {
    nearIn(beltDeflectionTarget({ span: q(100, 'in') }), 'in', 1 + 9 / 16, 1e-12);
  });

  test(`when the span is 1 m, then the target deflection is about 15.6 mm (${DEFLECTION})`, () => {
    nearIn(beltDeflectionTarget({ span: q(1, 'm') }), 'mm', 15.6, 0.05);
  });

  test(`when an A belt on a 3.2 in small pulley runs 1,750 rpm, then 5.5 lbf new and 3.7 lbf used (${FORCE})`, () => {
    const at = (belt: 'new' | 'used') =>
      beltDeflectionForce({ section: 'A', smallPulley: q(3.2, 'in'), smallPulleySpeed: q(1750, 'rpm'), belt });
    nearIn(at('new')!.force, 'lbf', 5.5, 1e-9);
    nearIn(at('used')!.force, 'lbf', 3.7, 1e-9);
  });

  test(`when a BX belt on a 127 mm (5 in) small pulley runs 1,200 rpm, then 7.9 lbf new and 5.3 lbf used (${FORCE})`, () => {
    const at = (belt: 'new' | 'used') =>
      beltDeflectionForce({ section: 'bx', smallPulley: q(127, 'mm'), smallPulleySpeed: q(1200, 'rpm'), belt });
    nearIn(at('new')!.force, 'lbf', 7.9, 1e-9);
    nearIn(at('used')!.force, 'lbf', 5.3, 1e-9);
  });

  test(`when no row of the table covers the pulley, then null (${FORCE} lists A only for 3.0–3.6 in)`, () => {
    assert.equal(
      beltDeflectionForce({ section: 'A', smallPulley: q(4, 'in'), smallPulleySpeed: q(1750, 'rpm'), belt: 'new' }),
      null,
    );
  });
});
