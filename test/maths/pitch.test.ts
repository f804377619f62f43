import { describe, test } from 'node:test';
import assert from 'node:assert/strict';
import { averageWidthOfCut, quantity as q, toothPitch } from '../../procedures/maths/index.ts';
import { near, nearIn, throwsFor } from './helpers.ts';

const RULE = "three-teeth rule (Introduction to Machining, §7.4 'three tooth principle'; Goodheart-Willcox, Agricultural Mechanics and Technology Systems, p. 202)";
const MH = "Machinery's Handbook, 31st ed., bimetal band saw speed table, p. 1245, footnote on pitch";
// The standard variable pitches chosen from (2/3 … 10/14) are the usual trade list: common practice.
const solid = (inches: number) => ({ section: { shape: 'solid' as const, size: q(inches, 'in') } });

describe('tooth pitch, three-teeth rule', () => {
  for (const [size, tpi] of [
    [1, 3],
    [0.5, 6],
    [0.25, 12],
  ] as const) {
    test(`when the section is ${size} in, then the coarsest allowed is ${tpi} TPI (${RULE})`, () => {
      near(toothPitch(solid(size)).minTpi, tpi, 1e-9, 'minTpi');
    });
  }

  test(`when the section is 1 in, then the coarsest pitch is t/3 = 1/3 in = 8.467 mm (${RULE})`, () => {
    nearIn(toothPitch(solid(1)).coarsestPitch, 'mm', 25.4 / 3, 1e-9);
  });

  test('when the upper limit is 12 teeth (trade article, 10–14 teeth, medium confidence), then a 1 in section allows at most 12 TPI; with 10 teeth, 10 TPI', () => {
    near(toothPitch(solid(1)).maxTpi, 12, 1e-9);
    near(toothPitch({ ...solid(1), maxTeeth: 10 }).maxTpi, 10, 1e-9);
  });

  test('when the section is given in mm, then it is worked in inches: 25.4 mm is the same as 1 in (identity)', () => {
    const r = toothPitch({ section: { shape: 'solid', size: q(25.4, 'mm') } });
    near(r.minTpi, 3, 1e-9);
    assert.equal(r.variable.label, toothPitch(solid(1)).variable.label);
  });
});

describe("tooth pitch against the handbook's pitch footnote", () => {
  for (const [size, expected] of [
    [0.25, '10/14'],
    [0.75, '6/10'],
    [1.25, '4/6'],
  ] as const) {
    test(`when the section is ${size} in, then the nearest variable pitch is ${expected} (${MH})`, () => {
      const r = toothPitch(solid(size));
      assert.equal(r.variable.label, expected);
      assert.ok(r.variable.withinRange);
    });
  }

  test(`when the section is 8 in, then the nearest variable pitch is 2/3, the coarsest in the standard list (${MH}); it puts 20 teeth in the cut, past the 12-tooth limit`, () => {
    const r = toothPitch(solid(8));
    assert.equal(r.variable.label, '2/3');
    assert.equal(r.variable.withinRange, false);
    near(r.variable.teethInCut, 20, 1e-9);
  });

  test(`when the section is 4 in, then the handbook's 3/4 (${MH}) is allowed once the limit is 14 teeth, the top of the 10–14 guide; the default aim picks the coarser 2/3`, () => {
    // 3/4 averages 3.5 TPI: 3.5 × 4 in = 14 teeth, so it is in range only with maxTeeth = 14.
    assert.ok(toothPitch({ ...solid(4), maxTeeth: 14 }).allowedVariable.includes('3/4'));
    assert.ok(!toothPitch(solid(4)).allowedVariable.includes('3/4'));
    assert.equal(toothPitch(solid(4)).variable.label, '2/3');
    assert.equal(toothPitch({ ...solid(4), maxTeeth: 14, targetTeeth: 14 }).variable.label, '3/4');
  });

  test('when the section is 1 in, then the nearest constant pitch is 6 TPI (identity: default aim √(3 × 12) = 6 teeth ÷ 1 in; standard constant pitches 2–24 TPI: common practice)', () => {
    const r = toothPitch(solid(1));
    near(r.targetTpi, 6, 1e-9);
    assert.equal(r.constant.label, '6');
    assert.deepEqual(r.allowedConstant, ['3', '4', '6', '8', '10']);
  });
});

describe('tooth pitch for tube and structural sections', () => {
  const TUBE = 'CHECKS worked tube example (average width of cut = area ÷ travel)';

  test(`when the tube is 4 in OD × 3 in ID, then the average width of cut is 5.50 in² ÷ 4 in = 1.375 in (${TUBE})`, () => {
    nearIn(averageWidthOfCut({ shape: 'tube', outside: q(4, 'in'), inside: q(3, 'in') }), 'in', 1.375, 0.001);
  });

  test(`when the tube is 4 in OD × 3 in ID, then the pitch is 4/6 (${TUBE}; ${MH})`, () => {
    assert.equal(toothPitch({ section: { shape: 'tube', outside: q(4, 'in'), inside: q(3, 'in') } }).variable.label, '4/6');
  });

  test('when the same tube is given by its ½ in wall, then the result is the same (identity: ID = OD − 2 × wall)', () => {
    const r = toothPitch({ section: { shape: 'tube', outside: q(4, 'in'), wall: q(0.5, 'in') } });
    nearIn(r.widthOfCut, 'in', 1.375, 0.001);
    assert.equal(r.variable.label, '4/6');
  });

  test(`when a structural section of 5.50 in² is crossed over 4 in of travel, then the width of cut is 1.375 in and the pitch 4/6 (${TUBE})`, () => {
    const r = toothPitch({ section: { shape: 'structural', area: q(5.5, 'in^2'), travel: q(4, 'in') } });
    nearIn(r.widthOfCut, 'in', 1.375, 1e-9);
    assert.equal(r.variable.label, '4/6');
  });

  test('when a tube bore is not smaller than its outside, then the error names section.inside', () => {
    throwsFor(() => toothPitch({ section: { shape: 'tube', outside: q(2, 'in'), inside: q(2, 'in') } }), 'section.inside', 'out-of-range');
  });

  test('when maxTeeth is less than minTeeth, then the error names maxTeeth', () => {
    throwsFor(() => toothPitch({ ...solid(1), maxTeeth: 2 }), 'maxTeeth', 'out-of-range');
  });
});
