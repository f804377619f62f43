import assert from 'node:assert/strict';
import { execFile } from 'node:child_process';
import { randomUUID } from 'node:crypto';
import { mkdtemp, readFile, readdir, rm, writeFile } from 'node:fs/promises';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { before, describe, test } from 'node:test';
import { promisify } from 'node:util';
import type { Express } from 'express';
import jsQR from 'jsqr';
import sharp from 'sharp';
import request from 'supertest';
import { createApp } from '../../api/app';
import { horizontalBandsawSpecSchema, specProblems } from '../../api/contracts/machine-spec';
import type { ScheduleView } from '../../api/contracts/schedules';
import { DEMO_MACHINES, DEMO_SCHEDULES } from '../../api/db/seed';
import { createLogger } from '../../api/lib/logger';
import { labelBox } from '../../api/modules/machines/labels';
import { OutboxMessage } from '../../api/modules/mail/model';
import { Machine, MachineEvent, MachineSchedule } from '../../api/modules/machines/model';
import type { Person } from '../../api/modules/people/repository';
import { ProcedureVersion } from '../../api/modules/procedures/model';
import { SetupRecord } from '../../api/modules/records/model';
import type { TagOutNotice } from '../../api/modules/schedules/tag-out-notice';
import { db, expectProblem, makePerson, ownThrottles, PASSWORD, signIn, testApp, testConfig } from '../support/api';
import { approve, fixture } from '../support/procedures';

const run = promisify(execFile);

/** The fixed "now" that due dates are judged against in the schedule tests. */
const NOW = new Date('2026-03-02T09:00:00Z');
const at = (iso: string) => new Date(iso);

const notices: TagOutNotice[] = [];
const PUBLIC_URL = 'https://saws.brackenford-works.example';
let app: Express;
let clocked: Express;
let admin: Person, trainee: Person, competent: Person, signer: Person, auditor: Person;
const tokens: Record<string, string> = {};
const as = (who: string) => ({ authorization: `Bearer ${tokens[who]}` });
/** Our own procedure fixtures: one that fails, one allowed by config, one allowed by a schedule, one refused. */
const keys = { fails: '', isolation: '', allowed: '', other: '', tension: '', square: '' };
let bladeChangeVersionId: string;

const goodSpec = () => structuredClone(DEMO_MACHINES[0]!.spec);
const machineBody = (over: Record<string, unknown> = {}) => ({
  name: `Test saw ${randomUUID().slice(0, 6)}`,
  assetTag: `TS-${randomUUID().slice(0, 8)}`,
  location: 'Bay 4, by the roller door',
  kind: 'horizontal_bandsaw',
  model: 'Invented HB-1',
  spec: goodSpec(),
  ...over,
});

before(async () => {
  db();
  const config = testConfig({ TAG_OUT_PROCEDURES: '', PUBLIC_URL });
  admin = await makePerson(['workshop_admin'], 'Register Admin');
  trainee = await makePerson(['trainee'], 'Register Trainee');
  competent = await makePerson(['competent_person'], 'Register Competent');
  signer = await makePerson(['competent_person'], 'Register Signer');
  auditor = await makePerson(['auditor'], 'Register Auditor');
  for (const k of Object.keys(keys) as (keyof typeof keys)[]) {
    keys[k] = `mach-${k}-${randomUUID().slice(0, 6)}`;
    await approve(fixture(keys[k], 1, `Test ${k} check`));
  }
  // Isolation is allowed on any tagged-out machine by configuration (as 'isolation-lockout' is by default).
  const logger = createLogger('silent');
  app = createApp({
    config: { ...config, TAG_OUT_PROCEDURES: [keys.isolation] },
    sequelize: db(),
    logger,
    notifyTaggedOut: async (n) => void notices.push(n),
    throttleNamespace: ownThrottles(),
  });
  clocked = createApp({ config, sequelize: db(), logger, now: () => NOW, throttleNamespace: ownThrottles() });
  for (const [name, p] of Object.entries({ admin, trainee, competent, signer, auditor })) tokens[name] = (await signIn(app, p.email)).token;
  bladeChangeVersionId = (await ProcedureVersion.findOne({ where: { key: 'blade-change', status: 'approved' } }))!.id;
});

/** Register a machine through the API, as the admin; optionally backdate its arrival. */
async function registerMachine(arrived?: Date, over: Record<string, unknown> = {}): Promise<string> {
  const res = await request(app).post('/api/machines').set(as('admin')).send(machineBody(over));
  assert.equal(res.status, 201, JSON.stringify(res.body));
  if (arrived) {
    await Machine.update({ createdAt: arrived }, { where: { id: res.body.id }, silent: true });
    await MachineEvent.update({ at: arrived }, { where: { machineId: res.body.id, kind: 'registered' } });
  }
  return res.body.id as string;
}

/** A signed record at fixed dates, stored as sign-off leaves it (for due-date arithmetic). */
async function signedRun(machineId: string, key: string, result: 'passed' | 'failed', doneAt: Date): Promise<string> {
  const version =
    key === 'blade-change' ? { id: bladeChangeVersionId } : (await ProcedureVersion.findOne({ where: { key, status: 'approved' } }))!;
  const id = randomUUID();
  await SetupRecord.create({
    id,
    machineId,
    procedureVersionId: version.id,
    machineSpec: goodSpec(),
    status: 'signed_off',
    result,
    startedById: trainee.id,
    finishedAt: doneAt,
    signedAt: new Date(doneAt.getTime() + 60 * 60 * 1000),
  });
  return id;
}

async function setSchedules(machineId: string, schedules: object[]) {
  const res = await request(app).put(`/api/machines/${machineId}/schedules`).set(as('admin')).send({ schedules });
  assert.equal(res.status, 200, JSON.stringify(res.body));
  return res.body as { procedureKey: string; state: string; dueAt: string | null; reasons: string[] }[];
}

/** A record run and finished by a competent person through the API, then signed off by another. */
async function signedThroughApi(machineId: string, procedureKey: string, fail: boolean, recordId?: string, via: Express = app): Promise<string> {
  let id = recordId;
  if (!id) {
    const started = await request(via).post('/api/records').set(as('competent')).send({ machineId, procedureKey });
    assert.equal(started.status, 201, JSON.stringify(started.body));
    id = started.body.id as string;
  }
  const post = (stepId: string, values: object, extra: object = {}) =>
    request(via).post(`/api/records/${id}/entries`).set(as('competent')).send({ idempotencyKey: randomUUID(), stepId, values, ...extra }).expect(201);
  await post('isolate', { lock: 'L12' });
  await post('tension', { reading: fail ? 600 : 800 }, fail ? { correctiveNote: 'Gauge reads low; spring is tired. Reported.' } : {});
  await post('track', { clear: true });
  const jpeg = await sharp({ create: { width: 40, height: 30, channels: 3, background: '#567' } }).jpeg().toBuffer();
  const photo = await request(via).post('/api/photos').set(as('competent')).attach('photo', jpeg, 'gauge.jpg').expect(201);
  await post('evidence', { shot: [photo.body.id] });
  await request(via).post(`/api/records/${id}/finish`).set(as('competent')).send({ password: PASSWORD, acceptFailed: fail }).expect(200);
  await request(via).post(`/api/records/${id}/sign-off`).set(as('signer')).send({ password: PASSWORD }).expect(200);
  return id;
}

describe('the machine register', () => {
  test('when the demo machines’ figures are checked, then each passes its kind’s specification schema, and registers through the API', async () => {
    for (const demo of DEMO_MACHINES) {
      assert.deepEqual(specProblems(demo.kind, demo.spec), [], demo.assetTag);
      assert.equal(horizontalBandsawSpecSchema.safeParse(demo.spec).success, true);
    }
    const res = await request(app).post('/api/machines').set(as('admin')).send({ ...DEMO_MACHINES[1]!, assetTag: `DEMO-COPY-${randomUUID().slice(0, 6)}` }).expect(201);
    const stored = await Machine.findByPk(res.body.id);
    assert.deepEqual(stored!.spec, DEMO_MACHINES[1]!.spec);
    // The demo schedules name procedures of the bandsaw pack, and the seed stored them.
    for (const d of DEMO_SCHEDULES) {
      assert.ok(await ProcedureVersion.findOne({ where: { key: d.procedureKey, machineKind: 'horizontal_bandsaw' } }), d.procedureKey);
      const machine = await Machine.findOne({ where: { assetTag: d.assetTag } });
      const row = await MachineSchedule.findOne({ where: { machineId: machine!.id, procedureKey: d.procedureKey } });
      assert.equal(row?.intervalDays, d.intervalDays, `${d.assetTag} ${d.procedureKey}`);
    }
  });

  test('when an admin registers a machine, then it is stored with its figures and its arrival, and reads back as Ready', async () => {
    const body = machineBody();
    const res = await request(app).post('/api/machines').set(as('admin')).send(body).expect(201);
    assert.equal(res.headers['location'], `/api/machines/${res.body.id}`);
    assert.equal(res.body.status.state, 'ready');
    assert.equal(res.body.status.label, 'Ready');
    assert.equal(res.body.currentBlade, null);
    assert.equal(res.body.startable, 'all');
    const stored = await Machine.findByPk(res.body.id);
    assert.equal(stored!.assetTag, body.assetTag);
    assert.equal(stored!.location, body.location);
    assert.deepEqual(stored!.spec, body.spec);
    const events = await MachineEvent.findAll({ where: { machineId: res.body.id } });
    assert.deepEqual(events.map((e) => [e.kind, e.actorId, e.detail['location']]), [['registered', admin.id, body.location]]);
  });

  test('when figures are bad, then each is refused with a pointer to it and nothing is stored', async () => {
    const before = await Machine.count();
    const spec = goodSpec() as Record<string, unknown>;
    spec['tensionRangeKgf'] = { min: 900, max: 700 };
    spec['guideClearanceMm'] = { min: 0.08, max: -0.1 };
    spec['wheelDiameterMm'] = 0;
    spec['tensionReads'] = 'dial';
    spec['speedSteps'] = [];
    spec['bladeColour'] = 'blue';
    delete spec['motorRpm'];
    const problem = expectProblem(await request(app).post('/api/machines').set(as('admin')).send(machineBody({ spec, name: '' })), 400);
    const pointers = problem.errors!.map((e) => e.pointer).sort();
    assert.deepEqual(pointers, [
      '#/name',
      '#/spec',
      '#/spec/guideClearanceMm/max',
      '#/spec/motorRpm',
      '#/spec/speedSteps',
      '#/spec/tensionRangeKgf/max',
      '#/spec/tensionReads',
      '#/spec/wheelDiameterMm',
    ]);
    const clearance = problem.errors!.filter((e) => e.pointer === '#/spec/guideClearanceMm/max');
    assert.deepEqual(clearance.map((e) => e.detail), ['Enter the most guide clearance in mm, a number more than 0.'], 'one problem per figure');
    // min ≤ max is judged once both figures are numbers above nought.
    const swapped = { ...(goodSpec() as object), tensionRangeKgf: { min: 900, max: 700 } };
    const second = expectProblem(await request(app).post('/api/machines').set(as('admin')).send(machineBody({ spec: swapped })), 400);
    assert.deepEqual(second.errors, [{ pointer: '#/spec/tensionRangeKgf/max', detail: 'The most tension cannot be less than the least.' }]);
    const steps = { ...(goodSpec() as object), speedSteps: [{ label: '1', driverMm: 60, drivenMm: -5 }] };
    const third = expectProblem(await request(app).post('/api/machines').set(as('admin')).send(machineBody({ spec: steps })), 400);
    assert.equal(third.errors![0]!.pointer, '#/spec/speedSteps/0/drivenMm');
    const kind = expectProblem(await request(app).post('/api/machines').set(as('admin')).send(machineBody({ kind: 'pillar_drill' })), 400);
    assert.equal(kind.errors![0]!.pointer, '#/kind');
    assert.equal(await Machine.count(), before);
  });

  test('when people without the admin role register or change a machine, then it is a 403 and nothing changes; every role reads the register', async () => {
    const id = await registerMachine();
    const before = await Machine.findByPk(id);
    for (const who of ['trainee', 'competent', 'auditor']) {
      expectProblem(await request(app).post('/api/machines').set(as(who)).send(machineBody()), 403);
      expectProblem(await request(app).put(`/api/machines/${id}`).set(as(who)).send(machineBody({ name: 'Renamed' })), 403);
      expectProblem(await request(app).put(`/api/machines/${id}/schedules`).set(as(who)).send({ schedules: [] }), 403);
      expectProblem(await request(app).get('/api/machines/labels.pdf').set(as(who)), 403);
      const list = await request(app).get('/api/machines').set(as(who)).expect(200);
      assert.ok(list.body.some((m: { id: string; status: { state: string } }) => m.id === id && m.status.state === 'ready'));
      const one = await request(app).get(`/api/machines/${id}`).set(as(who)).expect(200);
      assert.equal(one.body.name, before!.name);
    }
    expectProblem(await request(app).get('/api/machines'), 401);
    const after = await Machine.findByPk(id);
    assert.equal(after!.name, before!.name);
    assert.equal(after!.updatedAt.getTime(), before!.updatedAt.getTime());
    assert.equal(await MachineEvent.count({ where: { machineId: id } }), 1);
  });

  test('when an admin edits a machine, then the figures change; a taken asset tag or a new kind is refused on its field and nothing changes', async () => {
    const id = await registerMachine();
    const other = await registerMachine();
    const otherTag = (await Machine.findByPk(other))!.assetTag;
    const spec = { ...(goodSpec() as object), bladeLengthMm: 2750 };
    const body = machineBody({ name: 'Bay 4 bandsaw', spec, location: 'Bay 4, by the roller door' });
    const res = await request(app).put(`/api/machines/${id}`).set(as('admin')).send(body).expect(200);
    assert.equal(res.body.name, 'Bay 4 bandsaw');
    const stored = await Machine.findByPk(id);
    assert.equal(stored!.spec['bladeLengthMm'], 2750);
    const changed = await MachineEvent.findOne({ where: { machineId: id, kind: 'changed' } });
    assert.deepEqual((changed!.detail['fields'] as string[]).sort(), ['assetTag', 'name', 'spec']);

    const taken = expectProblem(await request(app).put(`/api/machines/${id}`).set(as('admin')).send({ ...body, name: 'Clash', assetTag: otherTag.toLowerCase() }), 409);
    assert.equal(taken.errors![0]!.pointer, '#/assetTag');
    const dup = expectProblem(await request(app).post('/api/machines').set(as('admin')).send(machineBody({ assetTag: otherTag })), 409);
    assert.equal(dup.errors![0]!.pointer, '#/assetTag');
    assert.equal((await Machine.findByPk(id))!.name, 'Bay 4 bandsaw');
    assert.equal(await Machine.count({ where: { assetTag: otherTag } }), 1);
    expectProblem(await request(app).put(`/api/machines/${randomUUID()}`).set(as('admin')).send(body), 404);
  });

  test('when a machine is moved, then the move is kept with who moved it, and a record signed before the move still checks intact', async () => {
    const id = await registerMachine();
    const recordId = await signedThroughApi(id, keys.tension, false);
    const body = { ...machineBody(), ...(await request(app).get(`/api/machines/${id}`).set(as('admin'))).body };
    const moved = await request(app)
      .put(`/api/machines/${id}`)
      .set(as('admin'))
      .send({ name: body.name, assetTag: body.assetTag, kind: body.kind, model: body.model, spec: body.spec, photoId: null, location: 'Steel stores' })
      .expect(200);
    assert.deepEqual(moved.body.moves.map((m: { from: string; to: string; by: string }) => [m.from, m.to, m.by]), [['Bay 4, by the roller door', 'Steel stores', 'Register Admin']]);
    const events = await MachineEvent.findAll({ where: { machineId: id, kind: 'relocated' } });
    assert.deepEqual(events.map((e) => e.detail), [{ from: 'Bay 4, by the roller door', to: 'Steel stores' }]);
    assert.equal(await MachineEvent.count({ where: { machineId: id, kind: 'changed' } }), 0);
    const check = await request(app).get(`/api/records/${recordId}/check`).set(as('auditor')).expect(200);
    assert.equal(check.body.intact, true, JSON.stringify(check.body.checks));
    const stored = await SetupRecord.findByPk(recordId);
    assert.equal(stored!.machineSnapshot!.location, 'Bay 4, by the roller door');
  });

  test('when an admin gives a machine a photo, then everyone sees it; someone else’s photo is refused on the photo field', async () => {
    const jpeg = await sharp({ create: { width: 64, height: 48, channels: 3, background: '#3a6' } }).jpeg().toBuffer();
    const mine = await request(app).post('/api/photos').set(as('admin')).attach('photo', jpeg, 'saw.jpg').expect(201);
    const theirs = await request(app).post('/api/photos').set(as('trainee')).attach('photo', jpeg, 'saw.jpg').expect(201);
    const refused = expectProblem(await request(app).post('/api/machines').set(as('admin')).send(machineBody({ photoId: theirs.body.id })), 422);
    assert.equal(refused.errors![0]!.pointer, '#/photoId');
    const res = await request(app).post('/api/machines').set(as('admin')).send(machineBody({ photoId: mine.body.id })).expect(201);
    assert.equal((await Machine.findByPk(res.body.id))!.photoId, mine.body.id);
    const seen = await request(app).get(`/api/machines/${res.body.id}/photo`).set(as('trainee')).expect(200);
    assert.equal(seen.headers['content-type'], 'image/jpeg');
    assert.equal((await sharp(seen.body).metadata()).width, 64);
    expectProblem(await request(app).get(`/api/machines/${await registerMachine()}/photo`).set(as('trainee')), 404);
  });
});

describe('schedules and due dates (judged at a fixed time, 2 March 2026 09:00 UTC)', () => {
  const get = async (id: string) => (await request(clocked).get(`/api/machines/${id}`).set(as('trainee')).expect(200)).body;
  const schedule = (body: { schedules: ScheduleView[] }, key: string) => body.schedules.find((s) => s.procedureKey === key)!;

  test('when the last pass plus the interval lies ahead, then the machine is Ready and shows the due date', async () => {
    const id = await registerMachine(at('2026-01-05T08:00:00Z'));
    await signedRun(id, keys.tension, 'passed', at('2026-02-20T10:00:00Z'));
    await setSchedules(id, [{ procedureKey: keys.tension, intervalDays: 30 }]);
    const body = await get(id);
    assert.equal(body.status.state, 'ready');
    const s = schedule(body, keys.tension);
    // Due date = last passing record (20 Feb, 10:00) + 30 days = 22 Mar, 10:00 (common practice: interval from the last pass).
    assert.equal(s.dueAt, '2026-03-22T10:00:00.000Z');
    assert.equal(s.state, 'ok');
    assert.equal(s.lastPassedAt, '2026-02-20T10:00:00.000Z');
    assert.deepEqual(s.reasons, []);
    const stored = await MachineSchedule.findOne({ where: { machineId: id, procedureKey: keys.tension } });
    assert.equal(stored!.intervalDays, 30);
  });

  test('when the interval has run out, then the check is due or overdue, the machine shows Check due, and the due list has it', async () => {
    const id = await registerMachine(at('2026-01-05T08:00:00Z'));
    await signedRun(id, keys.tension, 'passed', at('2026-01-20T10:00:00Z')); // + 30 d = 19 Feb: overdue
    await signedRun(id, keys.square, 'passed', at('2026-02-16T08:00:00Z')); // + 14 d = 2 Mar 08:00: due an hour ago
    await signedRun(id, keys.other, 'passed', at('2026-02-01T09:00:00Z')); // + 30 d = 3 Mar 09:00: due tomorrow
    await setSchedules(id, [
      { procedureKey: keys.tension, intervalDays: 30 },
      { procedureKey: keys.square, intervalDays: 14 },
      { procedureKey: keys.other, intervalDays: 30 },
      { procedureKey: keys.allowed, intervalDays: 7 }, // never passed: due since the machine arrived
    ]);
    const body = await get(id);
    assert.equal(body.status.state, 'check_due');
    assert.equal(body.status.label, 'Check due');
    assert.equal(body.status.dueCount, 3);
    assert.deepEqual(
      [keys.tension, keys.square, keys.other, keys.allowed].map((k) => [schedule(body, k).state, schedule(body, k).dueAt]),
      [
        ['overdue', '2026-02-19T10:00:00.000Z'],
        ['due', '2026-03-02T08:00:00.000Z'],
        ['soon', '2026-03-03T09:00:00.000Z'],
        ['overdue', '2026-01-05T08:00:00.000Z'],
      ],
    );
    assert.match(schedule(body, keys.tension).reasons[0]!, /Every 30 days: last passed 20 Jan 2026/);
    assert.match(schedule(body, keys.allowed).reasons[0]!, /never passed on this machine/);

    const due = await request(clocked).get('/api/schedules/due').set(as('trainee')).expect(200);
    const mine = due.body.items.filter((i: { machine: { id: string } }) => i.machine.id === id);
    assert.deepEqual(
      mine.map((i: { procedureKey: string; state: string }) => [i.procedureKey, i.state]),
      [
        [keys.allowed, 'overdue'],
        [keys.tension, 'overdue'],
        [keys.square, 'due'],
        [keys.other, 'soon'],
      ],
    );
    assert.equal(due.body.at, NOW.toISOString());
    for (const who of ['competent', 'admin']) await request(clocked).get('/api/schedules/due').set(as(who)).expect(200);
    expectProblem(await request(clocked).get('/api/schedules/due').set(as('auditor')), 403);
  });

  test('when the blade is changed after the last pass, then a check set to follow blade changes is due from the change, until it passes again', async () => {
    const id = await registerMachine(at('2026-01-05T08:00:00Z'));
    await setSchedules(id, [{ procedureKey: keys.tension, triggers: ['after_blade_change'] }]);
    await signedRun(id, keys.tension, 'passed', at('2026-02-10T10:00:00Z'));
    let s = schedule(await get(id), keys.tension);
    assert.equal(s.state, 'ok');
    assert.equal(s.dueAt, null);
    await signedRun(id, 'blade-change', 'passed', at('2026-02-15T11:30:00Z'));
    const body = await get(id);
    s = schedule(body, keys.tension);
    assert.equal(s.state, 'overdue');
    assert.equal(s.dueAt, '2026-02-15T11:30:00.000Z');
    assert.match(s.reasons[0]!, /blade was changed 15 Feb 2026/);
    assert.equal(body.status.state, 'check_due');
    await signedRun(id, keys.tension, 'passed', at('2026-02-16T09:00:00Z'));
    s = schedule(await get(id), keys.tension);
    assert.equal(s.state, 'ok');
    assert.equal(s.lastPassedAt, '2026-02-16T09:00:00.000Z');
    assert.equal((await get(id)).status.state, 'ready');
  });

  test('when the machine is moved through the register after the last pass, then a check set to follow moves is due from the move', async () => {
    const id = await registerMachine(at('2026-01-05T08:00:00Z'));
    await setSchedules(id, [{ procedureKey: keys.square, triggers: ['after_relocation'] }, { procedureKey: keys.tension, intervalDays: 90 }]);
    await signedRun(id, keys.square, 'passed', at('2026-02-01T10:00:00Z'));
    await signedRun(id, keys.tension, 'passed', at('2026-02-01T10:00:00Z'));
    assert.equal((await get(id)).status.state, 'ready');
    const current = await get(id);
    await request(app)
      .put(`/api/machines/${id}`)
      .set(as('admin'))
      .send({ name: current.name, assetTag: current.assetTag, kind: current.kind, model: current.model, spec: current.spec, photoId: null, location: 'Bay 1, new cutting cell' })
      .expect(200);
    await MachineEvent.update({ at: at('2026-02-25T07:00:00Z') }, { where: { machineId: id, kind: 'relocated' } });
    const body = await get(id);
    const s = schedule(body, keys.square);
    assert.equal(s.state, 'overdue');
    assert.equal(s.dueAt, '2026-02-25T07:00:00.000Z');
    assert.match(s.reasons[0]!, /Moved from “Bay 4, by the roller door” to “Bay 1, new cutting cell” 25 Feb 2026/);
    assert.equal(schedule(body, keys.tension).state, 'ok');
    assert.equal(body.status.state, 'check_due');
  });

  test('when any check fails after the last pass, then a check set to follow failures is due, and the machine is tagged out by the failure', async () => {
    const id = await registerMachine(at('2026-01-05T08:00:00Z'));
    await setSchedules(id, [{ procedureKey: keys.square, triggers: ['after_failed_check'] }]);
    await signedRun(id, keys.square, 'passed', at('2026-02-01T10:00:00Z'));
    const failed = await signedRun(id, keys.fails, 'failed', at('2026-02-05T14:00:00Z'));
    const body = await get(id);
    const s = schedule(body, keys.square);
    assert.equal(s.state, 'overdue');
    assert.equal(s.dueAt, '2026-02-05T14:00:00.000Z');
    assert.match(s.reasons[0]!, /“Test fails check” failed 5 Feb 2026/);
    assert.equal(body.status.state, 'tagged_out');
    assert.deepEqual(body.status.taggedOutBy.map((c: { recordId: string }) => c.recordId), [failed]);
  });

  test('when schedules are bad, then each is refused with a pointer and the stored schedules stay as they were', async () => {
    const id = await registerMachine();
    await setSchedules(id, [{ procedureKey: keys.tension, intervalDays: 30 }]);
    const put = (schedules: object[]) => request(app).put(`/api/machines/${id}/schedules`).set(as('admin')).send({ schedules });
    const shape = expectProblem(
      await put([
        { procedureKey: keys.square },
        { procedureKey: keys.tension, intervalDays: 0, triggers: ['after_lunch'] },
        { procedureKey: keys.square, intervalDays: 2.5 },
      ]),
      400,
    );
    assert.deepEqual(shape.errors!.map((e) => e.pointer).sort(), ['#/schedules/1/intervalDays', '#/schedules/1/triggers/0', '#/schedules/2/intervalDays']);
    const unknown = expectProblem(await put([{ procedureKey: 'no-such-procedure', intervalDays: 7 }]), 422);
    assert.deepEqual(unknown.errors!.map((e) => e.pointer), ['#/schedules/0/procedureKey']);
    const neither = expectProblem(await put([{ procedureKey: keys.square }]), 400);
    assert.deepEqual(neither.errors!.map((e) => e.pointer), ['#/schedules/0/intervalDays']);
    const stored = await MachineSchedule.findAll({ where: { machineId: id } });
    assert.deepEqual(stored.map((s) => [s.procedureKey, s.intervalDays]), [[keys.tension, 30]]);
    await setSchedules(id, []);
    assert.equal(await MachineSchedule.count({ where: { machineId: id } }), 0);
  });
});

describe('tag-out', () => {
  test('when a failed record is signed off, then the machine is Tagged out at once with that record, and the admins are told', async () => {
    const id = await registerMachine();
    const failed = await signedThroughApi(id, keys.fails, true);
    const page = await request(app).get(`/api/machines/${id}`).set(as('trainee')).expect(200);
    assert.equal(page.body.status.state, 'tagged_out');
    assert.equal(page.body.status.label, 'Tagged out');
    assert.deepEqual(page.body.status.taggedOutBy.map((c: { recordId: string; procedureKey: string }) => [c.recordId, c.procedureKey]), [[failed, keys.fails]]);
    assert.deepEqual(page.body.history.map((h: { recordId: string; result: string }) => [h.recordId, h.result]), [[failed, 'failed']]);
    const list = await request(app).get('/api/machines').set(as('auditor')).expect(200);
    assert.equal(list.body.find((m: { id: string }) => m.id === id).status.state, 'tagged_out');
    const due = await request(app).get('/api/schedules/due').set(as('competent')).expect(200);
    assert.deepEqual(
      due.body.taggedOut.filter((t: { machine: { id: string } }) => t.machine.id === id).map((t: { recordId: string }) => t.recordId),
      [failed],
    );
    const notice = notices.find((n) => n.recordId === failed);
    assert.ok(notice, 'the tag-out notifier was called');
    assert.equal(notice.machine.id, id);
    assert.equal(notice.procedureTitle, 'Test fails check');
    assert.equal(notice.performer, 'Register Competent');
    assert.equal(notice.machineUrl, `${PUBLIC_URL}/machines/${id}`);
    const stored = await SetupRecord.findByPk(failed);
    assert.equal(stored!.status, 'signed_off');
    assert.equal(stored!.result, 'failed');
  });

  test('when the app is wired as it runs, then the tag-out notice is queued as an e-mail to each workshop admin', async () => {
    const wired = testApp({ PUBLIC_URL });
    const id = await registerMachine();
    const started = await request(wired).post('/api/records').set(as('competent')).send({ machineId: id, procedureKey: keys.fails }).expect(201);
    const failed = await signedThroughApi(id, keys.fails, true, started.body.id as string, wired);
    const mails = await OutboxMessage.findAll({ where: { recordId: failed, kind: 'machine_tagged_out' } });
    assert.ok(mails.some((m) => m.toAddress === admin.email), 'the admin is told');
    const mine = mails.find((m) => m.toAddress === admin.email)!;
    assert.match(mine.subject, /^Tagged out: /);
    assert.ok(mine.textBody.includes(`${PUBLIC_URL}/machines/${id}`));
  });

  test('when a machine is tagged out, then only the failed procedure, isolation and procedures its schedule allows may start', async () => {
    const id = await registerMachine();
    await setSchedules(id, [{ procedureKey: keys.allowed, allowedWhileTaggedOut: true }]);
    await signedThroughApi(id, keys.fails, true);
    const before = await SetupRecord.count({ where: { machineId: id } });
    const refused = expectProblem(await request(app).post('/api/records').set(as('trainee')).send({ machineId: id, procedureKey: keys.other }), 409);
    assert.equal(refused.type, '/problems/machine-tagged-out');
    assert.match(refused.detail, /is tagged out: “Test fails check” failed/);
    assert.deepEqual((refused as unknown as { allowedProcedures: string[] }).allowedProcedures.sort(), [keys.allowed, keys.fails, keys.isolation].sort());
    assert.equal(await SetupRecord.count({ where: { machineId: id } }), before);
    for (const key of [keys.fails, keys.isolation, keys.allowed]) {
      const res = await request(app).post('/api/records').set(as('trainee')).send({ machineId: id, procedureKey: key });
      assert.equal(res.status, 201, `${key}: ${JSON.stringify(res.body)}`);
    }
    assert.equal(await SetupRecord.count({ where: { machineId: id, status: 'underway' } }), 3);
    const page = await request(app).get(`/api/machines/${id}`).set(as('trainee')).expect(200);
    assert.deepEqual([...page.body.startable].sort(), [keys.allowed, keys.fails, keys.isolation].sort());
  });

  test('when a later record of the failed procedure passes and is signed, then the tag-out clears; a pass of another procedure does not', async () => {
    const id = await registerMachine();
    await signedThroughApi(id, keys.fails, true);
    await signedThroughApi(id, keys.isolation, false);
    assert.equal((await request(app).get(`/api/machines/${id}`).set(as('trainee'))).body.status.state, 'tagged_out');
    const passed = await signedThroughApi(id, keys.fails, false);
    const page = await request(app).get(`/api/machines/${id}`).set(as('trainee')).expect(200);
    assert.equal(page.body.status.state, 'ready');
    assert.deepEqual(page.body.status.taggedOutBy, []);
    assert.equal(page.body.startable, 'all');
    assert.equal(page.body.history[0].recordId, passed);
    await request(app).post('/api/records').set(as('trainee')).send({ machineId: id, procedureKey: keys.other }).expect(201);
  });
});

describe('QR labels', () => {
  /** Render a page of the PDF with Debian's pdftoppm and read the QR code in each region with jsQR. */
  async function readLabels(pdf: Buffer, count: number): Promise<string[]> {
    const dir = await mkdtemp(join(tmpdir(), 'sw-labels-'));
    try {
      await writeFile(join(dir, 'labels.pdf'), pdf);
      const dpi = 150;
      await run('pdftoppm', ['-r', String(dpi), '-png', join(dir, 'labels.pdf'), join(dir, 'page')]);
      const pages = (await readdir(dir)).filter((f) => f.endsWith('.png')).sort();
      const found: string[] = [];
      for (let n = 0; n < count; n++) {
        const box = labelBox(n);
        const px = (pt: number) => Math.round((pt * dpi) / 72);
        const { data, info } = await sharp(await readFile(join(dir, pages[box.page]!)))
          .extract({ left: px(box.x), top: px(box.y), width: px(box.width), height: px(box.height) })
          .ensureAlpha()
          .raw()
          .toBuffer({ resolveWithObject: true });
        const code = jsQR(new Uint8ClampedArray(data.buffer, data.byteOffset, data.length), info.width, info.height);
        found.push(code?.data ?? '(no code found)');
      }
      return found;
    } finally {
      await rm(dir, { recursive: true, force: true });
    }
  }

  test('when an admin prints labels, then each QR code reads back as the machine’s page at the public address, beside its name and asset tag', async () => {
    const first = await registerMachine(undefined, { name: 'Label saw one' });
    const second = await registerMachine(undefined, { name: 'Label saw two' });
    const res = await request(app).get(`/api/machines/labels.pdf?ids=${first},${second}`).set(as('admin')).buffer(true).parse((r, cb) => {
      const chunks: Buffer[] = [];
      r.on('data', (c: Buffer) => chunks.push(c));
      r.on('end', () => cb(null, Buffer.concat(chunks)));
    });
    assert.equal(res.status, 200);
    assert.equal(res.headers['content-type'], 'application/pdf');
    const pdf = res.body as Buffer;
    assert.equal(pdf.subarray(0, 5).toString(), '%PDF-');
    assert.deepEqual(await readLabels(pdf, 2), [`${PUBLIC_URL}/machines/${first}`, `${PUBLIC_URL}/machines/${second}`]);
    const dir = await mkdtemp(join(tmpdir(), 'sw-labels-text-'));
    try {
      await writeFile(join(dir, 'l.pdf'), pdf);
      const { stdout } = await run('pdftotext', ['-layout', join(dir, 'l.pdf'), '-']);
      for (const m of [first, second]) {
        const row = (await Machine.findByPk(m))!;
        assert.ok(stdout.includes(row.name), row.name);
        assert.ok(stdout.includes(row.assetTag), row.assetTag);
      }
    } finally {
      await rm(dir, { recursive: true, force: true });
    }
  });

  test('when labels are asked for an unknown machine or a bad id, then it is a problem pointing at ids', async () => {
    const unknown = expectProblem(await request(app).get(`/api/machines/labels.pdf?ids=${randomUUID()}`).set(as('admin')), 422);
    assert.equal(unknown.errors![0]!.pointer, '#/query/ids');
    const bad = expectProblem(await request(app).get('/api/machines/labels.pdf?ids=saw-1').set(as('admin')), 400);
    assert.equal(bad.errors![0]!.pointer, '#/query/ids/0');
  });
});
