import assert from 'node:assert/strict';
import { randomUUID } from 'node:crypto';
import { before, describe, test } from 'node:test';
import pg from 'pg';
import sharp from 'sharp';
import request from 'supertest';
import { DEMO_MACHINES } from '../../api/db/seed';
import { Machine } from '../../api/modules/machines/model';
import type { Person } from '../../api/modules/people/repository';
import { SetupRecord, StepEntry } from '../../api/modules/records/model';
import { AuditEvent, RecordReturn, Signature } from '../../api/modules/signoff/model';
import { db, expectProblem, makePerson, PASSWORD, signIn, testApp } from '../support/api';
import { approve, fixture } from '../support/procedures';

const app = testApp();
let trainee: Person, competent: Person, otherCompetent: Person, auditor: Person;
const tokens: Record<string, string> = {};
const as = (who: string) => ({ authorization: `Bearer ${tokens[who]}` });
let procedureKey: string;

/** A machine of its own, so this file's hash chain is not shared with other files' records. */
async function freshMachine(): Promise<string> {
  const demo = DEMO_MACHINES[0]!;
  const m = await Machine.create({ ...demo, name: `Chain saw ${randomUUID().slice(0, 6)}`, assetTag: `T-${randomUUID().slice(0, 8)}` });
  return m.id;
}

before(async () => {
  db();
  trainee = await makePerson(['trainee'], 'Signoff Trainee');
  competent = await makePerson(['competent_person'], 'Signoff Competent');
  otherCompetent = await makePerson(['competent_person', 'trainee'], 'Signoff Second');
  auditor = await makePerson(['auditor'], 'Signoff Auditor');
  for (const [name, p] of Object.entries({ trainee, competent, otherCompetent, auditor })) tokens[name] = (await signIn(app, p.email)).token;
  procedureKey = `signoff-${randomUUID().slice(0, 8)}`;
  await approve(fixture(procedureKey));
});

/** A record done and finished by `who`, ready for sign-off. */
async function readyRecord(machineId?: string, who = 'trainee', reading = 800): Promise<string> {
  const machine = machineId ?? (await freshMachine());
  const started = await request(app).post('/api/records').set(as(who)).send({ machineId: machine, procedureKey }).expect(201);
  const id = started.body.id as string;
  const post = (stepId: string, values: object, extra: object = {}) =>
    request(app).post(`/api/records/${id}/entries`).set(as(who)).send({ idempotencyKey: randomUUID(), stepId, values, ...extra }).expect(201);
  await post('isolate', { lock: 'L9' });
  await post('tension', { reading }, reading < 700 ? { correctiveNote: 'Gauge suspect, reported.' } : {});
  await post('track', { clear: true }, who === 'trainee' ? { witness: { email: competent.email, password: PASSWORD } } : {});
  const jpeg = await sharp({ create: { width: 40, height: 30, channels: 3, background: '#456' } }).jpeg().toBuffer();
  const photo = await request(app).post('/api/photos').set(as(who)).attach('photo', jpeg, 'g.jpg').expect(201);
  await post('evidence', { shot: [photo.body.id] });
  await request(app).post(`/api/records/${id}/finish`).set(as(who)).send({ password: PASSWORD, acceptFailed: reading < 700 }).expect(200);
  return id;
}

describe('signing off', () => {
  test('when the performer finishes, then they sign it as performed with their password; a wrong password signs nothing', async () => {
    const machine = await freshMachine();
    const started = await request(app).post('/api/records').set(as('trainee')).send({ machineId: machine, procedureKey }).expect(201);
    const problem = expectProblem(await request(app).post(`/api/records/${started.body.id}/finish`).set(as('trainee')).send({ password: 'wrong' }), 409);
    assert.match(problem.detail, /Finish these steps first/);
    const id = await readyRecord(machine);
    const performed = await Signature.findAll({ where: { recordId: id, meaning: 'performed' } });
    assert.equal(performed.length, 1);
    assert.equal(performed[0]!.printedName, 'Signoff Trainee');
    const witnessed = await Signature.findAll({ where: { recordId: id, meaning: 'witnessed' } });
    assert.equal(witnessed.length, 1);
    assert.equal(witnessed[0]!.signerId, competent.id);
    assert.equal(witnessed[0]!.stepId, 'track');
  });

  test('when a trainee or an auditor tries to sign off, then it is a 403 problem and nothing is signed', async () => {
    const id = await readyRecord();
    expectProblem(await request(app).post(`/api/records/${id}/sign-off`).set(as('trainee')).send({ password: PASSWORD }), 403);
    expectProblem(await request(app).post(`/api/records/${id}/sign-off`).set(as('auditor')).send({ password: PASSWORD }), 403);
    assert.equal(await Signature.count({ where: { recordId: id, meaning: 'approved' } }), 0);
  });

  test('when the competent person who performed the record tries to sign it off, then it is refused', async () => {
    const id = await readyRecord(undefined, 'otherCompetent');
    const problem = expectProblem(await request(app).post(`/api/records/${id}/sign-off`).set(as('otherCompetent')).send({ password: PASSWORD }), 403);
    assert.match(problem.detail, /another competent person/);
    assert.equal((await SetupRecord.findByPk(id))!.status, 'ready_for_signoff');
  });

  test('when the password is wrong, then the signature is refused on the password field and nothing changes', async () => {
    const id = await readyRecord();
    const problem = expectProblem(await request(app).post(`/api/records/${id}/sign-off`).set(as('competent')).send({ password: 'not mine' }), 422);
    assert.equal(problem.errors?.[0]?.pointer, '#/password');
    assert.equal((await SetupRecord.findByPk(id))!.status, 'ready_for_signoff');
    assert.equal(await Signature.count({ where: { recordId: id, meaning: 'approved' } }), 0);
  });

  test('when a competent person signs off with their password, then the record is locked with a hash and carries name, time and meaning of every signature', async () => {
    const id = await readyRecord();
    const res = await request(app).post(`/api/records/${id}/sign-off`).set(as('competent')).send({ password: PASSWORD }).expect(200);
    assert.match(res.body.recordHash, /^[0-9a-f]{64}$/);
    const meanings = res.body.signatures.map((s: { meaningLabel: string; printedName: string }) => `${s.meaningLabel}: ${s.printedName}`);
    assert.deepEqual(meanings, ['Witnessed by: Signoff Competent', 'Performed by: Signoff Trainee', 'Approved by: Signoff Competent']);
    for (const s of res.body.signatures) assert.ok(!Number.isNaN(Date.parse(s.signedAt)));
    const row = await SetupRecord.findByPk(id);
    assert.equal(row!.status, 'signed_off');
    assert.equal(row!.recordHash, res.body.recordHash);
    const check = await request(app).get(`/api/records/${id}/check`).set(as('auditor')).expect(200);
    assert.equal(check.body.intact, true, JSON.stringify(check.body.checks));
  });

  test('when the queue is opened, then records waiting appear newest first with their failed readings counted; trainees cannot open it', async () => {
    const passed = await readyRecord();
    const failed = await readyRecord(undefined, 'trainee', 600);
    const res = await request(app).get('/api/sign-off/queue').set(as('competent')).expect(200);
    const ids = res.body.map((r: { id: string }) => r.id);
    assert.ok(ids.indexOf(failed) < ids.indexOf(passed), 'newest first');
    const item = res.body.find((r: { id: string }) => r.id === failed);
    assert.equal(item.outOfLimitsSteps, 1);
    assert.equal(item.result, 'failed');
    assert.equal(item.witnessedSteps, 1);
    expectProblem(await request(app).get('/api/sign-off/queue').set(as('trainee')), 403);
  });
});

describe('sending back', () => {
  test('when a record is sent back, then the trainee sees why, corrects it, and both versions stay in its history', async () => {
    const id = await readyRecord();
    await request(app).post(`/api/records/${id}/send-back`).set(as('competent')).send({ reason: 'Re-measure the tension; the photo shows the gauge at 650.' }).expect(200);
    assert.equal((await SetupRecord.findByPk(id))!.status, 'returned');
    const seen = await request(app).get(`/api/records/${id}/signatures`).set(as('trainee')).expect(200);
    assert.match(seen.body.returns[0].reason, /Re-measure the tension/);
    assert.equal(seen.body.returns[0].returnedBy, 'Signoff Competent');
    await request(app).post(`/api/records/${id}/entries`).set(as('trainee')).send({ idempotencyKey: randomUUID(), stepId: 'tension', values: { reading: 820 } }).expect(201);
    assert.equal((await SetupRecord.findByPk(id))!.status, 'underway');
    await request(app).post(`/api/records/${id}/finish`).set(as('trainee')).send({ password: PASSWORD }).expect(200);
    const attempts = await StepEntry.findAll({ where: { recordId: id, stepId: 'tension' }, order: [['attempt', 'ASC']] });
    assert.deepEqual(attempts.map((a) => a.values['reading']), [800, 820]);
    assert.equal(await RecordReturn.count({ where: { recordId: id } }), 1);
    assert.equal(await Signature.count({ where: { recordId: id, meaning: 'performed' } }), 2);
    await request(app).post(`/api/records/${id}/sign-off`).set(as('competent')).send({ password: PASSWORD }).expect(200);
    const check = await request(app).get(`/api/records/${id}/check`).set(as('auditor')).expect(200);
    assert.equal(check.body.intact, true);
  });
});

describe('a locked record', () => {
  test('when a record is signed off, then every change route refuses it', async () => {
    const id = await readyRecord();
    await request(app).post(`/api/records/${id}/sign-off`).set(as('competent')).send({ password: PASSWORD }).expect(200);
    expectProblem(await request(app).post(`/api/records/${id}/entries`).set(as('trainee')).send({ idempotencyKey: randomUUID(), stepId: 'isolate', values: { lock: 'late' } }), 409);
    expectProblem(await request(app).post(`/api/records/${id}/finish`).set(as('trainee')).send({ password: PASSWORD }), 409);
    expectProblem(await request(app).post(`/api/records/${id}/void`).set(as('trainee')).send({ reason: 'changed my mind' }), 409);
    expectProblem(await request(app).post(`/api/records/${id}/send-back`).set(as('competent')).send({ reason: 'too late now' }), 409);
    expectProblem(await request(app).post(`/api/records/${id}/sign-off`).set(as('competent')).send({ password: PASSWORD }), 409);
  });

  test('when anyone edits or deletes a signed record, its entries or signatures in SQL, then the database refuses', async () => {
    const id = await readyRecord();
    await request(app).post(`/api/records/${id}/sign-off`).set(as('competent')).send({ password: PASSWORD }).expect(200);
    const sql = db();
    const r = { replacements: { id } };
    await assert.rejects(sql.query(`UPDATE setup_records SET result = 'failed' WHERE id = :id`, r), /signed off and locked/);
    await assert.rejects(sql.query(`DELETE FROM setup_records WHERE id = :id`, r), /signed off and locked/);
    await assert.rejects(sql.query(`UPDATE step_entries SET corrective_note = 'x' WHERE record_id = :id`, r), /kept as entered/);
    await assert.rejects(sql.query(`DELETE FROM signatures WHERE record_id = :id`, r), /cannot be changed or deleted/);
    await assert.rejects(
      sql.query(`INSERT INTO signatures (id, record_id, signer_id, meaning, printed_name, signed_at) VALUES (gen_random_uuid(), :id, :s, 'approved', 'Someone', now())`, { replacements: { id, s: competent.id } }),
      /signed off and locked/,
    );
    await assert.rejects(sql.query(`UPDATE audit_events SET action = 'nothing' WHERE record_id = :id`, r), /cannot be changed or deleted/);
    const check = await request(app).get(`/api/records/${id}/check`).set(as('auditor')).expect(200);
    assert.equal(check.body.intact, true);
  });

  test('when a row is altered behind the triggers’ back by the database superuser, then the record check reports it broken', async () => {
    const id = await readyRecord();
    await request(app).post(`/api/records/${id}/sign-off`).set(as('competent')).send({ password: PASSWORD }).expect(200);
    const admin = new pg.Client({ connectionString: process.env['DATABASE_ADMIN_URL'] });
    await admin.connect();
    try {
      await admin.query('BEGIN');
      await admin.query(`SET LOCAL session_replication_role = replica`); // triggers off, for this transaction only
      await admin.query(`UPDATE step_entries SET values = '{"reading": 850}'::jsonb WHERE record_id = $1 AND step_id = 'tension'`, [id]);
      await admin.query('COMMIT');
    } finally {
      await admin.end();
    }
    const check = await request(app).get(`/api/records/${id}/check`).set(as('auditor')).expect(200);
    assert.equal(check.body.intact, false);
    const content = check.body.checks.find((c: { name: string }) => c.name === 'Content matches its hash');
    assert.equal(content.ok, false);
    assert.notEqual(check.body.computedHash, check.body.storedHash);
  });

  test('when two records of one machine are signed, then the second links to the first and both check intact', async () => {
    const machine = await freshMachine();
    const first = await readyRecord(machine);
    const second = await readyRecord(machine);
    const a = await request(app).post(`/api/records/${first}/sign-off`).set(as('competent')).send({ password: PASSWORD }).expect(200);
    const b = await request(app).post(`/api/records/${second}/sign-off`).set(as('competent')).send({ password: PASSWORD }).expect(200);
    assert.equal(a.body.previousHash, null);
    assert.equal(b.body.previousHash, a.body.recordHash);
    for (const id of [first, second]) {
      const check = await request(app).get(`/api/records/${id}/check`).set(as('auditor')).expect(200);
      assert.equal(check.body.intact, true, JSON.stringify(check.body.checks));
    }
  });

  test('when a correction is needed after sign-off, then it is a signed addendum and the record itself stays as signed', async () => {
    const id = await readyRecord();
    const signed = await request(app).post(`/api/records/${id}/sign-off`).set(as('competent')).send({ password: PASSWORD }).expect(200);
    expectProblem(await request(app).post(`/api/records/${id}/addenda`).set(as('competent')).send({ text: 'Lock number was L19, not L9.', password: 'nope' }), 422);
    const add = await request(app).post(`/api/records/${id}/addenda`).set(as('competent')).send({ text: 'Lock number was L19, not L9.', password: PASSWORD }).expect(201);
    assert.match(add.body.addendumHash, /^[0-9a-f]{64}$/);
    expectProblem(await request(app).post(`/api/records/${id}/addenda`).set(as('trainee')).send({ text: 'Mine too', password: PASSWORD }), 403);
    const detail = await request(app).get(`/api/records/${id}/signatures`).set(as('auditor')).expect(200);
    assert.equal(detail.body.addenda.length, 1);
    assert.equal(detail.body.recordHash, signed.body.recordHash);
    const check = await request(app).get(`/api/records/${id}/check`).set(as('auditor')).expect(200);
    assert.equal(check.body.intact, true);
  });
});

describe('the audit trail', () => {
  test('when a record goes from start to sign-off, then each act is in its audit trail, in order', async () => {
    const id = await readyRecord();
    await request(app).post(`/api/records/${id}/sign-off`).set(as('competent')).send({ password: PASSWORD }).expect(200);
    const res = await request(app).get(`/api/records/${id}/audit`).set(as('auditor')).expect(200);
    const actions = res.body.map((e: { action: string }) => e.action);
    assert.equal(actions[0], 'record.started');
    for (const a of ['step.saved', 'step.witnessed', 'record.finished', 'record.signed_off']) assert.ok(actions.includes(a), a);
    assert.ok(actions.indexOf('record.finished') < actions.indexOf('record.signed_off'));
    assert.equal(await AuditEvent.count({ where: { recordId: id, action: 'step.saved' } }), 4);
    expectProblem(await request(app).get(`/api/records/${id}/audit`).set(as('trainee')), 403);
  });
});
