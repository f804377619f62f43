import assert from 'node:assert/strict';
import { randomUUID } from 'node:crypto';
import { before, describe, test } from 'node:test';
import request from 'supertest';
import { DEMO_MACHINES } from '../../api/db/seed';
import { demoHistory, demoId, seedDemoHistory } from '../../api/db/seed-history';
import type { MachineTrends } from '../../api/contracts/trends';
import { createLogger } from '../../api/lib/logger';
import type { AuthService } from '../../api/modules/auth/service';
import { BladeFitting } from '../../api/modules/blades/model';
import { Authorisation } from '../../api/modules/competencies/model';
import { driftOf } from '../../api/modules/machines/trends';
import { Machine } from '../../api/modules/machines/model';
import type { Person } from '../../api/modules/people/repository';
import { SetupRecord, StepEntry } from '../../api/modules/records/model';
import { SignOffService } from '../../api/modules/signoff/service';
import { db, expectProblem, makePerson, signIn, testApp, testConfig } from '../support/api';
import { approve, fixture } from '../support/procedures';
import { freshMachine, RecordMaker } from '../support/records';

const app = testApp();
let trainee: Person, competent: Person, auditor: Person;
let maker: RecordMaker;
let procedureKey: string;
const tokens: Record<string, string> = {};
const as = (who: string) => ({ authorization: `Bearer ${tokens[who]}` });

before(async () => {
  db();
  trainee = await makePerson(['trainee'], 'Trends Trainee');
  competent = await makePerson(['competent_person'], 'Trends Competent');
  auditor = await makePerson(['auditor'], 'Trends Auditor');
  for (const [name, p] of Object.entries({ trainee, competent, auditor })) tokens[name] = (await signIn(app, p.email)).token;
  procedureKey = `trends-${randomUUID().slice(0, 8)}`;
  await approve(fixture(procedureKey));
  maker = new RecordMaker(app, procedureKey);
});

describe('readings over time on a machine', () => {
  test('when a machine has readings, then its trends give each stored reading with its time and unit, marks the out-of-limits ones, gives the limits in force, and leaves voided records out', async () => {
    const machine = await freshMachine('Trend saw');
    const first = await maker.signed({ performer: trainee, witness: competent, approver: competent, machineId: machine.id, reading: 800 });
    const remeasured = await maker.ready({ performer: trainee, witness: competent, machineId: machine.id, firstReading: 650, reading: 820 });
    const failed = await maker.signed({ performer: trainee, witness: competent, approver: competent, machineId: machine.id, reading: 660 });
    // A voided record's reading is not a reading of the machine.
    const voided = await request(app).post('/api/records').set(as('trainee')).send({ machineId: machine.id, procedureKey }).expect(201);
    await request(app).post(`/api/records/${voided.body.id}/entries`).set(as('trainee')).send({ idempotencyKey: randomUUID(), stepId: 'isolate', values: { lock: 'L1' } }).expect(201);
    await request(app).post(`/api/records/${voided.body.id}/entries`).set(as('trainee')).send({ idempotencyKey: randomUUID(), stepId: 'tension', values: { reading: 890 } }).expect(201);
    await request(app).post(`/api/records/${voided.body.id}/void`).set(as('trainee')).send({ reason: 'Wrong saw.' }).expect(200);

    const res = await request(app).get(`/api/machines/${machine.id}/trends`).set(as('auditor')).expect(200);
    const body = res.body as MachineTrends;
    assert.equal(body.machineId, machine.id);
    assert.deepEqual(body.rule, { readings: 5, ahead: 3 });
    const series = body.series.find((s) => s.key === `${procedureKey}/tension/reading`);
    assert.ok(series, JSON.stringify(body.series.map((s) => s.key)));
    assert.equal(series.label, 'Gauge reading');
    assert.equal(series.unit, 'kgf');
    // The machine's own specification: tensionRangeKgf 700–900 (api/db/seed.ts).
    assert.deepEqual(series.limits, { min: 700, max: 900, unit: 'kgf' });
    assert.deepEqual(
      series.points.map((p) => [p.recordId, p.value, p.unit, p.outOfLimits]),
      [
        [first, 800, 'kgf', false],
        [remeasured, 820, 'kgf', false],
        [failed, 660, 'kgf', true],
      ],
    );
    // Each point is the stored value of the latest attempt, at the time it was saved.
    for (const p of series.points) {
      const stored = await StepEntry.findAll({ where: { recordId: p.recordId, stepId: 'tension' }, order: [['attempt', 'DESC']] });
      assert.equal(stored[0]!.values['reading'], p.value);
      assert.equal(stored[0]!.createdAt.toISOString(), p.at);
    }
    assert.deepEqual(series.points.map((p) => p.recordStatus), ['signed_off', 'ready_for_signoff', 'signed_off']);
    assert.equal(series.drift, null, 'three readings are too few for the drift rule');
    // The computed stress has no limits and is not on the watch list: not charted.
    assert.equal(body.series.some((s) => s.key === `${procedureKey}/tension/stress`), false);
  });

  test('when the trends of an unknown machine or a bad id are asked for, then a 404 or a 400 problem comes back', async () => {
    expectProblem(await request(app).get(`/api/machines/${randomUUID()}/trends`).set(as('trainee')), 404);
    const bad = expectProblem(await request(app).get('/api/machines/not-an-id/trends').set(as('trainee')), 400);
    assert.ok(bad.errors?.some((e) => e.pointer === '#/params/id'));
  });
});

describe('the drift rule', () => {
  // Least-squares slope b = Σ(x−x̄)(y−ȳ) / Σ(x−x̄)², line y = ȳ + b(x−x̄): the textbook straight-line fit (from memory).
  test('when the last five readings climb toward the maximum, then the fitted line passes it within three checks and the notice says when', () => {
    // 872, 876, 880, 885, 891 at x = 0…4: x̄ = 2, ȳ = 880.8, Σ(x−x̄)(y−ȳ) = 47, Σ(x−x̄)² = 10 → b = 4.7 per check (worked by hand).
    const drift = driftOf([868, 872, 876, 880, 885, 891], { min: 700, max: 900, unit: 'kgf' });
    assert.ok(drift);
    assert.equal(drift.toward, 'max');
    assert.ok(Math.abs(drift.slopePerCheck - 4.7) < 1e-9);
    // At x = 7: 880.8 + 4.7 × 5 = 904.3; at x = 5: 894.9, x = 6: 899.6, so the line passes 900 at the third check.
    assert.ok(Math.abs(drift.projected - 904.3) < 1e-9);
    assert.equal(drift.checksToLimit, 3);
  });

  test('when readings fall toward a minimum, stay level, are too few, or are already out of limits, then only the falling ones give a notice', () => {
    // 2.6, 2.3, 2.0, 1.7, 1.4 mm/s: b = −0.3, line at x = 5 is 1.1, at x = 6 is 0.8 → passes 1.0 at the second check.
    const falling = driftOf([2.6, 2.3, 2.0, 1.7, 1.4], { min: 1, max: 3, unit: 'mm/s' });
    assert.equal(falling?.toward, 'min');
    assert.equal(falling?.checksToLimit, 2);
    assert.equal(driftOf([0.1, 0.1, 0.1, 0.1, 0.1], { min: 0.08, max: 0.12, unit: 'mm' }), null);
    assert.equal(driftOf([0.1, 0.11, 0.115], { min: 0.08, max: 0.12, unit: 'mm' }), null);
    assert.equal(driftOf([880, 890, 900, 910, 920], { min: 700, max: 900, unit: 'kgf' }), null, 'past the limit already: an out-of-limits reading, not a drift');
    assert.equal(driftOf([1, 2, 3, 4, 5], null), null);
  });
});

describe('the demo workshop’s history', () => {
  test('when the demo is seeded, then both saws have signed, failed, returned and open records over six months, all signed ones pass the record check, and seeding again changes nothing', async () => {
    const machines = await Machine.findAll({ where: { assetTag: DEMO_MACHINES.map((m) => m.assetTag) } });
    assert.equal(machines.length, 2);
    const ids = demoHistory().map((p) => demoId(p.name));
    const records = await SetupRecord.findAll({ where: { id: ids } });
    assert.equal(records.length, ids.length);
    for (const m of machines) {
      const mine = records.filter((r) => r.machineId === m.id);
      assert.ok(mine.some((r) => r.status === 'signed_off' && r.result === 'failed'), `${m.assetTag} has a failed signed record`);
      assert.ok(mine.filter((r) => r.status === 'signed_off' && r.result === 'passed').length >= 10, `${m.assetTag} has passed records`);
      const days = mine.map((r) => r.createdAt.getTime());
      assert.ok((Math.max(...days) - Math.min(...days)) / 86_400_000 > 150, 'the history spans about six months');
    }
    assert.ok(records.some((r) => r.status === 'returned'));
    assert.ok(records.some((r) => r.status === 'ready_for_signoff'));
    assert.ok(records.some((r) => r.status === 'underway'));

    const checker = new SignOffService(db(), undefined as unknown as AuthService);
    for (const r of records.filter((x) => x.status === 'signed_off')) {
      const check = await checker.check(r.id, null);
      assert.equal(check.intact, true, `${r.id}: ${JSON.stringify(check.checks.filter((c) => !c.ok))}`);
    }
    assert.ok((await BladeFitting.count({ where: { machineId: machines.map((m) => m.id) } })) >= 6);
    assert.ok((await BladeFitting.count({ where: { machineId: machines.map((m) => m.id), removalReason: 'broken' } })) >= 1);

    const counts = async () => ({ records: await SetupRecord.count(), entries: await StepEntry.count(), authorisations: await Authorisation.count(), fittings: await BladeFitting.count() });
    const before = await counts();
    const config = testConfig();
    assert.deepEqual(await seedDemoHistory(db(), config, createLogger('silent')), { written: 0 });
    assert.deepEqual(await counts(), before);
  });

  test('when a supervisor opens the stores saw’s trends, then its guide clearances are drawn from the seeded readings and drift toward the maximum', async () => {
    const saw = (await Machine.findOne({ where: { assetTag: DEMO_MACHINES[1]!.assetTag } }))!;
    const res = await request(app).get(`/api/machines/${saw.id}/trends`).set(as('trainee')).expect(200);
    const body = res.body as MachineTrends;
    const fixed = body.series.find((s) => s.key === 'guide-bearings/back-rollers/fixed-guide');
    assert.ok(fixed);
    assert.deepEqual(fixed.points.map((p) => p.value), [0.08, 0.09, 0.1, 0.1, 0.11, 0.11]);
    assert.deepEqual(fixed.limits, { min: 0.08, max: 0.12, unit: 'mm' });
    assert.equal(fixed.drift?.toward, 'max');
    const descent = body.series.find((s) => s.key === 'bow-descent/time-drop/rate');
    assert.ok(descent?.points.some((p) => p.outOfLimits), 'the failed descent check is marked');
    const speed = body.series.find((s) => s.key === 'speed-change/choose-speed/step-speed');
    assert.ok(speed && speed.limits === null && speed.points.length >= 3, 'blade speed is charted without limits');
  });
});
