import assert from 'node:assert/strict';
import { describe, test } from 'node:test';
import { diffProcedures, sameContent } from '../../procedures/diff';
import { procedureSchema, type Procedure, type ProcedureSource } from '../../procedures/schema';
import { procedure as packProcedure } from './helpers';

function base(): ProcedureSource {
  return {
    key: 'diff-fixture',
    version: 1,
    title: 'Checking the guides',
    intendedUse: 'Tests of the difference between versions.',
    scope: 'Tests only.',
    machineKind: 'horizontal_bandsaw',
    hazards: ['Sharp blade'],
    ppe: [{ level: 'mandatory', code: 'M004', text: 'Eye protection.' }],
    steps: [
      { id: 'isolate', title: 'Isolate the saw', kind: 'isolation', instruction: 'Isolate it.', cautions: [{ level: 'mandatory', code: 'M021', text: 'Lock off first.' }], inputs: [{ id: 'lock', type: 'text', label: 'Lock number' }] },
      {
        id: 'gap',
        title: 'Measure the guide gap',
        kind: 'reading',
        instruction: 'Slide a feeler between roller and blade.',
        inputs: [
          { id: 'fixed', type: 'number', label: 'Fixed guide gap', unit: 'mm', limits: { min: 0.08, max: 0.12 } },
          { id: 'movable', type: 'number', label: 'Movable guide gap', unit: 'mm', limits: { min: 0.08, max: 0.12 } },
        ],
      },
      { id: 'look', title: 'Look at the rollers', kind: 'check', instruction: 'Look for flats.', inputs: [{ id: 'ok', type: 'yesno', label: 'Rollers turn freely', expected: true }] },
      { id: 'photo', title: 'Photograph the guides', kind: 'photo', instruction: 'Take a photo.', inputs: [{ id: 'shot', type: 'photo', label: 'Guide photo' }] },
    ],
  };
}

const parse = (p: ProcedureSource): Procedure => procedureSchema.parse(p);
const next = (change: (p: ProcedureSource & { steps: NonNullable<ProcedureSource['steps']> }) => void): Procedure => {
  const p = structuredClone(base()) as ProcedureSource & { steps: NonNullable<ProcedureSource['steps']> };
  p.version = 2;
  change(p);
  return parse(p);
};

describe('procedure differences', () => {
  test('when only the version number differs, then the versions are the same and every step is unchanged', () => {
    const d = diffProcedures(parse(base()), next(() => undefined));
    assert.equal(d.same, true);
    assert.deepEqual(d.fields, []);
    assert.deepEqual(d.steps.map((s) => s.change), ['unchanged', 'unchanged', 'unchanged', 'unchanged']);
    assert.deepEqual(d.from, { key: 'diff-fixture', version: 1 });
    assert.deepEqual(d.to, { key: 'diff-fixture', version: 2 });
  });

  test('when a step is added and another removed, then each is placed where it belongs and counted', () => {
    const d = diffProcedures(
      parse(base()),
      next((p) => {
        p.steps.splice(2, 1); // remove "look"
        p.steps.splice(1, 0, { id: 'clean', title: 'Clean the guides', kind: 'instruction', instruction: 'Brush the swarf off.' });
      }),
    );
    assert.deepEqual(
      d.steps.map((s) => [s.id, s.change, s.index, s.previousIndex]),
      [
        ['isolate', 'unchanged', 0, 0],
        ['clean', 'added', 1, null],
        ['gap', 'unchanged', 2, 1],
        ['look', 'removed', null, 2],
        ['photo', 'unchanged', 3, 3],
      ],
    );
    assert.deepEqual(d.summary, { added: 1, removed: 1, changed: 0, moved: 0, unchanged: 3 });
    assert.equal(d.same, false);
  });

  test('when one step is moved up, then only that step is marked moved, not the ones it jumped over', () => {
    const d = diffProcedures(
      parse(base()),
      next((p) => {
        const [photo] = p.steps.splice(3, 1);
        p.steps.splice(1, 0, photo!);
      }),
    );
    assert.deepEqual(d.steps.map((s) => [s.id, s.change]), [
      ['isolate', 'unchanged'],
      ['photo', 'moved'],
      ['gap', 'unchanged'],
      ['look', 'unchanged'],
    ]);
    assert.equal(d.steps[1]!.previousIndex, 3);
  });

  test('when a step’s title, instruction, power and cautions change, then the step names exactly those fields', () => {
    const d = diffProcedures(
      parse(base()),
      next((p) => {
        const look = p.steps[2]!;
        look.title = 'Turn each roller by hand';
        look.instruction = 'Turn each roller and feel for roughness.';
        look.powered = true;
        look.cautions = [{ level: 'warning', code: 'W022', text: 'Keep hands clear of the blade.' }];
      }),
    );
    const look = d.steps.find((s) => s.id === 'look')!;
    assert.equal(look.change, 'changed');
    assert.deepEqual(look.fields, ['title', 'instruction', 'powered', 'cautions']);
    assert.equal(look.title, 'Turn each roller by hand');
    assert.deepEqual(look.cautionsAdded.map((c) => c.code), ['W022']);
    assert.deepEqual(look.cautionsRemoved, []);
    assert.equal(look.before?.title, 'Look at the rollers');
  });

  test('when a field’s limits change, a field is added and one removed, then the inputs list says which and what', () => {
    const d = diffProcedures(
      parse(base()),
      next((p) => {
        const gap = p.steps[1]!;
        const fixed = gap.inputs![0]!;
        if (fixed.type === 'number') fixed.limits = { min: 0.05, max: 0.1 };
        gap.inputs!.splice(1, 1);
        gap.inputs!.push({ id: 'feeler', type: 'text', label: 'Feeler leaves used' });
      }),
    );
    const gap = d.steps.find((s) => s.id === 'gap')!;
    assert.equal(gap.change, 'changed');
    assert.deepEqual(gap.fields, ['inputs']);
    assert.deepEqual(
      gap.inputs.map((i) => [i.id, i.change, i.fields]),
      [
        ['fixed', 'changed', ['limits']],
        ['feeler', 'added', []],
        ['movable', 'removed', []],
      ],
    );
  });

  test('when a worked-out value’s arguments change, then the step names "computed" and the value names "args"', () => {
    const tension = packProcedure('blade-tension');
    const changed = structuredClone(tension);
    changed.version = 2;
    const step = changed.steps.find((s) => s.computed.length > 0)!;
    step.computed[0]!.args = { ...step.computed[0]!.args, extra: 1 };
    const d = diffProcedures(tension, changed);
    const sd = d.steps.find((s) => s.id === step.id)!;
    assert.deepEqual(sd.fields, ['computed']);
    assert.deepEqual(sd.computed.map((c) => [c.id, c.change, c.fields]), [[step.computed[0]!.id, 'changed', ['args']]]);
    assert.equal(d.summary.changed, 1);
  });

  test('when the kind of a step changes and top-level fields change, then both are reported', () => {
    const d = diffProcedures(
      parse(base()),
      next((p) => {
        p.title = 'Setting the guides';
        p.hazards = ['Sharp blade', 'Pinch points at the guide arms'];
        p.steps[3]!.kind = 'check';
      }),
    );
    assert.deepEqual(d.fields, ['title', 'hazards']);
    const photo = d.steps.find((s) => s.id === 'photo')!;
    assert.deepEqual(photo.fields, ['kind']);
  });

  test('when the first steps are all removed, then they stay in their old order at the top', () => {
    const d = diffProcedures(
      parse(base()),
      next((p) => {
        p.steps.splice(0, 2);
      }),
    );
    assert.deepEqual(d.steps.map((s) => [s.id, s.change]), [
      ['isolate', 'removed'],
      ['gap', 'removed'],
      ['look', 'unchanged'],
      ['photo', 'unchanged'],
    ]);
  });

  test('when two objects hold the same content in a different key order, then they count as the same', () => {
    assert.equal(sameContent({ a: 1, b: [1, { c: 2, d: 3 }] }, { b: [1, { d: 3, c: 2 }], a: 1 }), true);
    assert.equal(sameContent({ a: 1, b: undefined }, { a: 1 }), true);
    assert.equal(sameContent([1, 2], [2, 1]), false);
  });
});
