import { describe, test } from 'node:test';
import assert from 'node:assert/strict';
import fc from 'fast-check';
import {
  callMathsFunction,
  MathsInputError,
  mathsFunctions,
  parseFigure,
  quantity as q,
  readingProblem,
  type MathsFunctionName,
} from '../../procedures/maths/index.ts';

// Properties over every registered calculator: random numbers and strings in any one input give
// either a result whose every number is finite, or a MathsInputError naming a real input. Sources
// of the worked figures each sample starts from are named beside them.

/** One good call per calculator; a test below fails if the registry gains one without a sample. */
const SAMPLES: Record<MathsFunctionName, Record<string, unknown>> = {
  // CHECKS.md, Surface speed: 1,440 rpm through 50/200 mm and 6:1 → 60 rpm; 300 mm at 60 rpm → 56.55 m/min.
  wheelSpeed: { motorSpeed: q(1440, 'rpm'), driverPulley: q(50, 'mm'), drivenPulley: q(200, 'mm'), gearboxRatio: 6 },
  surfaceSpeed: { diameter: q(300, 'mm'), rotationalSpeed: q(60, 'rpm') },
  wheelSurfaceSpeed: { motorSpeed: q(1440, 'rpm'), driverPulley: q(50, 'mm'), drivenPulley: q(200, 'mm'), gearboxRatio: 6, wheelDiameter: q(300, 'mm') },
  speedSteps: { motorSpeed: q(1440, 'rpm'), wheelDiameter: q(300, 'mm'), gearboxRatio: 6, steps: [{ label: '1', driverPulley: q(50, 'mm'), drivenPulley: q(200, 'mm') }] },
  nearestSpeedStep: {
    table: { motorSpeed: q(1440, 'rpm'), wheelDiameter: q(300, 'mm'), gearboxRatio: 6, steps: [{ label: '1', driverPulley: q(50, 'mm'), drivenPulley: q(200, 'mm') }] },
    recommended: q(50, 'm/min'),
  },
  // Machinery's Handbook, 31st ed., bimetal band saw speeds (p. 1245): 304 stainless, 4 in → 120 ft/min.
  recommendBladeSpeed: { material: 'stainless-304', section: q(4, 'in'), blade: 'bi-metal', cutting: 'coolant' },
  // CHECKS.md, Tooth pitch: tube 4 in × 3 in → 1.375 in average width → 4/6.
  averageWidthOfCut: { shape: 'tube', outside: q(4, 'in'), inside: q(3, 'in') },
  toothPitch: { section: { shape: 'tube', outside: q(4, 'in'), inside: q(3, 'in') } },
  // CHECKS.md, Blade tension: 27 × 0.9 mm at 500 kgf per strand → 201.8 MPa.
  bladeSection: { width: q(27, 'mm'), thickness: q(0.9, 'mm') },
  strandTension: { reading: q(800, 'kgf'), reads: 'wheel-load' },
  gaugeReadingFor: { strandForce: q(400, 'kgf'), reads: 'wheel-load' },
  bladeStress: { force: q(500, 'kgf'), reads: 'strand', width: q(27, 'mm'), thickness: q(0.9, 'mm') },
  forceForStress: { stress: q(200, 'MPa'), width: q(27, 'mm'), thickness: q(0.9, 'mm') },
  // CHECKS.md, Blade tension: L₀ = 100 mm, σ = 200 MPa, E = 200 GPa → ΔL = 0.100 mm.
  stressFromStretch: { elongation: q(0.1, 'mm'), gaugeLength: q(100, 'mm'), steel: 'structural' },
  stretchForStress: { stress: q(200, 'MPa'), gaugeLength: q(100, 'mm'), steel: 'structural' },
  judgeBladeStress: { stress: q(190, 'MPa'), blade: 'bi-metal' },
  // CHECKS.md, V-belts: d = 150, D = 300, C = 600 mm → 1,916.2 mm; span 595.3 mm → 9.30 mm.
  beltSpan: { driverPulley: q(150, 'mm'), drivenPulley: q(300, 'mm'), centreDistance: q(600, 'mm') },
  openBeltLength: { driverPulley: q(150, 'mm'), drivenPulley: q(300, 'mm'), centreDistance: q(600, 'mm') },
  openBeltLengthExact: { driverPulley: q(150, 'mm'), drivenPulley: q(300, 'mm'), centreDistance: q(600, 'mm') },
  beltDeflectionTarget: { span: q(595.3, 'mm') },
  // Belt maker's installation guide, table 5 (CHECKS.md): A section, 3.0–3.6 in, 1000–2500 rpm.
  beltDeflectionForce: { section: 'A', smallPulley: q(3.2, 'in'), smallPulleySpeed: q(1440, 'rpm'), belt: 'new' },
  // US Navy training manual (CHECKS.md, Blade length): 300 mm wheels on 1,000 mm centres → 2,942.5 mm.
  bladeLength: { wheelDiameter: q(300, 'mm'), centreDistance: q(1000, 'mm') },
  centreDistanceForBlade: { bladeLength: q(2942.5, 'mm'), wheelDiameter: q(300, 'mm') },
  // CHECKS.md, Squareness: θ = atan(g/h).
  squarenessError: { gap: q(0.1, 'mm'), squareHeight: q(100, 'mm'), tolerance: { gap: q(0.1, 'mm'), over: q(100, 'mm') } },
  allowedGap: { squareHeight: q(100, 'mm'), angle: q(0.05, 'deg') },
  // CHECKS.md, Squareness and feeler gauges: typical metric set (from memory).
  feelerStack: { target: q(0.37, 'mm'), tolerance: q(0.005, 'mm') },
  // Distance over time, common practice.
  descentRate: { distance: q(100, 'mm'), time: q(50, 's') },
  descentTime: { distance: q(60, 'mm'), rate: q(2, 'mm/s') },
  cutTime: { area: q(20, 'cm^2'), cuttingRate: q(8, 'cm^2/min') },
  sectionArea: { shape: 'tube', outside: q(4, 'in'), inside: q(3, 'in') },
  // CHECKS.md, Blade break-in: 50–100 in² at about half feed (manufacturers' practice).
  totalCutArea: { cuts: [{ section: { shape: 'round', diameter: q(50, 'mm') }, count: 12 }] },
  breakInRemaining: { areaCut: q(200, 'cm^2') },
};

/** Every [path, value] leaf of a sample where a number sits (a quantity's value or a plain number). */
function numberPaths(x: unknown, path: string[] = []): string[][] {
  if (typeof x === 'number') return [path];
  if (x === null || typeof x !== 'object') return [];
  return Object.entries(x as Record<string, unknown>).flatMap(([k, v]) => numberPaths(v, [...path, k]));
}

function withAt(x: unknown, path: string[], value: unknown): unknown {
  if (path.length === 0) return value;
  const [head, ...rest] = path as [string, ...string[]];
  const copy: Record<string, unknown> = Array.isArray(x) ? ([...x] as unknown as Record<string, unknown>) : { ...(x as Record<string, unknown>) };
  copy[head] = withAt(copy[head], rest, value);
  return copy;
}

/** The argument name a refusal should carry for a path: ['table','steps','0','driverPulley','value'] → names it may use. */
function namesFor(path: string[]): string[] {
  const parts = path.filter((p) => p !== 'value');
  const dotted = parts.map((p, i) => (/^\d+$/.test(p) ? `[${p}]` : `${i === 0 ? '' : '.'}${p}`)).join('').replace(/\.\[/g, '[');
  const names = new Set<string>([dotted]);
  for (let i = 1; i < parts.length; i++) {
    names.add(parts.slice(i).map((p, j) => (/^\d+$/.test(p) ? `[${p}]` : `${j === 0 ? '' : '.'}${p}`)).join(''));
  }
  return [...names];
}

function allFinite(x: unknown): boolean {
  if (typeof x === 'number') return Number.isFinite(x);
  if (x === null || typeof x !== 'object') return true;
  return Object.values(x as Record<string, unknown>).every(allFinite);
}

const anyValue = fc.oneof(
  fc.double(),
  fc.constantFrom(Number.NaN, Number.POSITIVE_INFINITY, Number.NEGATIVE_INFINITY, 1e308, -1e308, 5e-324, 0, -0, 1e12),
  fc.string({ maxLength: 8 }),
  fc.constantFrom(null, undefined, '1,200', '0x4B0', true),
);

describe('every calculator, fed random inputs', () => {
  test('when the registry is listed, then every calculator has a sample here and each sample gives finite figures', () => {
    assert.deepEqual(Object.keys(SAMPLES).sort(), Object.keys(mathsFunctions).sort());
    for (const [name, input] of Object.entries(SAMPLES)) {
      const result = callMathsFunction(name, input);
      assert.ok(result !== undefined && allFinite(result), `${name} gives finite figures`);
    }
  });

  for (const name of Object.keys(SAMPLES) as MathsFunctionName[]) {
    const sample = SAMPLES[name];
    const paths = numberPaths(sample);
    test(`when any one number of ${name} is replaced by a random number or string, then the result is all finite or the refusal names that input`, () => {
      fc.assert(
        fc.property(fc.constantFrom(...paths), anyValue, (path, value) => {
          const input = withAt(sample, path, value);
          let result: unknown;
          try {
            result = callMathsFunction(name, input);
          } catch (err) {
            if (!(err instanceof MathsInputError)) throw err;
            assert.notEqual(err.argument, 'quantity');
            // A refusal names the input that was changed, or the calculation's own result (never a silent number).
            const names = namesFor(path);
            const named = names.includes(err.argument) || err.argument === 'result' || names.some((n) => err.argument.endsWith(n));
            // Cross-checks between inputs (gap vs square height, centres vs pulleys) may name the other party.
            const related = err.reason === 'out-of-range';
            return named || related;
          }
          return allFinite(result);
        }),
        { numRuns: 150 },
      );
    });
  }
});

describe('the one strict reader, fed random text', () => {
  const PLAIN = /^[+-]?(?:\d+\.?\d*|\.\d+)$/;

  test('when any text is read, then it is a plain decimal read exactly, blank, or refused with a message naming the field', () => {
    fc.assert(
      fc.property(fc.oneof(fc.string({ maxLength: 16 }), fc.double().map(String), fc.stringMatching(/^[+-]?\d{0,6}[.,]?\d{0,4}(e\d)?$/)), (text) => {
        const r = parseFigure(text, 'Gap');
        const t = text.trim().replace(/^\u2212/, '-');
        if (t === '') return r.ok && r.value === null;
        if (PLAIN.test(t) && Number.isFinite(Number(t))) return r.ok && Object.is(r.value, Number(t) === 0 ? 0 : Number(t));
        return !r.ok && r.message.startsWith('Gap: ');
      }),
      { numRuns: 2000 },
    );
  });

  test('when a figure is written with fixed decimals, then it reads back as that number (round trip)', () => {
    fc.assert(
      fc.property(fc.double({ min: -1e6, max: 1e6, noNaN: true }), fc.integer({ min: 0, max: 6 }), (n, d) => {
        const text = n.toFixed(d);
        const r = parseFigure(text, 'Gap');
        return r.ok && r.value === (Number(text) === 0 ? 0 : Number(text));
      }),
    );
  });

  test('when a reading is checked for its unit, then finite workshop sizes pass and non-finite or absurd ones are refused by name', () => {
    fc.assert(
      fc.property(fc.double(), fc.constantFrom('mm', 'kgf', 's', 'cm^2', '%'), (n, unit) => {
        const problem = readingProblem(n, unit, 'Reading');
        if (!Number.isFinite(n)) return problem !== null && problem.startsWith('Reading: ');
        if (Math.abs(n) <= 1000 && (n === 0 || Math.abs(n) >= 0.01)) return problem === null;
        if (Math.abs(n) > 1e12) return problem !== null && problem.startsWith('Reading: ');
        return true;
      }),
      { numRuns: 1000 },
    );
  });
});
