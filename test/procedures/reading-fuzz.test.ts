import { describe, test } from 'node:test';
import assert from 'node:assert/strict';
import fc from 'fast-check';
import { evaluateStep, withinLimits } from '../../procedures/engine';
import { parseFigure } from '../../procedures/maths';
import { bay2, packProcedures } from './helpers.ts';

// Every reading field of the shipped pack, fed random text through the one strict reader and then
// judged by the engine as the tablet and the server do: each computed figure is finite and its
// verdict agrees with its limits on the raw value, or it is refused with the input named.

const steps = packProcedures().flatMap((p) => p.steps.filter((s) => s.inputs.some((i) => i.type === 'number')).map((s) => ({ key: p.key, step: s })));

const typed = fc.oneof(
  fc.string({ maxLength: 10 }),
  fc.double().map(String),
  fc.double({ min: 0, max: 5000, noNaN: true }).map((n) => n.toFixed(3)),
  fc.constantFrom('1,200', '0x4B0', '1e3', '0.1047', '100', '0', '-0.05', '9'.repeat(320)),
);

describe('every reading field of the pack, fed random text', () => {
  for (const { key, step } of steps) {
    const numbers = step.inputs.filter((i) => i.type === 'number');
    test(`when random text is typed into the readings of ${key}/${step.id}, then every figure is finite and judged on its raw value, or nothing is judged`, () => {
      fc.assert(
        fc.property(fc.array(typed, { minLength: numbers.length, maxLength: numbers.length }), (texts) => {
          const values: Record<string, number | null> = {};
          numbers.forEach((input, i) => {
            const r = parseFigure(texts[i]!, input.label);
            // A refused figure never reaches the engine: the field holds no number.
            values[input.id] = r.ok ? r.value : null;
          });
          const e = evaluateStep(step, values, bay2);
          for (const input of e.inputs) {
            const v = values[input.id];
            if (typeof v !== 'number' || !input.limits) continue;
            assert.equal(input.outcome, withinLimits(v, input.limits) ? 'pass' : 'fail', `${input.id} = ${v}`);
          }
          for (const c of e.computed) {
            if (c.value === null || typeof c.value === 'string') continue;
            assert.ok(Number.isFinite(c.value), `${c.id} is finite`);
            assert.doesNotMatch(c.display, /NaN|Infinity|e\+|e-/, `${c.id} shows "${c.display}"`);
            if (c.limits) assert.equal(c.outcome, withinLimits(c.value, c.limits) ? 'pass' : 'fail', `${c.id} = ${c.value}`);
            // The figure shown never sits on the other side of a limit from the raw value.
            const shown = Number(c.display.split(' ')[0]);
            if (c.limits?.max !== undefined && c.value > c.limits.max * (1 + 1e-9)) assert.ok(shown > c.limits.max, `${c.display} over ${c.limits.max}`);
            if (c.limits?.min !== undefined && c.value < c.limits.min * (1 - 1e-9)) assert.ok(shown < c.limits.min, `${c.display} under ${c.limits.min}`);
          }
          return true;
        }),
        { numRuns: 120 },
      );
    });
  }
});
