import { describe, test } from 'node:test';
import assert from 'node:assert/strict';
import * as maths from '../../procedures/maths/index.ts';
import { callMathsFunction, isMathsFunctionName, mathsFunctions, quantity as q, type Quantity } from '../../procedures/maths/index.ts';
import { nearIn, throwsFor } from './helpers.ts';

describe('maths function registry', () => {
  test('when the registry is listed, then every entry is an exported function with a summary, inputs and outputs', () => {
    const exported = new Set(Object.values(maths).filter((v) => typeof v === 'function'));
    for (const [name, entry] of Object.entries(mathsFunctions)) {
      assert.ok(exported.has(entry.run), `${name} is exported`);
      assert.equal(entry.run.name, name, 'the stable name is the function name');
      assert.ok(entry.summary && entry.inputs && entry.outputs, name);
    }
  });

  test('when a procedure names bladeLength with JSON-like input, then it computes 2,942.5 mm (US Navy training manual, drill press and bandsaw chapter)', () => {
    const out = callMathsFunction('bladeLength', { wheelDiameter: { value: 300, unit: 'mm' }, centreDistance: { value: 1000, unit: 'mm' } });
    nearIn(out as Quantity, 'mm', 2942.5, 0.05);
  });

  test('when a procedure names beltDeflectionTarget, then span/64 (Bloch, fig. 7-14: 100 in span → 1 9/16 in)', () => {
    nearIn(callMathsFunction('beltDeflectionTarget', { span: q(100, 'in') }) as Quantity, 'in', 1.5625, 1e-12);
  });

  test('when a name is not registered, then the error names name', () => {
    assert.equal(isMathsFunctionName('toString'), false);
    throwsFor(() => callMathsFunction('toString', {}), 'name', 'unknown-name');
  });

  test('when the input is not an object, then the error names input', () => {
    throwsFor(() => callMathsFunction('bladeLength', null), 'input', 'missing');
  });
});
