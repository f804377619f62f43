import { describe, test } from 'node:test';
import assert from 'node:assert/strict';
import { feelerStack, quantity as q, typicalMetricFeelerSet, valueIn } from '../../procedures/maths/index.ts';
import { nearIn, throwsFor } from './helpers.ts';

const SET = 'typical metric feeler set, 0.05–1.00 mm (from memory; BS 957:2008 range 0.03–1.00 mm)';

describe('feeler stack', () => {
  test(`when the default set is read, then it holds the leaves listed in CHECKS.md, all within the BS 957:2008 range (${SET})`, () => {
    const mm = typicalMetricFeelerSet.map((l) => valueIn(l, 'mm'));
    for (const listed of [0.05, 0.06, 0.07, 0.08, 0.09, 0.1, 0.15, 0.2, 0.25, 0.3, 0.4, 0.5, 1.0]) {
      assert.ok(mm.some((x) => Math.abs(x - listed) < 1e-9), `${listed} mm`);
    }
    assert.ok(mm.every((x) => x >= 0.03 && x <= 1.0));
  });

  test(`when 0.25 mm is wanted exactly, then the single 0.25 mm leaf (${SET})`, () => {
    const r = feelerStack({ target: q(0.25, 'mm'), tolerance: q(0, 'mm') });
    assert.deepEqual(r?.leaves, [q(0.25, 'mm')]);
    nearIn(r!.error, 'mm', 0, 1e-12);
  });

  test(`when 0.37 mm is wanted exactly, then 0.30 + 0.07 mm, the only two-leaf stack (${SET}; checked by hand)`, () => {
    const r = feelerStack({ target: q(0.37, 'mm'), tolerance: q(0, 'mm') });
    assert.deepEqual(r?.leaves, [q(0.3, 'mm'), q(0.07, 'mm')]);
    nearIn(r!.total, 'mm', 0.37, 1e-12);
  });

  test(`when 0.12 mm ± 0.01 is wanted, then two leaves making 0.12 exactly beat none, since no single leaf is within 0.01 (${SET})`, () => {
    const r = feelerStack({ target: q(0.12, 'mm'), tolerance: q(0.01, 'mm') });
    assert.equal(r?.leaves.length, 2);
    nearIn(r!.error, 'mm', 0, 1e-12);
  });

  test(`when 10 mm is wanted, then none, since the whole set sums to 6.25 mm (${SET}; sum checked by hand)`, () => {
    assert.equal(feelerStack({ target: q(10, 'mm'), tolerance: q(0.01, 'mm') }), null);
  });

  test(`when 0.033 mm ± 0.001 is wanted, then none, since the thinnest leaf is 0.05 mm (${SET})`, () => {
    assert.equal(feelerStack({ target: q(0.033, 'mm'), tolerance: q(0.001, 'mm') }), null);
  });

  test('when a set has one 0.05 mm leaf and 0.10 mm is wanted, then none; with two such leaves, both (each leaf at most once)', () => {
    assert.equal(feelerStack({ target: q(0.1, 'mm'), tolerance: q(0, 'mm'), leaves: [q(0.05, 'mm')] }), null);
    const r = feelerStack({ target: q(0.1, 'mm'), tolerance: q(0, 'mm'), leaves: [q(0.05, 'mm'), q(0.05, 'mm')] });
    assert.deepEqual(r?.indexes, [0, 1]);
  });

  test('when an inch set is used, then 0.008 in comes from 0.005 + 0.003 in (identity)', () => {
    const leaves = [0.001, 0.002, 0.003, 0.005, 0.01].map((v) => q(v, 'in'));
    const r = feelerStack({ target: q(0.008, 'in'), tolerance: q(0, 'in'), leaves });
    assert.deepEqual(r?.leaves, [q(0.005, 'in'), q(0.003, 'in')]);
  });

  test('when the tolerance is negative, then the error names tolerance', () => {
    throwsFor(() => feelerStack({ target: q(0.1, 'mm'), tolerance: q(-0.01, 'mm') }), 'tolerance', 'negative');
  });

  test('when a leaf has no usable thickness, then the error names the leaf', () => {
    throwsFor(() => feelerStack({ target: q(0.1, 'mm'), tolerance: q(0, 'mm'), leaves: [q(0.05, 'mm'), q(0, 'mm')] }), 'leaves[1]', 'zero');
  });
});
