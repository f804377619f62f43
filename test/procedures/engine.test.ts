import { describe, test } from 'node:test';
import assert from 'node:assert/strict';
import { evaluateStep, ProcedureDefinitionError, resolveLimits, withinLimits, type MachineSpec } from '../../procedures/engine';
import { stepSchema, type Step } from '../../procedures/schema';

// Unit tests of the procedure engine on small steps written here, independent of any content pack.

const KGF = 9.80665; // N per kgf, exact (NIST SP 811, appendix B.8, as quoted in CHECKS.md)

const spec: MachineSpec = {
  wheelDiameterMm: 300,
  centreDistanceMm: 1000,
  bladeLengthMm: 2942,
  tensionRangeKgf: { min: 700, max: 900 },
  guideClearanceMm: { min: 0.08, max: 0.12 },
  motorRpm: 60,
  speedSteps: [
    { label: 'slow', driverMm: 50, drivenMm: 100 },
    { label: 'fast', driverMm: 100, drivenMm: 100 },
  ],
  model: 'not a list',
};

function makeStep(partial: Record<string, unknown>): Step {
  return stepSchema.parse({ id: 'probe', title: 'Probe', kind: 'reading', instruction: 'Test step.', ...partial });
}

const squareStep = makeStep({
  inputs: [
    { id: 'gap', type: 'number', label: 'Gap', unit: 'mm' },
    { id: 'height', type: 'number', label: 'Square height', unit: 'mm' },
  ],
  computed: [
    { id: 'per-100', label: 'Per 100 mm', fn: 'squarenessError', args: { gap: { $input: 'gap' }, squareHeight: { $input: 'height' } }, output: 'errorPer100mm', unit: 'mm', limits: { max: 0.1 } },
    { id: 'in-um', label: 'Per 100 mm in µm', fn: 'squarenessError', args: { gap: { $input: 'gap' }, squareHeight: { $input: 'height' } }, output: 'errorPer100mm', unit: 'um', decimals: 0 },
  ],
});

describe('engine: limits from the machine specification', () => {
  const newtonStep = makeStep({
    inputs: [{ id: 'pull', type: 'number', label: 'Pull', unit: 'N', decimals: 0, limits: { min: { $spec: 'tensionRangeKgf.min', unit: 'kgf' }, max: { $spec: 'tensionRangeKgf.max', unit: 'kgf' } } }],
  });

  test('when a limit is given in kgf and the input is in N, then the limits are converted to N (700–900 kgf = 6864.7–8826.0 N, 1 kgf = 9.80665 N)', () => {
    const r = evaluateStep(newtonStep, { pull: 8000 }, spec).inputs[0]!;
    assert.equal(r.limits?.unit, 'N');
    assert.ok(Math.abs(r.limits!.min! - 700 * KGF) < 1e-9);
    assert.ok(Math.abs(r.limits!.max! - 900 * KGF) < 1e-9);
    assert.equal(r.outcome, 'pass');
  });

  test('when 6800 N is entered against 700 kgf minimum, then it fails with a message naming the range; 9000 N fails above it', () => {
    const low = evaluateStep(newtonStep, { pull: 6800 }, spec);
    assert.equal(low.inputs[0]!.outcome, 'fail');
    assert.match(low.inputs[0]!.message ?? '', /^Outside 6864\.6\d*–8825\.9\d* N\.$/);
    assert.equal(low.outOfLimits, true);
    assert.equal(evaluateStep(newtonStep, { pull: 9000 }, spec).inputs[0]!.outcome, 'fail');
  });

  test('when a clearance limit is in mm and the input is in inches, then 0.004 in (0.1016 mm) passes and 0.006 in (0.1524 mm) fails', () => {
    const inchStep = makeStep({
      inputs: [{ id: 'gap', type: 'number', label: 'Gap', unit: 'in', decimals: 4, limits: { min: { $spec: 'guideClearanceMm.min', unit: 'mm' }, max: { $spec: 'guideClearanceMm.max', unit: 'mm' } } }],
    });
    const ok = evaluateStep(inchStep, { gap: 0.004 }, spec).inputs[0]!;
    assert.ok(Math.abs(ok.limits!.max! - 0.12 / 25.4) < 1e-12);
    assert.equal(ok.outcome, 'pass');
    assert.equal(evaluateStep(inchStep, { gap: 0.006 }, spec).inputs[0]!.outcome, 'fail');
  });

  test('when a computed value has spec limits in mm and is shown in inches, then the limits are converted to inches too', () => {
    const lengthStep = makeStep({
      computed: [
        {
          id: 'length',
          label: 'Blade length',
          fn: 'bladeLength',
          args: { wheelDiameter: { $spec: 'wheelDiameterMm', unit: 'mm' }, centreDistance: { $spec: 'centreDistanceMm', unit: 'mm' } },
          unit: 'in',
          decimals: 0,
          limits: { min: { $spec: 'bladeLengthMm', unit: 'mm' }, max: { $spec: 'bladeLengthMm', unit: 'mm' } },
        },
      ],
    });
    const c = evaluateStep(lengthStep, {}, spec).computed[0]!;
    assert.equal(c.unit, 'in');
    assert.ok(Math.abs(c.limits!.min! - 2942 / 25.4) < 1e-9);
    assert.ok(Math.abs((c.value as number) - (Math.PI * 300 + 2000) / 25.4) < 1e-9);
    // 2,942.48 mm worked out (US Navy training manual: L = π·D + 2·C) is past a 2,942 mm limit on the raw value.
    assert.equal(c.outcome, 'fail');
    const exact = evaluateStep(lengthStep, {}, { ...spec, bladeLengthMm: Math.PI * 300 + 2000 }).computed[0]!;
    assert.equal(exact.outcome, 'pass');
  });

  test('when limits are plain numbers, then they are taken in the display unit as written', () => {
    assert.deepEqual(resolveLimits({ min: 1, max: 3 }, spec, 'mm/s'), { min: 1, max: 3, unit: 'mm/s' });
  });

  test('when a reading is past its limit by less than its shown rounding, then it fails all the same (limits are judged on the raw value)', () => {
    const limits = { max: 0.12, unit: 'mm' };
    assert.equal(withinLimits(0.12, limits), true);
    assert.equal(withinLimits(0.124, limits), false);
    assert.equal(withinLimits(0.1201, limits), false);
    assert.equal(withinLimits(0.1199, limits), true);
    assert.equal(withinLimits(0.119, { min: 0.12 }), false);
  });

  test('when 0.1 mm in inches comes back through a unit conversion, then float noise alone does not fail it', () => {
    const max = 0.1 / 25.4;
    assert.equal(withinLimits((0.1 / 25.4) * (1 + 1e-13), { max, unit: 'in' }), true);
  });
});

describe('engine: pending values while inputs are missing', () => {
  test('when no input has a value, then computed values are pending, the step is incomplete and nothing is out of limits', () => {
    const e = evaluateStep(squareStep, {}, spec);
    for (const c of e.computed) {
      assert.equal(c.value, null);
      assert.equal(c.display, '—');
      assert.equal(c.outcome, 'none');
    }
    assert.equal(e.complete, false);
    assert.deepEqual(e.missing, ['gap', 'height']);
    assert.equal(e.outOfLimits, false);
  });

  test('when only one of two inputs has a value, then the computed values stay pending and only the other is missing', () => {
    const e = evaluateStep(squareStep, { gap: 0.05 }, spec);
    assert.equal(e.computed[0]!.value, null);
    assert.deepEqual(e.missing, ['height']);
  });

  test('when a value is empty text, NaN or an empty list, then it counts as missing; false and 0 count as answers', () => {
    const s = makeStep({
      inputs: [
        { id: 'a', type: 'text', label: 'A' },
        { id: 'b', type: 'number', label: 'B', unit: 'mm' },
        { id: 'c', type: 'photo', label: 'C' },
        { id: 'd', type: 'yesno', label: 'D' },
        { id: 'e', type: 'number', label: 'E', unit: 'mm' },
      ],
    });
    const e = evaluateStep(s, { a: '', b: Number.NaN, c: [], d: false, e: 0 }, spec);
    assert.deepEqual(e.missing, ['a', 'b', 'c']);
  });

  test('when a computed value builds on a pending one, then it is pending too', () => {
    const s = makeStep({
      inputs: [
        { id: 'driver', type: 'number', label: 'Driver', unit: 'mm' },
        { id: 'driven', type: 'number', label: 'Driven', unit: 'mm' },
      ],
      computed: [
        { id: 'span', label: 'Span', fn: 'beltSpan', args: { driverPulley: { $input: 'driver' }, drivenPulley: { $input: 'driven' }, centreDistance: { $q: 600, unit: 'mm' } }, unit: 'mm' },
        { id: 'target', label: 'Target', fn: 'beltDeflectionTarget', args: { span: { $computed: 'span' } }, unit: 'mm' },
      ],
    });
    assert.equal(evaluateStep(s, { driver: 150 }, spec).computed[1]!.value, null);
    const done = evaluateStep(s, { driver: 150, driven: 300 }, spec);
    assert.ok(Math.abs((done.computed[1]!.value as number) - 9.30) < 0.005, 'CHECKS.md, V-belts worked example: 595.3 mm span → 9.30 mm');
  });

  test('when an optional input is empty, then it is judged "none" and not listed as missing', () => {
    const s = makeStep({ inputs: [{ id: 'note', type: 'text', label: 'Note', required: false }] });
    const e = evaluateStep(s, {}, spec);
    assert.equal(e.inputs[0]!.outcome, 'none');
    assert.equal(e.complete, true);
  });
});

describe('engine: computed values', () => {
  test('when 0.1 mm fits at the top of a 100 mm square, then 0.10 mm per 100 mm is shown in mm and as 100 µm, and passes its limit (CHECKS.md, Squareness: per-100-mm error = 100·g/h)', () => {
    const e = evaluateStep(squareStep, { gap: 0.1, height: 100 }, spec);
    assert.equal(e.computed[0]!.display, '0.10 mm');
    assert.equal(e.computed[0]!.outcome, 'pass');
    assert.equal(e.computed[1]!.display, '100 um');
    assert.equal(e.computed[1]!.outcome, 'none');
  });

  test('when 0.1047 mm fits at the top of a 100 mm square, then it fails the 0.10 limit and shows "0.105 mm", never "0.10 mm" (CHECKS.md, Squareness: per-100-mm error = 100·g/h)', () => {
    const e = evaluateStep(squareStep, { gap: 0.1047, height: 100 }, spec);
    assert.equal(e.computed[0]!.outcome, 'fail');
    assert.equal(e.computed[0]!.display, '0.105 mm');
    assert.equal(e.outOfLimits, true);
  });

  test('when the error is over the limit by a hair (0.10004 mm per 100 mm), then it is shown with enough decimals to differ: "0.10004 mm" (CHECKS.md, Squareness)', () => {
    const e = evaluateStep(squareStep, { gap: 0.10004, height: 100 }, spec);
    assert.equal(e.computed[0]!.outcome, 'fail');
    assert.equal(e.computed[0]!.display, '0.10004 mm');
  });

  test('when a reading is past its limit by less than its decimals show, then the reading fails (0.1201 mm against 0.08–0.12 mm)', () => {
    const s = makeStep({ inputs: [{ id: 'c', type: 'number', label: 'Clearance', unit: 'mm', decimals: 2, limits: { min: { $spec: 'guideClearanceMm.min', unit: 'mm' }, max: { $spec: 'guideClearanceMm.max', unit: 'mm' } } }] });
    assert.equal(evaluateStep(s, { c: 0.1201 }, spec).inputs[0]!.outcome, 'fail');
    assert.equal(evaluateStep(s, { c: 0.12 }, spec).inputs[0]!.outcome, 'pass');
  });

  test('when a reading is 1e308 mm, then the maths refuses it by the input it fills, never an Infinity result', () => {
    const e = evaluateStep(squareStep, { gap: 0.1, height: 1e308 }, spec);
    assert.equal(e.computed[0]!.value, null);
    assert.equal(e.computed[0]!.error?.argument, 'squareHeight');
    assert.match(e.computed[0]!.display, /^—$/);
  });

  test('when the gap is larger than the square, then the maths error becomes a computed error naming "gap", and the step is out of limits', () => {
    const e = evaluateStep(squareStep, { gap: 120, height: 100 }, spec);
    const c = e.computed[0]!;
    assert.equal(c.value, null);
    assert.equal(c.outcome, 'fail');
    assert.equal(c.error?.argument, 'gap');
    assert.match(c.error?.message ?? '', /gap/);
    assert.equal(e.outOfLimits, true);
  });

  test('when a negative height is entered, then the computed error names "squareHeight"', () => {
    assert.equal(evaluateStep(squareStep, { gap: 0.1, height: -100 }, spec).computed[0]!.error?.argument, 'squareHeight');
  });

  test('when a list is built with $each over the spec and a nested output is selected, then the step label and its speed come out (CHECKS.md, Surface speed: v = π·D·n, 300 mm at 60 rpm → 56.55 m/min)', () => {
    const table = {
      motorSpeed: { $spec: 'motorRpm', unit: 'rpm' },
      wheelDiameter: { $spec: 'wheelDiameterMm', unit: 'mm' },
      steps: { $each: 'speedSteps', as: { label: { $item: 'label' }, driverPulley: { $item: 'driverMm', unit: 'mm' }, drivenPulley: { $item: 'drivenMm', unit: 'mm' } } },
    };
    const s = makeStep({
      computed: [
        { id: 'label', label: 'Step', fn: 'nearestSpeedStep', args: { table, recommended: { $q: 50, unit: 'm/min' } }, output: 'step.label' },
        { id: 'speed', label: 'Speed', fn: 'nearestSpeedStep', args: { table, recommended: { $q: 50, unit: 'm/min' } }, output: 'step.surfaceSpeed', unit: 'm/min' },
      ],
    });
    const e = evaluateStep(s, {}, spec);
    assert.equal(e.computed[0]!.value, 'fast');
    assert.ok(Math.abs((e.computed[1]!.value as number) - 56.549) < 0.001);
  });

  test('when a text result is listed as acceptable, then it passes; otherwise it fails; with no list it is not judged', () => {
    const judge = (acceptable?: string[]) =>
      makeStep({
        inputs: [{ id: 'stress', type: 'number', label: 'Stress', unit: 'MPa' }],
        computed: [{ id: 'v', label: 'Verdict', fn: 'judgeBladeStress', args: { stress: { $input: 'stress' }, blade: 'bi-metal' }, output: 'verdict', ...(acceptable ? { acceptable } : {}) }],
      });
    // Trade articles (medium confidence, CHECKS.md): bi-metal 172–207 MPa; never past 241 MPa.
    assert.equal(evaluateStep(judge(['within']), { stress: 190 }, spec).computed[0]!.outcome, 'pass');
    assert.equal(evaluateStep(judge(['within']), { stress: 161 }, spec).computed[0]!.outcome, 'fail');
    const open = evaluateStep(judge(), { stress: 161 }, spec).computed[0]!;
    assert.equal(open.value, 'low');
    assert.equal(open.outcome, 'none');
  });

  test('when the output path finds nothing and the field has limits, then it shows "No result" and fails', () => {
    const s = makeStep({
      computed: [{ id: 'x', label: 'X', fn: 'bladeLength', args: { wheelDiameter: { $q: 300, unit: 'mm' }, centreDistance: { $q: 1000, unit: 'mm' } }, output: 'nothing.here', limits: { max: 1 } }],
    });
    const c = evaluateStep(s, {}, spec).computed[0]!;
    assert.equal(c.display, 'No result');
    assert.equal(c.outcome, 'fail');
  });
});

describe('engine: bad references are the author’s mistake', () => {
  const bad: [string, Record<string, unknown>][] = [
    ['an unknown maths function', { computed: [{ id: 'x', label: 'X', fn: 'noSuchFunction', args: {} }] }],
    ['an $input that is not in the step', { computed: [{ id: 'x', label: 'X', fn: 'descentRate', args: { distance: { $input: 'nowhere' }, time: { $q: 1, unit: 's' } } }] }],
    ['a $spec path the machine does not have', { computed: [{ id: 'x', label: 'X', fn: 'bladeLength', args: { wheelDiameter: { $spec: 'noSuchFigure', unit: 'mm' }, centreDistance: { $q: 1, unit: 'm' } } }] }],
    ['a $computed that does not exist', { computed: [{ id: 'x', label: 'X', fn: 'beltDeflectionTarget', args: { span: { $computed: 'ghost' } } }] }],
    [
      'a $computed that comes later in the step',
      {
        computed: [
          { id: 'first', label: 'First', fn: 'beltDeflectionTarget', args: { span: { $computed: 'second' } } },
          { id: 'second', label: 'Second', fn: 'bladeLength', args: { wheelDiameter: { $q: 300, unit: 'mm' }, centreDistance: { $q: 1000, unit: 'mm' } } },
        ],
      },
    ],
    ['an $each over something that is not a list', { computed: [{ id: 'x', label: 'X', fn: 'totalCutArea', args: { cuts: { $each: 'model', as: {} } } }] }],
    ['an $item field the list items lack', { computed: [{ id: 'x', label: 'X', fn: 'totalCutArea', args: { cuts: { $each: 'speedSteps', as: { section: { $item: 'noSuchField' } } } } }] }],
    ['a spec limit the machine does not have', { inputs: [{ id: 'n', type: 'number', label: 'N', unit: 'mm', limits: { max: { $spec: 'missing.figure', unit: 'mm' } } }] }],
  ];
  for (const [what, partial] of bad) {
    test(`when a step has ${what}, then evaluating it throws ProcedureDefinitionError`, () => {
      const s = makeStep(partial);
      const values = { n: 1 };
      assert.throws(() => evaluateStep(s, values, spec), ProcedureDefinitionError);
    });
  }
});

describe('engine: choices, yes/no and photos', () => {
  const s = makeStep({
    kind: 'check',
    inputs: [
      { id: 'wear', type: 'choice', label: 'Wear', options: [{ value: 'even', label: 'Even' }, { value: 'groove', label: 'Groove' }], pass: ['even'] },
      { id: 'method', type: 'choice', label: 'Method', options: [{ value: 'gauge', label: 'Gauge' }, { value: 'tone', label: 'Tone' }] },
      { id: 'clear', type: 'yesno', label: 'Clear', expected: true },
      { id: 'snag', type: 'yesno', label: 'Snag', expected: false },
      { id: 'seen', type: 'yesno', label: 'Seen' },
      { id: 'photo', type: 'photo', label: 'Photo', min: 2, max: 3 },
    ],
  });
  const outcome = (values: Record<string, unknown>, id: string) =>
    evaluateStep(s, values as never, spec).inputs.find((i) => i.id === id)!.outcome;

  test('when a choice is in its pass list, then it passes; outside it, it fails; with no pass list any choice is "none"', () => {
    assert.equal(outcome({ wear: 'even' }, 'wear'), 'pass');
    assert.equal(outcome({ wear: 'groove' }, 'wear'), 'fail');
    assert.equal(outcome({ method: 'tone' }, 'method'), 'none');
  });

  test('when a yes/no matches its expected answer, then it passes; the other answer fails; with none expected it is "none"', () => {
    assert.equal(outcome({ clear: true }, 'clear'), 'pass');
    assert.equal(outcome({ clear: false }, 'clear'), 'fail');
    assert.equal(outcome({ snag: false }, 'snag'), 'pass');
    assert.equal(outcome({ snag: true }, 'snag'), 'fail');
    assert.equal(outcome({ seen: false }, 'seen'), 'none');
  });

  test('when fewer photos than the minimum are taken, then the photo input is missing with a message; enough photos complete it', () => {
    const few = evaluateStep(s, { photo: ['p1'] }, spec).inputs.find((i) => i.id === 'photo')!;
    assert.equal(few.outcome, 'missing');
    assert.match(few.message ?? '', /at least 2 photos/);
    assert.equal(outcome({ photo: ['p1', 'p2'] }, 'photo'), 'none');
  });

  test('when every input is answered and one fails, then the step is complete but out of limits', () => {
    const e = evaluateStep(s, { wear: 'groove', method: 'gauge', clear: true, snag: false, seen: true, photo: ['p1', 'p2'] }, spec);
    assert.equal(e.complete, true);
    assert.equal(e.outOfLimits, true);
  });
});

describe('engine: conditional inputs and warnings', () => {
  const step = stepSchema.parse({
    id: 'tension',
    title: 'Tension',
    kind: 'reading',
    instruction: 'Tension the blade.',
    inputs: [
      { id: 'method', type: 'choice', label: 'Method', options: [{ value: 'gauge', label: 'Gauge' }, { value: 'tone', label: 'Tone' }] },
      { id: 'reading', type: 'number', label: 'Reading', unit: 'kgf', required: false, requiredWhen: { input: 'method', in: ['gauge'] } },
      { id: 'cuts', type: 'number', label: 'Cuts', unit: 'mm', required: false },
    ],
    computed: [
      { id: 'verdict', label: 'Verdict', fn: 'judgeBladeStress', args: { stress: { $q: 150, unit: 'MPa' }, blade: 'bi-metal' }, output: 'verdict', acceptable: ['within'], advisory: ['low', 'high'] },
    ],
  });

  test('when the method chosen needs a reading and none is given, then the reading is missing; with the other method it is not', () => {
    assert.deepEqual(evaluateStep(step, { method: 'gauge' }, {}).missing, ['reading']);
    assert.deepEqual(evaluateStep(step, { method: 'tone' }, {}).missing, []);
  });

  test('when a verdict is advisory, then it is a warning that does not put the step out of limits (150 MPa is below the usual bi-metal 172–207 MPa, CHECKS.md Blade tension)', () => {
    const e = evaluateStep(step, { method: 'tone' }, {});
    assert.equal(e.computed[0]!.value, 'low');
    assert.equal(e.computed[0]!.outcome, 'warn');
    assert.equal(e.outOfLimits, false);
  });
});
