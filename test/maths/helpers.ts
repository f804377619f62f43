import assert from 'node:assert/strict';
import { MathsInputError, valueIn, type MathsInputReason, type Quantity } from '../../procedures/maths/index.ts';

/** Asserts |actual − expected| ≤ tolerance, with both numbers in the failure message. */
export function near(actual: number, expected: number, tolerance: number, what = 'value'): void {
  assert.ok(
    Math.abs(actual - expected) <= tolerance,
    `${what}: expected ${expected} ± ${tolerance}, got ${actual}`,
  );
}

/** Asserts a quantity, read in `unit`, is expected ± tolerance. */
export function nearIn(q: Quantity, unit: string, expected: number, tolerance: number): void {
  near(valueIn(q, unit), expected, tolerance, unit);
}

/** Asserts fn throws MathsInputError naming `argument` (in .argument and in the message). */
export function throwsFor(fn: () => unknown, argument: string, reason?: MathsInputReason): void {
  assert.throws(fn, (err: unknown) => {
    assert.ok(err instanceof MathsInputError, `expected MathsInputError, got ${String(err)}`);
    assert.equal(err.argument, argument);
    assert.ok(err.message.includes(argument), `message "${err.message}" should name ${argument}`);
    if (reason !== undefined) assert.equal(err.reason, reason);
    return true;
  });
}
