import { describe, test } from 'node:test';
import assert from 'node:assert/strict';
import {
  bladeLength,
  callMathsFunction,
  cutTime,
  parseFigure,
  quantity as q,
  requireFigure,
  squarenessError,
  wheelSpeed,
  wheelSurfaceSpeed,
} from '../../procedures/maths/index.ts';
import { nearIn, throwsFor } from './helpers.ts';

const NAVY = 'US Navy training manual (construction series), blade length L = π·D + 2·C';
const drive = { motorSpeed: q(1440, 'rpm'), driverPulley: q(50, 'mm'), drivenPulley: q(200, 'mm'), wheelDiameter: q(300, 'mm') };

describe('strict figures', () => {
  test('when plain decimals are typed, then they read as themselves (identity)', () => {
    const cases: [string, number][] = [['1200', 1200], ['1200.5', 1200.5], ['-0.05', -0.05], ['.5', 0.5], ['5.', 5], ['+3', 3], [' 42 ', 42], ['\u22120.2', -0.2], ['-0', 0]];
    for (const [text, value] of cases) {
      const r = parseFigure(text, 'Gap');
      assert.ok(r.ok, `${text} should be read`);
      assert.equal(r.value, value, text);
    }
  });

  test('when a field is blank, then it reads as nothing rather than zero', () => {
    assert.deepEqual(parseFigure('', 'Gap'), { ok: true, value: null });
    assert.deepEqual(parseFigure('   ', 'Gap'), { ok: true, value: null });
  });

  test('when "1,200" is typed, then it is refused for its thousands separator, never read as 1.2 or 1200', () => {
    const r = parseFigure('1,200', 'Blade length');
    assert.equal(r.ok, false);
    assert.match(!r.ok ? r.message : '', /^Blade length: "1,200" has a thousands separator — type digits with at most one decimal point/);
  });

  test('when hex, an exponent, a decimal comma, a space or words are typed, then each is refused with a message naming the field', () => {
    const refused: [string, RegExp][] = [
      ['0x4B0', /not a decimal number \(hex/],
      ['1e3', /exponent/],
      ['12,5', /comma; use a point/],
      ['1 200', /space inside/],
      ['1.2.3', /more than one decimal point/],
      ['Infinity', /not a plain number/],
      ['NaN', /not a plain number/],
      ['12mm', /not a plain number/],
      ['1/2', /not a plain number/],
      ['-', /not a plain number/],
      ['.', /not a plain number/],
    ];
    for (const [text, why] of refused) {
      const r = parseFigure(text, 'Wheel diameter');
      assert.equal(r.ok, false, `${text} should be refused`);
      assert.match(!r.ok ? r.message : '', /^Wheel diameter: /, text);
      assert.match(!r.ok ? r.message : '', why, text);
    }
  });

  test('when a figure of 400 digits is typed, then it is refused as far too large rather than read as Infinity', () => {
    const r = parseFigure('9'.repeat(400), 'Gap');
    assert.equal(r.ok, false);
  });

  test('when a required figure is refused or blank, then requireFigure throws naming the argument', () => {
    throwsFor(() => requireFigure('0x10', 'gearboxRatio'), 'gearboxRatio', 'not-a-number');
    throwsFor(() => requireFigure('', 'gearboxRatio'), 'gearboxRatio', 'missing');
    assert.equal(requireFigure('6', 'gearboxRatio'), 6);
  });
});

describe('plausible workshop sizes and finite results', () => {
  test(`when a wheel is 1e308 mm across, then the error names wheelDiameter, not a 306-digit blade (${NAVY})`, () => {
    throwsFor(() => bladeLength({ wheelDiameter: q(1e308, 'mm'), centreDistance: q(1000, 'mm') }), 'wheelDiameter', 'out-of-range');
    assert.throws(() => bladeLength({ wheelDiameter: q(1e308, 'mm'), centreDistance: q(1000, 'mm') }), /beyond any workshop size \(at most 100000 mm\)/);
  });

  test(`when the wheel is 300 mm on 1,000 mm centres, then the blade is still 2,942.5 mm (${NAVY}; CHECKS.md worked example)`, () => {
    nearIn(bladeLength({ wheelDiameter: q(300, 'mm'), centreDistance: q(1000, 'mm') }), 'mm', 2942.5, 0.05);
  });

  test('when a motor turns 1e308 rpm or a gearbox ratio is 1e308, then the error names that input', () => {
    throwsFor(() => wheelSpeed({ ...drive, motorSpeed: q(1e308, 'rpm') }), 'motorSpeed', 'out-of-range');
    throwsFor(() => wheelSpeed({ ...drive, gearboxRatio: 1e308 }), 'gearboxRatio', 'out-of-range');
  });

  test('when a gearbox ratio is given as null (a blank field), then it is refused as missing, never taken as 1', () => {
    throwsFor(() => wheelSurfaceSpeed({ ...drive, gearboxRatio: null as unknown as number }), 'gearboxRatio', 'missing');
  });

  test('when a figure is too small for any workshop to measure, then it is refused by name; zero still passes where allowed', () => {
    throwsFor(() => squarenessError({ gap: q(1e-300, 'mm'), squareHeight: q(100, 'mm') }), 'gap', 'out-of-range');
    assert.equal(squarenessError({ gap: q(0, 'mm'), squareHeight: q(100, 'mm') }).degrees, 0);
  });

  test('when a registered function is called through the registry with a huge input, then the refusal names the input (never "quantity")', () => {
    throwsFor(() => callMathsFunction('cutTime', { area: q(1e308, 'cm^2'), cuttingRate: q(50, 'cm^2/min') }), 'area', 'out-of-range');
    throwsFor(() => cutTime({ area: q(100, 'cm^2'), cuttingRate: q(1e300, 'cm^2/min') }), 'cuttingRate', 'out-of-range');
  });
});
