import { describe, test } from 'node:test';
import assert from 'node:assert/strict';
import { evaluateStep } from '../../procedures/engine';
import { checkStepReferences } from '../../procedures/check-references';
import { procedureSchema, type Limits, type Procedure, type Step } from '../../procedures/schema';
import { demoSpecs, inputsUsed, packFiles, packProcedures, walkTemplate } from './helpers';

const files = packFiles();
const procedures = packProcedures();

/** Every procedure × step, for the per-step rules. */
const allSteps: { p: Procedure; s: Step }[] = procedures.flatMap((p) => p.steps.map((s) => ({ p, s })));
const where = (p: Procedure, s: Step) => `${p.key} v${p.version} / ${s.id}`;

function literalBounds(limits: Limits | undefined): boolean {
  return !!limits && (typeof limits.min === 'number' || typeof limits.max === 'number');
}

describe('bandsaw pack: files and keys', () => {
  test('when the pack folder is read, then it holds at least the nine bandsaw procedures the design lists', () => {
    const keys = new Set(procedures.map((p) => p.key));
    for (const key of [
      'isolation-lockout',
      'blade-change',
      'blade-tracking',
      'blade-tension',
      'blade-squareness',
      'guide-bearings',
      'bow-descent',
      'speed-change',
      'blade-break-in',
    ]) {
      assert.ok(keys.has(key), `missing procedure "${key}"`);
    }
  });

  for (const f of files) {
    test(`when ${f.folder}/${f.file} is parsed, then it is a valid procedure whose folder is its key and whose file name is its version`, () => {
      const parsed = procedureSchema.safeParse(f.raw);
      assert.ok(parsed.success, parsed.success ? '' : JSON.stringify(parsed.error.issues, null, 2));
      const p = parsed.data;
      assert.equal(p.key, f.folder);
      assert.equal(f.file, `v${p.version}.json`);
      assert.equal(p.machineKind, 'horizontal_bandsaw');
    });
  }

  test('when every file is read, then no key and version appear twice and each key lives in exactly one folder', () => {
    const seen = new Set<string>();
    for (const f of files) {
      const p = procedureSchema.parse(f.raw);
      const id = `${p.key}@${p.version}`;
      assert.ok(!seen.has(id), `${id} appears twice`);
      seen.add(id);
      assert.equal(p.key, f.folder);
    }
  });
});

describe('bandsaw pack: references resolve', () => {
  // The same checks the server runs when a draft is saved, here also against the demo saws' specifications.
  const specs = demoSpecs.map(({ tag, spec }) => ({ name: tag, spec }));
  for (const { p, s } of allSteps) {
    test(`when ${where(p, s)} is checked, then every function, $input, $computed and $spec it names exists`, () => {
      const problems = checkStepReferences(s, [s.id], specs).map((x) => `${x.path.join('/')}: ${x.message}`);
      assert.deepEqual(problems, []);
    });
  }
});

describe('bandsaw pack: empty steps evaluate', () => {
  for (const { p, s } of allSteps) {
    test(`when ${where(p, s)} is evaluated with nothing entered, then it does not throw and every computed value that needs an entry is pending`, () => {
      for (const { tag, spec } of demoSpecs) {
        const e = evaluateStep(s, {}, spec);
        const pendingIds = new Set<string>();
        for (const c of s.computed) {
          let needsEntry = inputsUsed(c.args).length > 0;
          walkTemplate(c.args, (node) => {
            if ('$computed' in node && pendingIds.has(String(node['$computed']))) needsEntry = true;
          });
          const r = e.computed.find((x) => x.id === c.id);
          assert.ok(r, `${tag}: no result for ${c.id}`);
          if (needsEntry) {
            pendingIds.add(c.id);
            assert.equal(r.value, null, `${tag}: ${c.id} should be pending`);
            assert.equal(r.outcome, 'none', `${tag}: ${c.id} should not be judged yet`);
            assert.equal(r.error, undefined, `${tag}: ${c.id} should have no error`);
          } else {
            assert.notEqual(r.value, null, `${tag}: ${c.id} uses only the spec, so it should have a value`);
          }
        }
        const required = s.inputs.filter((i) => i.required).map((i) => i.id);
        assert.deepEqual(e.missing, required, `${tag}: missing should list the required inputs`);
        assert.equal(e.complete, required.length === 0);
        assert.equal(e.outOfLimits, false, `${tag}: nothing entered, nothing out of limits`);
      }
    });
  }
});

describe('bandsaw pack: safety content', () => {
  for (const p of procedures) {
    test(`when ${p.key} is read, then it states its use and scope, defers to local codes, the maker and the competent person, and lists hazards and PPE`, () => {
      assert.ok(p.intendedUse.length > 40);
      assert.match(p.scope, /local codes/i);
      assert.match(p.scope, /maker's instructions/i);
      assert.match(p.scope, /competent person/i);
      assert.ok(p.hazards.length >= 2);
      const codes = p.ppe.map((c) => c.code);
      assert.ok(codes.includes('M004'), 'eye protection (M004)');
      const gloves = p.ppe.find((c) => c.code === 'M009');
      assert.ok(gloves, 'gloves (M009)');
      assert.match(gloves.text, /isolated/);
      assert.match(gloves.text, /never at a running blade/i);
    });

    test(`when ${p.key} is followed step by step, then every step done while the saw is isolated says so in an M021 caution`, () => {
      let isolated = false;
      for (const s of p.steps) {
        if (s.kind === 'isolation') isolated = true;
        if (s.powered) isolated = false;
        if (isolated) {
          assert.ok(
            s.cautions.some((c) => c.code === 'M021' && /isolat|lock/i.test(c.text)),
            `${s.id} is done with the saw isolated but has no M021 caution saying so`,
          );
        }
      }
    });
  }

  for (const { p, s } of allSteps.filter(({ s }) => s.powered)) {
    test(`when ${where(p, s)} runs with power on, then it warns to keep hands clear (W022), forbids gloves and loose clothing, and is not an isolation step`, () => {
      assert.notEqual(s.kind, 'isolation');
      assert.ok(s.cautions.some((c) => c.code === 'W022' && /hands clear/i.test(c.text)), 'W022 hands-clear caution');
      assert.ok(s.cautions.some((c) => c.level === 'prohibition' && /gloves/i.test(c.text) && /loose/i.test(c.text)), 'gloves and loose clothing prohibition');
      assert.match(s.instruction, /competent person/i);
    });
  }

  for (const { p, s } of allSteps.filter(({ s }) => s.kind === 'reading')) {
    test(`when ${where(p, s)} is a reading, then it has a numeric input with a unit`, () => {
      const numbers = s.inputs.filter((i) => i.type === 'number');
      assert.ok(numbers.length > 0);
      for (const n of numbers) assert.ok(n.type === 'number' && n.unit.length > 0);
    });
  }

  for (const { p, s } of allSteps.filter(({ s }) => s.kind === 'isolation')) {
    test(`when ${where(p, s)} isolates the saw, then it records how (isolator, plug or other), the lock or tag, and proof that start does nothing`, () => {
      const method = s.inputs.find((i) => i.id === 'method');
      assert.ok(method && method.type === 'choice');
      assert.deepEqual(method.options.map((o) => o.value), ['isolator', 'plug', 'other']);
      const lock = s.inputs.find((i) => i.id === 'lock-id');
      assert.ok(lock && lock.type === 'text');
      // The full lock-out procedure proves the saw dead in its own step; the short isolation steps do it in place.
      const proof = s.inputs.find((i) => i.id === 'no-start') ?? p.steps.flatMap((x) => x.inputs).find((i) => i.id === 'no-start');
      assert.ok(proof && proof.type === 'yesno' && proof.expected === true);
      assert.equal(proof.label, 'Pressed start and nothing moved');
      assert.ok(s.cautions.some((c) => c.code === 'M021'));
    });
  }

  test('when the lock-out procedure is read, then it records who holds the key and needs a photo of the lock and tag', () => {
    const p = procedures.find((x) => x.key === 'isolation-lockout');
    assert.ok(p);
    const inputs = p.steps.flatMap((s) => s.inputs);
    const keyHolder = inputs.find((i) => i.id === 'key-holder');
    assert.ok(keyHolder && keyHolder.type === 'text' && keyHolder.required);
    const photo = inputs.find((i) => i.type === 'photo');
    assert.ok(photo && photo.type === 'photo' && photo.min >= 1 && photo.required);
  });

  for (const { p, s } of allSteps) {
    const literal = s.inputs.some((i) => i.type === 'number' && literalBounds(i.limits)) || s.computed.some((c) => literalBounds(c.limits));
    if (!literal) continue;
    test(`when ${where(p, s)} judges against a fixed figure, then the step says where the figure comes from (common practice or a published source)`, () => {
      const words = [s.instruction, ...s.inputs.map((i) => i.help ?? '')].join(' ');
      assert.match(words, /common[- ]practice|published/i);
    });
  }

  const tradeValues: [string, string, string, RegExp][] = [
    ['blade-tension', 'tension', 'gauge-reading', /700–900 kgf/],
    ['guide-bearings', 'back-rollers', 'fixed-guide', /0\.08–0\.12 mm/],
    ['guide-bearings', 'back-rollers', 'movable-guide', /0\.08–0\.12 mm/],
    ['speed-change', 'belt-tension', 'deflection', /about 10 mm/],
    ['blade-squareness', 'measure', 'gap', /0\.10 mm per 100 mm/],
    ['bow-descent', 'time-drop', 'time', /1\.0–3\.0 mm\/s/],
  ];
  for (const [key, stepId, inputId, figure] of tradeValues) {
    test(`when ${key} / ${stepId} uses the trade value ${figure.source}, then its help text marks it common practice`, () => {
      const s = procedures.find((x) => x.key === key)?.steps.find((x) => x.id === stepId);
      const help = s?.inputs.find((i) => i.id === inputId)?.help ?? '';
      assert.match(help, /common[- ]practice/i);
      assert.match(help, figure);
    });
  }

  test('when the glove caution is read on steps that handle the blade, then it says gloves are for the isolated saw only, never a running blade', () => {
    const gloveCautions = allSteps.flatMap(({ s }) => s.cautions).filter((c) => c.code === 'M009');
    assert.ok(gloveCautions.length >= 5);
    for (const c of gloveCautions) {
      assert.match(c.text, /isolated/);
      assert.match(c.text, /running blade/);
    }
  });
});
