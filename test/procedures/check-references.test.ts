import assert from 'node:assert/strict';
import { describe, test } from 'node:test';
import { checkReferences } from '../../procedures/check-references';
import { procedureSchema, type ProcedureSource } from '../../procedures/schema';
import { demoSpecs, packProcedures } from './helpers';

const specs = demoSpecs.map(({ tag, spec }) => ({ name: tag, spec }));

function withStep(step: NonNullable<ProcedureSource['steps']>[number]) {
  return procedureSchema.parse({
    key: 'refs-fixture',
    version: 1,
    title: 'References',
    intendedUse: 'Tests of reference checks.',
    scope: 'Tests only.',
    machineKind: 'horizontal_bandsaw',
    hazards: ['None'],
    steps: [step],
  });
}

const paths = (problems: { path: (string | number)[] }[]) => problems.map((p) => p.path.join('/'));

describe('reference checks', () => {
  test('when every procedure of the shipped pack is checked against the demo saws, then nothing is broken', () => {
    for (const p of packProcedures()) assert.deepEqual(checkReferences(p, specs), [], `${p.key} v${p.version}`);
  });

  test('when a worked-out value names an unknown maths function, a missing field and a later value, then each is pointed at', () => {
    const p = withStep({
      id: 'measure',
      title: 'Measure',
      kind: 'reading',
      instruction: 'Measure.',
      inputs: [{ id: 'gap', type: 'number', label: 'Gap', unit: 'mm' }],
      computed: [
        { id: 'first', label: 'First', fn: 'noSuchMaths', args: { gap: { $input: 'gapp' }, other: { $computed: 'second' } } },
        { id: 'second', label: 'Second', fn: 'squarenessError', args: { gap: { $input: 'gap' }, squareHeight: { $q: 100, unit: 'mm' } }, when: ['gap', 'height'] },
      ],
    });
    assert.deepEqual(paths(checkReferences(p)), [
      'steps/0/computed/0/fn',
      'steps/0/computed/0/args/gap/$input',
      'steps/0/computed/0/args/other/$computed',
      'steps/0/computed/1/when/1',
    ]);
  });

  test('when "needed when" and passing answers name answers that do not exist, then each is pointed at', () => {
    const p = withStep({
      id: 'method',
      title: 'Method',
      kind: 'check',
      instruction: 'Choose.',
      inputs: [
        { id: 'how', type: 'choice', label: 'How', options: [{ value: 'gauge', label: 'Gauge' }, { value: 'ear', label: 'By ear' }], pass: ['gauge', 'guess'] },
        { id: 'reading', type: 'number', label: 'Reading', unit: 'kgf', requiredWhen: { input: 'how', in: ['gauge', 'dial'] } },
        { id: 'note', type: 'text', label: 'Note', requiredWhen: { input: 'nothing', in: ['x'] } },
        { id: 'shots', type: 'photo', label: 'Photos', min: 3, max: 2 },
        { id: 'span', type: 'number', label: 'Span', unit: 'mm', limits: { min: 10, max: 5 } },
      ],
    });
    assert.deepEqual(paths(checkReferences(p)), [
      'steps/0/inputs/0/pass/1',
      'steps/0/inputs/1/requiredWhen/in/1',
      'steps/0/inputs/2/requiredWhen/input',
      'steps/0/inputs/3/max',
      'steps/0/inputs/4/limits/max',
    ]);
  });

  test('when specifications are given, then a $spec the saws lack is pointed at; without them it is not judged', () => {
    const p = withStep({
      id: 'tension',
      title: 'Tension',
      kind: 'reading',
      instruction: 'Read.',
      inputs: [{ id: 'reading', type: 'number', label: 'Reading', unit: 'kgf', limits: { min: { $spec: 'noSuchRange.min', unit: 'kgf' } } }],
      computed: [{ id: 'length', label: 'Length', fn: 'bladeLength', args: { wheelDiameter: { $spec: 'wheelDiameterMmm', unit: 'mm' }, centreDistance: { $q: 600, unit: 'mm' } } }],
    });
    assert.deepEqual(checkReferences(p), []);
    const found = paths(checkReferences(p, specs.slice(0, 1)));
    assert.deepEqual(found, ['steps/0/inputs/0/limits/min/$spec', 'steps/0/computed/0/args/wheelDiameter/$spec']);
  });

  test('when $item is used outside an $each, then it is pointed at', () => {
    const p = withStep({
      id: 'speed',
      title: 'Speed',
      kind: 'reading',
      instruction: 'Read.',
      computed: [{ id: 'v', label: 'Speed', fn: 'speedSteps', args: { table: { motorSpeed: { $item: 'rpm' } } } }],
    });
    assert.deepEqual(paths(checkReferences(p)), ['steps/0/computed/0/args/table/motorSpeed/$item']);
  });
});
