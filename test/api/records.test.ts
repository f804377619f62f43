import assert from 'node:assert/strict';
import { randomUUID } from 'node:crypto';
import { before, describe, test } from 'node:test';
import sharp from 'sharp';
import request from 'supertest';
import { DEMO_MACHINES } from '../../api/db/seed';
import { Machine } from '../../api/modules/machines/model';
import { Photo } from '../../api/modules/photos/model';
import { loadProcedurePacks, procedureChecksum } from '../../api/modules/procedures/loader';
import { approve, fixture } from '../support/procedures';
import { ProcedureVersion } from '../../api/modules/procedures/model';
import { SetupRecord, StepEntry } from '../../api/modules/records/model';
import type { Person } from '../../api/modules/people/repository';
import { db, expectProblem, makePerson, PASSWORD, signIn, testApp } from '../support/api';

const app = testApp();
let machineId: string;
let trainee: Person, otherTrainee: Person, competent: Person, auditor: Person;
const tokens: Record<string, string> = {};
const as = (who: string) => ({ authorization: `Bearer ${tokens[who]}` });

before(async () => {
  db();
  machineId = (await Machine.findOne({ where: { assetTag: DEMO_MACHINES[0]!.assetTag } }))!.id;
  trainee = await makePerson(['trainee'], 'Records Trainee');
  otherTrainee = await makePerson(['trainee'], 'Records Other');
  competent = await makePerson(['competent_person'], 'Records Competent');
  auditor = await makePerson(['auditor'], 'Records Auditor');
  for (const [name, p] of Object.entries({ trainee, otherTrainee, competent, auditor })) tokens[name] = (await signIn(app, p.email)).token;
});

async function startRecord(who = 'trainee', key?: string) {
  const procedureKey = key ?? `test-${randomUUID().slice(0, 8)}`;
  if (!key) await approve(fixture(procedureKey));
  const res = await request(app).post('/api/records').set(as(who)).send({ machineId, procedureKey });
  assert.equal(res.status, 201, JSON.stringify(res.body));
  return res.body as { id: string; procedure: { version: number; key: string } };
}

function entry(stepId: string, values: Record<string, unknown>, extra: Record<string, unknown> = {}) {
  return { idempotencyKey: randomUUID(), stepId, values, ...extra };
}

describe('procedure versions', () => {
  test('when a record starts, then it pins the approved version, and a later approval does not move it', async () => {
    const key = `pin-${randomUUID().slice(0, 8)}`;
    await approve(fixture(key, 1));
    const first = await startRecord('trainee', key);
    assert.equal(first.procedure.version, 1);
    await approve(fixture(key, 2, 'Test tension check, revised'));
    const again = await request(app).get(`/api/records/${first.id}`).set(as('trainee')).expect(200);
    assert.equal(again.body.procedure.version, 1);
    assert.equal(again.body.procedureBody.title, 'Test tension check');
    const second = await startRecord('trainee', key);
    assert.equal(second.procedure.version, 2);
    const stored = await SetupRecord.findByPk(first.id);
    const v1 = await ProcedureVersion.findOne({ where: { key, version: 1 } });
    assert.equal(stored!.procedureVersionId, v1!.id);
    assert.equal(v1!.status, 'retired');
  });

  test('when anyone changes or deletes an approved version in SQL, then the database refuses', async () => {
    const key = `frozen-${randomUUID().slice(0, 8)}`;
    const v = await approve(fixture(key));
    const sql = db();
    await assert.rejects(sql.query(`UPDATE procedure_versions SET title = 'edited' WHERE id = :id`, { replacements: { id: v.id } }), /cannot be changed/);
    await assert.rejects(sql.query(`UPDATE procedure_versions SET body = '{}'::jsonb WHERE id = :id`, { replacements: { id: v.id } }), /cannot be changed/);
    await assert.rejects(sql.query(`DELETE FROM procedure_versions WHERE id = :id`, { replacements: { id: v.id } }), /cannot be deleted/);
    await sql.query(`UPDATE procedure_versions SET status = 'retired' WHERE id = :id`, { replacements: { id: v.id } });
    await assert.rejects(sql.query(`UPDATE procedure_versions SET status = 'approved' WHERE id = :id`, { replacements: { id: v.id } }), /cannot be changed/);
    const row = await ProcedureVersion.findByPk(v.id);
    assert.equal(row!.title, 'Test tension check');
  });

  test('when a pack file changes but keeps its version number, then loading stops with a clear message', async () => {
    const key = `pack-${randomUUID().slice(0, 8)}`;
    const body = fixture(key);
    await loadProcedurePacks(db(), [{ file: `test/${key}/v1.json`, body, checksum: procedureChecksum(body) }]);
    const changed = { ...body, title: 'Quietly edited' };
    await assert.rejects(
      loadProcedurePacks(db(), [{ file: `test/${key}/v1.json`, body: changed, checksum: procedureChecksum(changed) }]),
      /has changed since version 1 .* give the changed file a new version number \(v2\.json\)/,
    );
    const rows = await ProcedureVersion.findAll({ where: { key } });
    assert.equal(rows.length, 1);
    assert.equal(rows[0]!.title, 'Test tension check');
  });

  test('when the shipped bandsaw pack is loaded, then every procedure is approved once', async () => {
    const rows = await ProcedureVersion.findAll({ where: { source: 'pack', machineKind: 'horizontal_bandsaw', status: 'approved' } });
    const keys = rows.map((r) => r.key).filter((k) => !/^(test|pin|frozen|pack)-/.test(k));
    assert.equal(new Set(keys).size, keys.length);
  });
});

describe('running a record', () => {
  test('when a trainee saves steps, then they are stored as entered and the record resumes with them on another device', async () => {
    const record = await startRecord();
    const res = await request(app).post(`/api/records/${record.id}/entries`).set(as('trainee')).send(entry('isolate', { lock: 'Lock 7, tag T-12' })).expect(201);
    assert.equal(res.body.outcome, 'done');
    assert.equal(res.body.attempt, 1);
    const elsewhere = testApp();
    const token = (await signIn(elsewhere, trainee.email)).token;
    const resumed = await request(elsewhere).get(`/api/records/${record.id}`).set('authorization', `Bearer ${token}`).expect(200);
    assert.equal(resumed.body.entries.length, 1);
    assert.deepEqual(resumed.body.entries[0].values, { lock: 'Lock 7, tag T-12' });
    const rows = await StepEntry.findAll({ where: { recordId: record.id } });
    assert.equal(rows.length, 1);
    assert.equal(rows[0]!.enteredById, trainee.id);
  });

  test('when a record is read without its procedure, then it answers the same state and entries and no procedure body', async () => {
    const record = await startRecord();
    const saved = await request(app).post(`/api/records/${record.id}/entries`).set(as('trainee')).send(entry('isolate', { lock: 'Lock 8' })).expect(201);
    const full = await request(app).get(`/api/records/${record.id}`).set(as('trainee')).expect(200);
    const lean = await request(app).get(`/api/records/${record.id}?without=procedure`).set(as('trainee')).expect(200);
    assert.equal(lean.body.procedureBody, undefined);
    const { procedureBody, ...state } = full.body;
    assert.ok(procedureBody.steps.length > 0);
    assert.deepEqual(lean.body, state);
    assert.deepEqual(lean.body.entries, [saved.body], 'the entry reads back exactly as it was answered when saved');
    const refused = await request(app).get(`/api/records/${record.id}?without=entries`).set(as('trainee')).expect(400);
    assert.equal(refused.body.errors[0].pointer, '#/query/without');
  });

  test('when the same entry is sent twice (a retry), then it is stored once and the first answer comes back', async () => {
    const record = await startRecord();
    const body = entry('isolate', { lock: 'Lock 3' });
    const first = await request(app).post(`/api/records/${record.id}/entries`).set(as('trainee')).send(body).expect(201);
    const second = await request(app).post(`/api/records/${record.id}/entries`).set(as('trainee')).send(body).expect(200);
    assert.equal(second.body.id, first.body.id);
    const [a, b] = await Promise.all([
      request(app).post(`/api/records/${record.id}/entries`).set(as('trainee')).send({ ...body, idempotencyKey: randomUUID(), values: { lock: 'Lock 4' } }),
      request(app).post(`/api/records/${record.id}/entries`).set(as('trainee')).send({ ...body, idempotencyKey: randomUUID(), values: { lock: 'Lock 5' } }),
    ]);
    assert.deepEqual([a.status, b.status].sort(), [201, 201]);
    const rows = await StepEntry.findAll({ where: { recordId: record.id }, order: [['attempt', 'ASC']] });
    assert.deepEqual(rows.map((r) => r.attempt), [1, 2, 3]);
  });

  test('when the tension reading is 800 kgf of wheel load on a 27 × 0.9 mm blade, then the server works out about 161 MPa and passes it', async () => {
    // ../shared/CHECKS.md, "Blade tension — What a gauge reads matters": 800 kgf wheel load → 400 kgf per strand → 161 MPa.
    const record = await startRecord();
    const res = await request(app).post(`/api/records/${record.id}/entries`).set(as('trainee')).send(entry('tension', { reading: 800 })).expect(201);
    const stress = res.body.evaluation.computed.find((c: { id: string }) => c.id === 'stress');
    assert.ok(Math.abs(stress.value - 161.4) < 0.2, `stress ${stress.value}`);
    assert.equal(stress.unit, 'MPa');
    assert.equal(res.body.outcome, 'done');
  });

  test('when the client claims its own figures and outcome, then the server ignores them and stores its own', async () => {
    const record = await startRecord();
    const lying = entry('tension', { reading: 650 }, {
      correctiveNote: 'Gauge read low; tension raised.',
      outcome: 'done',
      evaluation: { computed: [{ id: 'stress', value: 999 }], outOfLimits: false },
    });
    const res = await request(app).post(`/api/records/${record.id}/entries`).set(as('trainee')).send(lying).expect(201);
    assert.equal(res.body.outcome, 'out_of_limits');
    const row = await StepEntry.findByPk(res.body.id);
    assert.equal(row!.outcome, 'out_of_limits');
    const stress = row!.evaluation.computed.find((c) => c.id === 'stress')!;
    assert.ok(Math.abs((stress.value as number) - 131.2) < 0.2, `stress ${stress.value}`); // 650/800 × 161.4, same formula
    assert.equal(row!.evaluation.inputs[0]!.outcome, 'fail');
  });

  test('when a reading is out of limits without a note, then it is refused and nothing is stored', async () => {
    const record = await startRecord();
    const res = await request(app).post(`/api/records/${record.id}/entries`).set(as('trainee')).send(entry('tension', { reading: 650 }));
    const problem = expectProblem(res, 422);
    assert.equal(problem.errors?.[0]?.pointer, '#/correctiveNote');
    assert.equal(await StepEntry.count({ where: { recordId: record.id } }), 0);
  });

  test('when an out-of-limits reading is noted and re-measured, then both attempts are kept and the latest counts', async () => {
    const record = await startRecord();
    await request(app).post(`/api/records/${record.id}/entries`).set(as('trainee')).send(entry('tension', { reading: 650 }, { correctiveNote: 'Too slack; wound the tension up.' })).expect(201);
    const again = await request(app).post(`/api/records/${record.id}/entries`).set(as('trainee')).send(entry('tension', { reading: 820 })).expect(201);
    assert.equal(again.body.attempt, 2);
    assert.equal(again.body.outcome, 'done');
    const rows = await StepEntry.findAll({ where: { recordId: record.id, stepId: 'tension' }, order: [['attempt', 'ASC']] });
    assert.deepEqual(rows.map((r) => [r.attempt, r.outcome]), [[1, 'out_of_limits'], [2, 'done']]);
    await assert.rejects(db().query(`UPDATE step_entries SET values = '{}'::jsonb WHERE id = :id`, { replacements: { id: rows[0]!.id } }), /kept as entered/);
  });

  test('when values do not fit the step, then the problem points at each one and nothing is stored', async () => {
    const record = await startRecord();
    const res = await request(app).post(`/api/records/${record.id}/entries`).set(as('trainee')).send(entry('tension', { reading: 'lots', extra: 1 }));
    const problem = expectProblem(res, 400);
    assert.deepEqual(problem.errors!.map((e) => e.pointer).sort(), ['#/values/extra', '#/values/reading']);
    const missing = expectProblem(await request(app).post(`/api/records/${record.id}/entries`).set(as('trainee')).send(entry('tension', {})), 422);
    assert.equal(missing.errors?.[0]?.pointer, '#/values/reading');
    assert.equal(await StepEntry.count({ where: { recordId: record.id } }), 0);
  });
});

describe('readings no gauge could give', () => {
  test('when a reading is 1e400 (Infinity once parsed) or 1e308 kgf, then it is refused at #/values/reading and nothing is stored', async () => {
    const record = await startRecord();
    const body = JSON.stringify(entry('tension', { reading: 800 })).replace('"reading":800', '"reading":1e400');
    const infinite = await request(app).post(`/api/records/${record.id}/entries`).set(as('trainee')).set('content-type', 'application/json').send(body);
    assert.equal(expectProblem(infinite, 400).errors?.[0]?.pointer, '#/values/reading');
    const huge = expectProblem(await request(app).post(`/api/records/${record.id}/entries`).set(as('trainee')).send(entry('tension', { reading: 1e308 })), 400);
    assert.equal(huge.errors?.[0]?.pointer, '#/values/reading');
    assert.match(huge.errors?.[0]?.detail ?? '', /beyond any workshop reading/);
    assert.equal(await StepEntry.count({ where: { recordId: record.id } }), 0);
  });

  test('when a reading is an ordinary 800 kgf, then it is stored as typed', async () => {
    const record = await startRecord();
    await request(app).post(`/api/records/${record.id}/entries`).set(as('trainee')).send(entry('tension', { reading: 800 })).expect(201);
    const row = await StepEntry.findOne({ where: { recordId: record.id } });
    assert.equal(row!.values['reading'], 800);
  });
});

describe('witnessing a powered step', () => {
  const powered = (witness?: { email: string; password: string }) => entry('track', { clear: true }, witness ? { witness } : {});

  test('when nobody witnesses it, then a trainee cannot complete it', async () => {
    const record = await startRecord();
    const problem = expectProblem(await request(app).post(`/api/records/${record.id}/entries`).set(as('trainee')).send(powered()), 422);
    assert.equal(problem.title, 'Power on — witness needed');
    assert.equal(await StepEntry.count({ where: { recordId: record.id } }), 0);
  });

  test('when the trainee enters their own credentials, or a wrong password, or a non-competent person, then the witness is refused', async () => {
    const record = await startRecord();
    const post = (w: { email: string; password: string }) => request(app).post(`/api/records/${record.id}/entries`).set(as('trainee')).send(powered(w));
    expectProblem(await post({ email: trainee.email, password: PASSWORD }), 422);
    const wrong = expectProblem(await post({ email: competent.email, password: 'not it' }), 422);
    assert.equal(wrong.errors?.[0]?.pointer, '#/witness/password');
    const role = expectProblem(await post({ email: auditor.email, password: PASSWORD }), 422);
    assert.match(role.detail, /not a competent person/);
    assert.equal(await StepEntry.count({ where: { recordId: record.id } }), 0);
  });

  test('when a competent person witnesses with their own sign-in, then the entry records who and when', async () => {
    const record = await startRecord();
    const res = await request(app).post(`/api/records/${record.id}/entries`).set(as('trainee')).send(powered({ email: competent.email, password: PASSWORD })).expect(201);
    assert.equal(res.body.witnessedBy.id, competent.id);
    const row = await StepEntry.findByPk(res.body.id);
    assert.equal(row!.witnessedById, competent.id);
    assert.ok(row!.witnessedAt instanceof Date);
    assert.equal(row!.enteredById, trainee.id);
  });

  test('when a competent person runs the record themselves, then they may complete the powered step', async () => {
    const record = await startRecord('competent');
    const res = await request(app).post(`/api/records/${record.id}/entries`).set(as('competent')).send(powered()).expect(201);
    assert.equal(res.body.witnessedBy.id, competent.id);
  });
});

describe('photos on a step', () => {
  async function upload(token: string) {
    const jpeg = await sharp({ create: { width: 64, height: 48, channels: 3, background: '#777' } }).jpeg().toBuffer();
    const res = await request(app).post('/api/photos').set('authorization', `Bearer ${token}`).attach('photo', jpeg, 'gauge.jpg');
    assert.equal(res.status, 201, JSON.stringify(res.body));
    return res.body.id as string;
  }

  test('when a step names the trainee own photo, then it is attached to the record; another person’s photo is refused', async () => {
    const record = await startRecord();
    const mine = await upload(tokens['trainee']!);
    const theirs = await upload(tokens['otherTrainee']!);
    expectProblem(await request(app).post(`/api/records/${record.id}/entries`).set(as('trainee')).send(entry('evidence', { shot: [theirs] })), 400);
    assert.equal((await Photo.findByPk(theirs))!.attachedRecordId, null);
    await request(app).post(`/api/records/${record.id}/entries`).set(as('trainee')).send(entry('evidence', { shot: [mine] })).expect(201);
    assert.equal((await Photo.findByPk(mine))!.attachedRecordId, record.id);
  });
});

describe('finishing a record', () => {
  async function doAll(recordId: string, reading: number) {
    const post = (b: object) => request(app).post(`/api/records/${recordId}/entries`).set(as('trainee')).send(b);
    await post(entry('isolate', { lock: 'L1' })).expect(201);
    await post(entry('tension', { reading }, reading < 700 ? { correctiveNote: 'Could not reach range; gauge suspect.' } : {})).expect(201);
    await post(entry('track', { clear: true }, { witness: { email: competent.email, password: PASSWORD } })).expect(201);
    const jpeg = await sharp({ create: { width: 32, height: 32, channels: 3, background: '#333' } }).jpeg().toBuffer();
    const photo = await request(app).post('/api/photos').set(as('trainee')).attach('photo', jpeg, 'p.jpg').expect(201);
    await post(entry('evidence', { shot: [photo.body.id] })).expect(201);
  }

  test('when steps are missing, then finishing is refused and says which', async () => {
    const record = await startRecord();
    const problem = expectProblem(await request(app).post(`/api/records/${record.id}/finish`).set(as('trainee')).send({ password: PASSWORD }), 409);
    assert.match(problem.detail, /Isolate the saw/);
    assert.equal((await SetupRecord.findByPk(record.id))!.status, 'underway');
  });

  test('when every step is done and within limits, then the record is ready for sign-off and passed, and closed to changes', async () => {
    const record = await startRecord();
    await doAll(record.id, 800);
    const res = await request(app).post(`/api/records/${record.id}/finish`).set(as('trainee')).send({ password: PASSWORD }).expect(200);
    assert.equal(res.body.status, 'ready_for_signoff');
    assert.equal(res.body.result, 'passed');
    const stored = await SetupRecord.findByPk(record.id);
    assert.equal(stored!.status, 'ready_for_signoff');
    assert.ok(stored!.finishedAt);
    expectProblem(await request(app).post(`/api/records/${record.id}/entries`).set(as('trainee')).send(entry('isolate', { lock: 'late' })), 409);
  });

  test('when a reading is left out of limits, then finishing needs confirmation and marks the record failed', async () => {
    const record = await startRecord();
    await doAll(record.id, 600);
    expectProblem(await request(app).post(`/api/records/${record.id}/finish`).set(as('trainee')).send({ password: PASSWORD }), 409);
    const res = await request(app).post(`/api/records/${record.id}/finish`).set(as('trainee')).send({ acceptFailed: true, password: PASSWORD }).expect(200);
    assert.equal(res.body.result, 'failed');
    assert.equal((await SetupRecord.findByPk(record.id))!.result, 'failed');
  });
});

describe('who may do what', () => {
  test('when an auditor tries to start a record, then it is a 403 problem', async () => {
    expectProblem(await request(app).post('/api/records').set(as('auditor')).send({ machineId, procedureKey: 'anything' }), 403);
  });

  test('when another trainee reads or writes someone’s record, then it is refused; competent persons and auditors may read it', async () => {
    const record = await startRecord();
    expectProblem(await request(app).get(`/api/records/${record.id}`).set(as('otherTrainee')), 403);
    expectProblem(await request(app).post(`/api/records/${record.id}/entries`).set(as('otherTrainee')).send(entry('isolate', { lock: 'x' })), 403);
    expectProblem(await request(app).post(`/api/records/${record.id}/entries`).set(as('auditor')).send(entry('isolate', { lock: 'x' })), 403);
    await request(app).get(`/api/records/${record.id}`).set(as('competent')).expect(200);
    await request(app).get(`/api/records/${record.id}`).set(as('auditor')).expect(200);
    assert.equal(await StepEntry.count({ where: { recordId: record.id } }), 0);
  });

  test('when a trainee lists records, then only their own come back', async () => {
    const mine = await startRecord();
    await startRecord('otherTrainee');
    const res = await request(app).get('/api/records').set(as('trainee')).expect(200);
    assert.ok(res.body.some((r: { id: string }) => r.id === mine.id));
    assert.ok(res.body.every((r: { startedBy: { id: string } }) => r.startedBy.id === trainee.id));
  });

  test('when nobody is signed in, then records are a 401 problem', async () => {
    expectProblem(await request(app).get('/api/records'), 401);
  });
});

describe('starting offline', () => {
  test('when a record is started with a client-made id twice, then the server accepts it once', async () => {
    const key = `offline-${randomUUID().slice(0, 8)}`;
    await approve(fixture(key));
    const id = randomUUID();
    const first = await request(app).post('/api/records').set(as('trainee')).send({ id, machineId, procedureKey: key }).expect(201);
    const again = await request(app).post('/api/records').set(as('trainee')).send({ id, machineId, procedureKey: key }).expect(200);
    assert.equal(first.body.id, id);
    assert.equal(again.body.id, id);
    assert.equal(await SetupRecord.count({ where: { id } }), 1);
    expectProblem(await request(app).post('/api/records').set(as('otherTrainee')).send({ id, machineId, procedureKey: key }), 409);
  });
});
