import { describe, test } from 'node:test';
import assert from 'node:assert/strict';
import { allowedGap, quantity as q, squarenessError } from '../../procedures/maths/index.ts';
import { near, nearIn, throwsFor } from './helpers.ts';

const FORMULA = 'CHECKS.md, Squareness (θ = atan(g/h); per-100-mm error = 100·g/h)';
const TEST_CUT = 'horizontal bandsaw manual, test-cut acceptance: 0.003 in per inch ≈ 0.30 mm per 100 mm';

describe('squareness', () => {
  test(`when the gap equals the square height, then it is refused on the gap rather than shown as 45° (${FORMULA}; atan 1 = 45° is no squareness reading, common practice)`, () => {
    throwsFor(() => squarenessError({ gap: q(100, 'mm'), squareHeight: q(100, 'mm') }), 'gap', 'out-of-range');
  });

  test(`when the gap is a tenth of the square height, then it is still worked out: 5.711° (${FORMULA}; atan 0.1 = 5.7106°, from memory)`, () => {
    near(squarenessError({ gap: q(10, 'mm'), squareHeight: q(100, 'mm') }).degrees, 5.7106, 0.0001);
    throwsFor(() => squarenessError({ gap: q(10.01, 'mm'), squareHeight: q(100, 'mm') }), 'gap', 'out-of-range');
  });

  test(`when a 0.1 mm leaf fits at the top of a 100 mm square, then 0.1 mm per 100 mm and 3.44′ (${FORMULA}; atan 0.001 = 0.0573° × 60)`, () => {
    const r = squarenessError({ gap: q(0.1, 'mm'), squareHeight: q(100, 'mm') });
    nearIn(r.errorPer100mm, 'mm', 0.1, 1e-12);
    near(r.arcMinutes, 3.44, 0.005);
    assert.equal(r.degreesMinutes.degrees, 0);
    near(r.degreesMinutes.minutes, 3.44, 0.005);
    assert.equal(r.pass, undefined);
  });

  test('when the gap and square are in inches, then the per-100-mm error is the same slope (identity: 0.004 in on 4 in is 0.1 mm per 100 mm)', () => {
    nearIn(squarenessError({ gap: q(0.004, 'in'), squareHeight: q(4, 'in') }).errorPer100mm, 'mm', 0.1, 1e-12);
  });

  test(`when 0.29 mm shows over 100 mm, then it passes 0.003 in per inch; 0.31 mm fails (${TEST_CUT})`, () => {
    const tolerance = { gap: q(0.003, 'in'), over: q(1, 'in') };
    assert.equal(squarenessError({ gap: q(0.29, 'mm'), squareHeight: q(100, 'mm'), tolerance }).pass, true);
    assert.equal(squarenessError({ gap: q(0.31, 'mm'), squareHeight: q(100, 'mm'), tolerance }).pass, false);
  });

  test('when the tolerance is an angle of 1′, then 0.02 mm on 100 mm (0.69′) passes and 0.05 mm (1.72′) fails (identity: atan(g/h) in minutes)', () => {
    const tolerance = { angle: q(1, 'arcmin') };
    assert.equal(squarenessError({ gap: q(0.02, 'mm'), squareHeight: q(100, 'mm'), tolerance }).pass, true);
    assert.equal(squarenessError({ gap: q(0.05, 'mm'), squareHeight: q(100, 'mm'), tolerance }).pass, false);
  });

  test('when no leaf fits (gap 0), then the angle is zero and any tolerance passes', () => {
    const r = squarenessError({ gap: q(0, 'mm'), squareHeight: q(150, 'mm'), tolerance: { gap: q(0, 'mm'), over: q(100, 'mm') } });
    assert.equal(r.degrees, 0);
    assert.equal(r.pass, true);
  });

  test(`when the tolerance is 45°, then the allowed gap equals the square height (identity: tan 45° = 1; ${FORMULA})`, () => {
    nearIn(allowedGap({ squareHeight: q(100, 'mm'), angle: q(45, 'deg') }), 'mm', 100, 1e-9);
  });

  test('when the gap is larger than the square, then the error names gap', () => {
    throwsFor(() => squarenessError({ gap: q(101, 'mm'), squareHeight: q(100, 'mm') }), 'gap', 'out-of-range');
  });

  test('when the gap is negative, then the error names gap', () => {
    throwsFor(() => squarenessError({ gap: q(-0.1, 'mm'), squareHeight: q(100, 'mm') }), 'gap', 'negative');
  });
});
