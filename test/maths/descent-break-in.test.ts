import { describe, test } from 'node:test';
import assert from 'node:assert/strict';
import {
  breakInAreaRange,
  breakInRemaining,
  cutTime,
  defaultBreakInArea,
  descentRate,
  descentTime,
  quantity as q,
  sectionArea,
  toDisplay,
  totalCutArea,
} from '../../procedures/maths/index.ts';
import { near, nearIn, throwsFor } from './helpers.ts';

const BREAK_IN = "blade manufacturers' practice (no standard): about half feed for the first 50–100 in² (323–645 cm²)";

describe('bow-arm descent and cut time', () => {
  test('when the arm drops 100 mm in 10 s, then 10 mm/s = 23.62 in/min (identity: 10 × 60 ÷ 25.4)', () => {
    const v = descentRate({ distance: q(100, 'mm'), time: q(10, 's') });
    nearIn(toDisplay(v, 'feedRate'), 'mm/s', 10, 1e-12);
    near(toDisplay(v, 'feedRate', 'imperial').value, 600 / 25.4, 1e-9);
  });

  test('when the arm drops 1 in in 1 min, then 0.4233 mm/s (identity: 25.4 ÷ 60)', () => {
    nearIn(descentRate({ distance: q(1, 'in'), time: q(1, 'min') }), 'mm/s', 25.4 / 60, 1e-12);
  });

  test('when 100 mm is to drop at 10 mm/s, then it takes 10 s (identity: the first example read back)', () => {
    nearIn(descentTime({ distance: q(100, 'mm'), rate: q(10, 'mm/s') }), 's', 10, 1e-12);
  });

  test('when 5.50 in² (the CHECKS tube 4 × 3 in) is cut at 5.50 in²/min, then it takes 1 min (identity); at 2.75 in²/min, 2 min', () => {
    nearIn(cutTime({ area: q(5.5, 'in^2'), cuttingRate: q(5.5, 'in^2/min') }), 'min', 1, 1e-12);
    nearIn(cutTime({ area: q(5.5, 'in^2'), cuttingRate: q(2.75, 'in^2/min') }), 'min', 2, 1e-12);
  });

  test('when the cutting rate is given in cm²/min and the area in in², then the units are reconciled (identity: 64.516 cm² at 64.516 cm²/min is 10 in² in 1 min)', () => {
    nearIn(cutTime({ area: q(10, 'in^2'), cuttingRate: q(64.516, 'cm^2/min') }), 'min', 1, 1e-9);
  });

  test('when the time of a drop is zero, then the error names time', () => {
    throwsFor(() => descentRate({ distance: q(100, 'mm'), time: q(0, 's') }), 'time', 'zero');
  });
});

describe('cut areas', () => {
  test('when a 4 in OD × 3 in ID tube is cut, then 5.50 in² (CHECKS worked tube example, π/4·(16 − 9))', () => {
    nearIn(sectionArea({ shape: 'tube', outside: q(4, 'in'), inside: q(3, 'in') }), 'in^2', 5.5, 0.005);
  });

  test('when a 2 in round bar and a 2 × 3 in flat are cut, then π in² and 6 in² (identity)', () => {
    nearIn(sectionArea({ shape: 'round', diameter: q(2, 'in') }), 'in^2', Math.PI, 1e-12);
    nearIn(sectionArea({ shape: 'rectangle', width: q(2, 'in'), height: q(3, 'in') }), 'in^2', 6, 1e-12);
  });

  test('when an area is given directly, then it is passed through in SI (identity: 1 cm² = 1e-4 m²)', () => {
    assert.deepEqual(sectionArea({ shape: 'area', area: q(1, 'cm^2') }), { value: 1e-4, unit: 'm^2' });
  });

  test('when the shape is unknown, then the error names section.shape', () => {
    throwsFor(() => sectionArea({ shape: 'hexagon' } as never), 'section.shape', 'unknown-name');
  });
});

describe('blade break-in', () => {
  test(`when the published range is converted, then 50–100 in² is 323–645 cm² (${BREAK_IN})`, () => {
    nearIn(breakInAreaRange.low, 'cm^2', 323, 0.5);
    nearIn(breakInAreaRange.high, 'cm^2', 645, 0.5);
    nearIn(defaultBreakInArea, 'in^2', 100, 1e-9);
  });

  test(`when nothing has been cut, then all 100 in² remain at half feed (${BREAK_IN})`, () => {
    const r = breakInRemaining({ areaCut: q(0, 'in^2') });
    nearIn(r.remaining, 'in^2', 100, 1e-9);
    assert.equal(r.percentDone, 0);
    assert.equal(r.feedFraction, 0.5);
    assert.equal(r.complete, false);
  });

  test(`when ten cuts of the 5.50 in² tube are made, then 55 in² are done, 45 in² remain, 55 % (${BREAK_IN}; CHECKS tube area)`, () => {
    const done = totalCutArea({ cuts: [{ section: { shape: 'tube', outside: q(4, 'in'), inside: q(3, 'in') }, count: 10 }] });
    const r = breakInRemaining({ areaCut: done });
    nearIn(r.remaining, 'in^2', 45, 0.05);
    near(r.percentDone, 55, 0.05);
  });

  test(`when the break-in area is set to 50 in² and 55 in² are cut, then break-in is complete and full feed may be worked up to (${BREAK_IN})`, () => {
    const r = breakInRemaining({ areaCut: q(55, 'in^2'), breakInArea: q(50, 'in^2') });
    assert.equal(r.complete, true);
    assert.equal(r.percentDone, 100);
    nearIn(r.remaining, 'in^2', 0, 1e-12);
    assert.equal(r.feedFraction, 1);
  });

  test('when the area cut is negative, then the error names areaCut', () => {
    throwsFor(() => breakInRemaining({ areaCut: q(-1, 'in^2') }), 'areaCut', 'negative');
  });
});
