import assert from 'node:assert/strict';
import { describe, test } from 'node:test';
import type { Options } from 'express-rate-limit';
import { PostgresThrottleStore } from '../../api/lib/throttle-store';
import { db, ownThrottles } from '../support/api';

/** A store of its own namespace, with this window (express-rate-limit passes its options to init()). */
function store(windowMs: number, name = 'test'): PostgresThrottleStore {
  const s = new PostgresThrottleStore(db(), `${ownThrottles()}${name}:`);
  s.init({ windowMs } as Options);
  return s;
}

async function row(s: PostgresThrottleStore, key: string) {
  const [rows] = await db().query('SELECT hits, reset_at FROM throttle_counters WHERE key = $1', { bind: [s.prefix + key] });
  return (rows as { hits: number; reset_at: Date }[])[0];
}

describe('the PostgreSQL throttle store', () => {
  test('when a key is counted, then the totals go up by one and the window ends one window after the first hit', async () => {
    const s = store(60_000);
    const before = Date.now();
    const first = await s.increment('k');
    const counted = Date.now();
    const second = await s.increment('k');
    assert.equal(first.totalHits, 1);
    assert.equal(second.totalHits, 2);
    assert.equal(second.resetTime!.getTime(), first.resetTime!.getTime(), 'the same window');
    // One window after the first hit, by the database's clock (which may differ from ours by a little: a second either way).
    const ends = first.resetTime!.getTime();
    assert.ok(ends >= before + 60_000 - 1000 && ends <= counted + 60_000 + 1000, `${first.resetTime!.toISOString()}`);
    assert.deepEqual(await s.get('k'), { totalHits: 2, resetTime: second.resetTime });
    assert.equal(await s.get('never counted'), undefined);
  });

  test('when many requests count one key at the same moment, then each sees its own total and none is lost', async () => {
    const s = store(60_000);
    const totals = await Promise.all(Array.from({ length: 20 }, () => s.increment('busy')));
    assert.deepEqual(totals.map((t) => t.totalHits).sort((a, b) => a - b), Array.from({ length: 20 }, (_, i) => i + 1));
    assert.equal((await row(s, 'busy'))!.hits, 20);
  });

  test('when the window has ended, then the next hit starts a new window at one, and expired rows of other keys are swept', async () => {
    const s = store(300);
    await s.increment('old');
    await s.increment('old');
    await s.increment('other');
    await new Promise((ok) => setTimeout(ok, 400));
    assert.equal(await s.get('old'), undefined, 'an ended window counts for nothing');
    const again = await s.increment('old');
    assert.equal(again.totalHits, 1);
    assert.ok(again.resetTime!.getTime() > Date.now() - 1000);
    assert.equal(await row(s, 'other'), undefined, 'the expired row of another key is gone');
  });

  test('when a hit is taken back, then the count drops by one and never below zero; reset clears one key, resetAll only this throttle', async () => {
    const s = store(60_000);
    const neighbour = store(60_000, 'neighbour');
    await s.increment('d');
    await s.decrement('d');
    await s.decrement('d');
    assert.equal((await s.get('d'))!.totalHits, 0);
    await s.increment('e');
    await s.resetKey('e');
    assert.equal(await s.get('e'), undefined);
    await s.increment('f');
    await neighbour.increment('f');
    await s.resetAll();
    assert.equal(await s.get('f'), undefined);
    assert.equal((await neighbour.get('f'))!.totalHits, 1, 'another throttle keeps its counts');
  });
});
