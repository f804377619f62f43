import assert from 'node:assert/strict';
import { randomUUID } from 'node:crypto';
import { before, describe, test } from 'node:test';
import request from 'supertest';
import { createApp } from '../../api/app';
import { MATRIX_CSV_COLUMNS } from '../../api/contracts/competencies';
import { createLogger } from '../../api/lib/logger';
import { Authorisation } from '../../api/modules/competencies/model';
import { listExpiringAuthorisations } from '../../api/modules/competencies/service';
import type { Person } from '../../api/modules/people/repository';
import { SetupRecord } from '../../api/modules/records/model';
import { db, expectProblem, makePerson, ownThrottles, PASSWORD, signIn, testApp, testConfig } from '../support/api';
import { approve, fixture } from '../support/procedures';
import { freshMachine, RecordMaker } from '../support/records';

const app = testApp();
const TZ = testConfig().WORKSHOP_TIME_ZONE;
/** A calendar day (YYYY-MM-DD) in the workshop's time zone, `days` after `from`. */
const day = (from: Date, days = 0) =>
  new Intl.DateTimeFormat('en-CA', { timeZone: TZ, year: 'numeric', month: '2-digit', day: '2-digit' }).format(new Date(from.getTime() + days * 86_400_000));

// A second app on a fixed clock, for judging expiry against a known "today".
const FIXED = new Date('2027-03-10T12:00:00Z');
const fixedApp = createApp({ config: testConfig(), sequelize: db(), logger: createLogger('silent'), now: () => FIXED, throttleNamespace: ownThrottles() });

let trainee: Person, otherTrainee: Person, competent: Person, secondCompetent: Person, admin: Person, auditor: Person;
const tokens: Record<string, string> = {};
const as = (who: string) => ({ authorization: `Bearer ${tokens[who]}` });
let procedureKey: string, otherKey: string;
let maker: RecordMaker;
const TITLE = `Competency check ${randomUUID().slice(0, 6)}`;

before(async () => {
  db();
  trainee = await makePerson(['trainee'], 'Comp Trainee');
  otherTrainee = await makePerson(['trainee'], 'Comp Second Trainee');
  competent = await makePerson(['competent_person'], 'Comp Competent');
  secondCompetent = await makePerson(['competent_person', 'trainee'], 'Comp Second Competent');
  admin = await makePerson(['workshop_admin'], 'Comp Admin');
  auditor = await makePerson(['auditor'], 'Comp Auditor');
  for (const [name, p] of Object.entries({ trainee, otherTrainee, competent, secondCompetent, admin, auditor })) tokens[name] = (await signIn(app, p.email)).token;
  procedureKey = `comp-${randomUUID().slice(0, 8)}`;
  otherKey = `comp-other-${randomUUID().slice(0, 8)}`;
  await approve(fixture(procedureKey, 1, TITLE));
  await approve(fixture(otherKey, 1, `${TITLE} (other)`));
  maker = new RecordMaker(app, procedureKey);
});

type Matrix = {
  today: string;
  procedures: { key: string; title: string }[];
  rows: { person: { id: string; displayName: string; roles: string[] }; cells: Record<string, { witnessedRuns: number; signedRuns: number; lastSignedAt: string | null; authorisation: null | { id: string; state: string; daysLeft: number; expiresOn: string; grantedBy: { displayName: string } } }> }[];
};
const cellOf = (m: Matrix, personId: string, key: string) => m.rows.find((r) => r.person.id === personId)?.cells[key];

describe('run counts', () => {
  test('when a trainee’s records are witnessed and signed, then the matrix counts witnessed and signed runs from the stored records; voided ones count for nothing', async () => {
    const signed = await maker.signed({ performer: trainee, witness: competent, approver: competent });
    await maker.ready({ performer: trainee, witness: competent }); // witnessed, waiting for sign-off
    // A witnessed run, then voided: it counts for nothing.
    const machine = await freshMachine('Voided run saw');
    const started = await request(app).post('/api/records').set(as('trainee')).send({ machineId: machine.id, procedureKey }).expect(201);
    const post = (stepId: string, values: object, extra: object = {}) =>
      request(app).post(`/api/records/${started.body.id}/entries`).set(as('trainee')).send({ idempotencyKey: randomUUID(), stepId, values, ...extra }).expect(201);
    await post('isolate', { lock: 'L1' });
    await post('tension', { reading: 800 });
    await post('track', { clear: true }, { witness: { email: competent.email, password: PASSWORD } });
    await request(app).post(`/api/records/${started.body.id}/void`).set(as('trainee')).send({ reason: 'Wrong saw chosen.' }).expect(200);
    // A competent person's own run, witnessed by themselves and signed by another: signed, but not a witnessed run.
    await maker.signed({ performer: secondCompetent, witness: secondCompetent, approver: competent });

    const res = await request(app).get('/api/competencies/matrix').set(as('competent')).expect(200);
    const m = res.body as Matrix;
    assert.ok(m.procedures.some((p) => p.key === procedureKey && p.title === TITLE));
    const mine = cellOf(m, trainee.id, procedureKey)!;
    const signedAt = (await SetupRecord.findByPk(signed))!.signedAt!;
    assert.deepEqual({ w: mine.witnessedRuns, s: mine.signedRuns, at: mine.lastSignedAt }, { w: 2, s: 1, at: signedAt.toISOString() });
    const stored = await SetupRecord.count({ where: { startedById: trainee.id } });
    assert.equal(stored, 3, 'three records stored, one of them voided');
    const theirs = cellOf(m, secondCompetent.id, procedureKey)!;
    assert.deepEqual({ w: theirs.witnessedRuns, s: theirs.signedRuns }, { w: 0, s: 1 });
    assert.equal(cellOf(m, otherTrainee.id, procedureKey), undefined, 'no runs, no authorisation: an empty cell');
    assert.ok(m.rows.some((r) => r.person.id === otherTrainee.id), 'everyone who runs procedures has a row');
    assert.ok(!m.rows.some((r) => r.person.id === auditor.id), 'auditors do not run procedures');
  });
});

describe('authorisations', () => {
  test('when a competent person authorises a trainee with their password, then who, when, until and why are stored and shown in the matrix', async () => {
    const expiresOn = day(new Date(), 365);
    const res = await request(app)
      .post('/api/competencies/authorisations')
      .set(as('competent'))
      .send({ personId: trainee.id, procedureKey, expiresOn, note: 'Three witnessed runs, all within limits.', password: PASSWORD })
      .expect(201);
    assert.equal(res.body.state, 'current');
    assert.equal(res.body.grantedBy.displayName, 'Comp Competent');
    const row = (await Authorisation.findByPk(res.body.id))!;
    assert.deepEqual(
      { person: row.personId, key: row.procedureKey, by: row.grantedById, until: row.expiresOn, note: row.note, ended: row.endedAt },
      { person: trainee.id, key: procedureKey, by: competent.id, until: expiresOn, note: 'Three witnessed runs, all within limits.', ended: null },
    );
    assert.ok(Math.abs(row.grantedAt.getTime() - Date.now()) < 60_000);
    const m = (await request(app).get('/api/competencies/matrix').set(as('auditor')).expect(200)).body as Matrix;
    const a = cellOf(m, trainee.id, procedureKey)!.authorisation!;
    assert.deepEqual({ id: a.id, state: a.state, expiresOn: a.expiresOn, by: a.grantedBy.displayName }, { id: row.id, state: 'current', expiresOn, by: 'Comp Competent' });
  });

  test('when the grant breaks a rule, then it is refused on the field concerned and nothing is stored', async () => {
    const before = await Authorisation.count();
    const send = (who: string, body: object) => request(app).post('/api/competencies/authorisations').set(as(who)).send(body);
    const good = { personId: otherTrainee.id, procedureKey, expiresOn: day(new Date(), 200), password: PASSWORD };

    const self = expectProblem(await send('secondCompetent', { ...good, personId: secondCompetent.id }), 422);
    assert.deepEqual(self.errors!.map((e) => e.pointer), ['#/personId']);
    assert.match(self.detail, /Another competent person/);
    const today = expectProblem(await send('competent', { ...good, expiresOn: day(new Date()) }), 400);
    assert.deepEqual(today.errors!.map((e) => e.pointer), ['#/expiresOn']);
    const farOff = expectProblem(await send('competent', { ...good, expiresOn: day(new Date(), 365 * 6) }), 400);
    assert.deepEqual(farOff.errors!.map((e) => e.pointer), ['#/expiresOn']);
    const password = expectProblem(await send('competent', { ...good, password: 'not mine' }), 422);
    assert.deepEqual(password.errors!.map((e) => e.pointer), ['#/password']);
    const procedure = expectProblem(await send('competent', { ...good, procedureKey: 'no-such-procedure' }), 422);
    assert.deepEqual(procedure.errors!.map((e) => e.pointer), ['#/procedureKey']);
    const notRunner = expectProblem(await send('competent', { ...good, personId: auditor.id }), 422);
    assert.deepEqual(notRunner.errors!.map((e) => e.pointer), ['#/personId']);
    const shape = expectProblem(await send('competent', { personId: 'someone', expiresOn: '31/12/2027' }), 400);
    assert.deepEqual(shape.errors!.map((e) => e.pointer).sort(), ['#/expiresOn', '#/password', '#/personId', '#/procedureKey']);
    for (const who of ['trainee', 'admin', 'auditor']) expectProblem(await send(who, good), 403);

    assert.equal(await Authorisation.count(), before);
    await assert.rejects(
      Authorisation.create({ personId: competent.id, procedureKey, grantedById: competent.id, grantedAt: new Date(), expiresOn: day(new Date(), 30), note: null }),
      /competency_authorisations_not_self/,
      'the database refuses a self-authorisation too',
    );
  });

  test('when an authorisation is renewed and later revoked, then both stay in the history with how and why they ended', async () => {
    const url = '/api/competencies/authorisations';
    const first = await request(app).post(url).set(as('competent')).send({ personId: otherTrainee.id, procedureKey: otherKey, expiresOn: day(new Date(), 90), password: PASSWORD }).expect(201);
    const second = await request(app)
      .post(url)
      .set(as('secondCompetent'))
      .send({ personId: otherTrainee.id, procedureKey: otherKey, expiresOn: day(new Date(), 400), note: 'Refresher done.', password: PASSWORD })
      .expect(201);
    const renewed = (await Authorisation.findByPk(first.body.id))!;
    assert.equal(renewed.endKind, 'renewed');
    assert.equal(renewed.endedById, secondCompetent.id);
    assert.equal(await Authorisation.count({ where: { personId: otherTrainee.id, procedureKey: otherKey, endedAt: null } }), 1);

    expectProblem(await request(app).post(`${url}/${second.body.id}/revoke`).set(as('trainee')).send({ reason: 'I want to stop.' }), 403);
    expectProblem(await request(app).post(`${url}/${second.body.id}/revoke`).set(as('admin')).send({ reason: 'no' }), 400);
    const revoked = await request(app).post(`${url}/${second.body.id}/revoke`).set(as('admin')).send({ reason: 'Moved to the paint shop.' }).expect(200);
    assert.equal(revoked.body.endKind, 'revoked');
    assert.equal(revoked.body.endedBy.displayName, 'Comp Admin');
    expectProblem(await request(app).post(`${url}/${second.body.id}/revoke`).set(as('competent')).send({ reason: 'Moved to the paint shop.' }), 409);

    const stored = await Authorisation.findAll({ where: { personId: otherTrainee.id, procedureKey: otherKey }, order: [['grantedAt', 'ASC']] });
    assert.deepEqual(stored.map((a) => [a.endKind, a.endReason]), [
      ['renewed', `Renewed until ${day(new Date(), 400)}.`],
      ['revoked', 'Moved to the paint shop.'],
    ]);
    const history = await request(app).get(url).query({ personId: otherTrainee.id, procedureKey: otherKey }).set(as('auditor')).expect(200);
    assert.deepEqual(history.body.map((a: { id: string }) => a.id), [second.body.id, first.body.id], 'newest first');
    const m = (await request(app).get('/api/competencies/matrix').set(as('competent')).expect(200)).body as Matrix;
    assert.equal(cellOf(m, otherTrainee.id, otherKey)?.authorisation ?? null, null);
    await assert.rejects(db().query('DELETE FROM competency_authorisations WHERE id = :id', { replacements: { id: first.body.id } }), /cannot be deleted/);
    await assert.rejects(db().query(`UPDATE competency_authorisations SET expires_on = '2099-01-01' WHERE id = :id`, { replacements: { id: first.body.id } }), /kept as history/);
  });
});

describe('expiry', () => {
  test('when authorisations end within 30 days, then the matrix marks them expiring or expired and the reminder list holds the ones still valid, soonest first', async () => {
    const person = await makePerson(['trainee'], 'Comp Expiry Trainee');
    const cpToken = (await signIn(fixedApp, competent.email)).token;
    const today = '2027-03-10';
    const grant = (key: string, expiresOn: string) =>
      request(fixedApp).post('/api/competencies/authorisations').set({ authorization: `Bearer ${cpToken}` }).send({ personId: person.id, procedureKey: key, expiresOn, password: PASSWORD });
    const keys = [] as string[];
    for (let i = 0; i < 4; i++) {
      const key = `comp-exp-${i}-${randomUUID().slice(0, 6)}`;
      await approve(fixture(key, 1, `Expiry check ${i}`));
      keys.push(key);
    }
    await grant(keys[0]!, '2027-03-20').expect(201); // 10 days left
    await grant(keys[1]!, '2027-04-09').expect(201); // 30 days left: still inside the window
    await grant(keys[2]!, '2027-04-10').expect(201); // 31 days left
    expectProblem(await grant(keys[3]!, today), 400);
    // Lapsed yesterday: written as it would stand after time passed.
    await Authorisation.create({ personId: person.id, procedureKey: keys[3]!, grantedById: competent.id, grantedAt: new Date('2026-03-09T09:00:00Z'), expiresOn: '2027-03-09', note: null });

    const m = (await request(fixedApp).get('/api/competencies/matrix').set({ authorization: `Bearer ${cpToken}` }).expect(200)).body as Matrix;
    assert.equal(m.today, today);
    const states = keys.map((k) => {
      const a = cellOf(m, person.id, k)!.authorisation!;
      return [a.state, a.daysLeft];
    });
    assert.deepEqual(states, [
      ['expiring', 10],
      ['expiring', 30],
      ['current', 31],
      ['expired', -1],
    ]);

    const soon = (await listExpiringAuthorisations(db(), today)).filter((a) => a.person.id === person.id);
    assert.deepEqual(soon.map((a) => [a.procedureKey, a.expiresOn, a.personEmail]), [
      [keys[0], '2027-03-20', person.email],
      [keys[1], '2027-04-09', person.email],
    ]);
    const api = await request(fixedApp).get('/api/competencies/expiring').set({ authorization: `Bearer ${cpToken}` }).expect(200);
    assert.deepEqual(
      api.body.filter((a: { person: { id: string } }) => a.person.id === person.id).map((a: { expiresOn: string }) => a.expiresOn),
      ['2027-03-20', '2027-04-09'],
    );
    const week = await request(fixedApp).get('/api/competencies/expiring?withinDays=14').set({ authorization: `Bearer ${cpToken}` }).expect(200);
    assert.deepEqual(week.body.filter((a: { person: { id: string } }) => a.person.id === person.id).map((a: { expiresOn: string }) => a.expiresOn), ['2027-03-20']);
    expectProblem(await request(fixedApp).get('/api/competencies/expiring?withinDays=soon').set({ authorization: `Bearer ${cpToken}` }), 400);
  });
});

describe('CSV export', () => {
  test('when the matrix is exported, then the CSV has the header row and one line per person and procedure with their counts and authorisation', async () => {
    const odd = await makePerson(['trainee'], '=Formula, "Quoted" Trainee');
    const expiresOn = day(new Date(), 120);
    await request(app)
      .post('/api/competencies/authorisations')
      .set(as('competent'))
      .send({ personId: odd.id, procedureKey, expiresOn, note: 'Watched twice, "good".', password: PASSWORD })
      .expect(201);
    const res = await request(app).get('/api/competencies/matrix.csv').set(as('auditor')).expect(200);
    assert.match(String(res.headers['content-type']), /^text\/csv; charset=utf-8/);
    assert.equal(res.headers['content-disposition'], `attachment; filename=competency-matrix-${day(new Date())}.csv`);
    const lines = res.text.split('\r\n');
    assert.equal(lines.at(-1), '', 'ends with a line break');
    assert.equal(lines[0], MATRIX_CSV_COLUMNS.join(','));
    assert.equal(lines[0], 'Person,Email,Roles,Procedure,Procedure key,Witnessed runs,Signed runs,Last signed run,Authorisation,Granted by,Granted on,Expires on,Note');

    const m = (await request(app).get('/api/competencies/matrix').set(as('auditor')).expect(200)).body as Matrix;
    assert.equal(lines.length - 2, m.rows.length * m.procedures.length, 'one line per person and procedure');

    const cell = cellOf(m, trainee.id, procedureKey)!;
    const lastSigned = day(new Date(cell.lastSignedAt!));
    const authorisation = (await Authorisation.findOne({ where: { personId: trainee.id, procedureKey, endedAt: null } }))!;
    assert.ok(
      lines.includes(`Comp Trainee,${trainee.email},Trainee,${TITLE},${procedureKey},2,1,${lastSigned},Authorised,Comp Competent,${day(authorisation.grantedAt)},${authorisation.expiresOn},"Three witnessed runs, all within limits."`),
      lines.filter((l) => l.startsWith('Comp Trainee,')).join('\n'),
    );
    assert.ok(lines.includes(`Comp Second Trainee,${otherTrainee.email},Trainee,${TITLE},${procedureKey},0,0,,Not authorised,,,,`));
    // A spreadsheet must not read a name as a formula; quotes and commas are escaped (RFC 4180).
    const oddLine = lines.find((l) => l.includes(odd.email) && l.includes(`,${procedureKey},`));
    assert.equal(oddLine, `"'=Formula, ""Quoted"" Trainee",${odd.email},Trainee,${TITLE},${procedureKey},0,0,,Authorised,Comp Competent,${day(new Date())},${expiresOn},"Watched twice, ""good""."`);
  });
});

describe('who may see and change competencies', () => {
  test('when each role calls the competency routes, then competent persons, admins and auditors read, only competent persons grant, and trainees see nothing', async () => {
    for (const who of ['competent', 'admin', 'auditor']) {
      await request(app).get('/api/competencies/matrix').set(as(who)).expect(200);
      await request(app).get('/api/competencies/matrix.csv').set(as(who)).expect(200);
      await request(app).get('/api/competencies/authorisations').set(as(who)).expect(200);
      await request(app).get('/api/competencies/expiring').set(as(who)).expect(200);
    }
    for (const path of ['matrix', 'matrix.csv', 'authorisations', 'expiring']) {
      expectProblem(await request(app).get(`/api/competencies/${path}`).set(as('trainee')), 403);
      expectProblem(await request(app).get(`/api/competencies/${path}`), 401);
    }
    const before = await Authorisation.count();
    expectProblem(await request(app).post(`/api/competencies/authorisations/${randomUUID()}/revoke`).set(as('auditor')).send({ reason: 'Not allowed to.' }), 403);
    expectProblem(await request(app).post(`/api/competencies/authorisations/${randomUUID()}/revoke`).set(as('competent')).send({ reason: 'There is none.' }), 404);
    assert.equal(await Authorisation.count(), before);
  });
});
