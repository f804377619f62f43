import assert from 'node:assert/strict';
import { randomUUID } from 'node:crypto';
import { before, describe, test } from 'node:test';
import request from 'supertest';
import { BladeCutLog, BladeFitting, BladeType } from '../../api/modules/blades/model';
import { currentBlade } from '../../api/modules/blades/service';
import type { Person } from '../../api/modules/people/repository';
import { SetupRecord } from '../../api/modules/records/model';
import { db, expectProblem, makePerson, PASSWORD, signIn, testApp } from '../support/api';
import { freshMachine, RecordMaker } from '../support/records';
import { approve, fixture } from '../support/procedures';

const app = testApp();
let admin: Person, trainee: Person, competent: Person, auditor: Person;
const tokens: Record<string, string> = {};
const as = (who: string) => ({ authorization: `Bearer ${tokens[who]}` });

/** What the demo saw's specification takes (api/db/seed.ts), so the new-blade readings pass. */
const SAW_BLADE = { width: 27, thickness: 0.9, length: 2742 };

before(async () => {
  db();
  admin = await makePerson(['workshop_admin'], 'Blades Admin');
  trainee = await makePerson(['trainee'], 'Blades Trainee');
  competent = await makePerson(['competent_person'], 'Blades Competent');
  auditor = await makePerson(['auditor'], 'Blades Auditor');
  for (const [name, p] of Object.entries({ admin, trainee, competent, auditor })) tokens[name] = (await signIn(app, p.email)).token;
});

/** A blade type on the stock list, by the admin, through the API. */
async function stockType(pitch: string, material: 'bi-metal' | 'carbon', stock: number, length = SAW_BLADE.length) {
  const res = await request(app)
    .post('/api/blades/types')
    .set(as('admin'))
    .send({ widthMm: SAW_BLADE.width, thicknessMm: SAW_BLADE.thickness, lengthMm: length, pitch, material, stock });
  assert.equal(res.status, 201, JSON.stringify(res.body));
  return res.body as { id: string; pitch: string; stock: number };
}

/**
 * The shipped bandsaw pack's blade change ("Removing and fitting a blade", procedures/bandsaw/blade-change/v1.json),
 * run by the trainee through the API with the competent person witnessing the first run; finished, not yet signed.
 */
async function bladeChange(machineId: string, blade: { pitch: string; material: string }, wear: { wear: string; 'wear-note'?: string } = { wear: 'even-wear' }) {
  const started = await request(app).post('/api/records').set(as('trainee')).send({ machineId, procedureKey: 'blade-change' });
  assert.equal(started.status, 201, JSON.stringify(started.body));
  const id = started.body.id as string;
  const post = async (stepId: string, values: object, extra: object = {}) => {
    const res = await request(app).post(`/api/records/${id}/entries`).set(as('trainee')).send({ idempotencyKey: randomUUID(), stepId, values, ...extra });
    assert.equal(res.status, 201, `${stepId}: ${JSON.stringify(res.body)}`);
  };
  const worn = wear.wear !== 'even-wear';
  await post('isolate', { method: 'isolator', 'lock-id': 'Lock 4', 'no-start': true });
  await post('open-up', {});
  await post('remove', {});
  await post('inspect-old', wear, worn ? { correctiveNote: 'Told the competent person; feed to be checked.' } : {});
  await post('clean', { 'clean-sound': true });
  await post('new-blade', { ...SAW_BLADE, pitch: blade.pitch, 'blade-type': blade.material });
  await post('fit', { 'teeth-direction': true, seated: true });
  await post('turn-over', { 'turns-clean': true });
  await post('first-run', { 'runs-clear': true, 'sounds-right': true }, { witness: { email: competent.email, password: PASSWORD } });
  await request(app).post(`/api/records/${id}/finish`).set(as('trainee')).send({ password: PASSWORD, acceptFailed: worn }).expect(200);
  return id;
}

async function signOff(recordId: string) {
  const res = await request(app).post(`/api/records/${recordId}/sign-off`).set(as('competent')).send({ password: PASSWORD });
  assert.equal(res.status, 200, JSON.stringify(res.body));
}

describe('blade types and stock', () => {
  test('when an admin sends a blade type with bad sizes, pitch, material and stock, then each field is named by its pointer and nothing is stored', async () => {
    const before = await BladeType.count();
    const res = await request(app)
      .post('/api/blades/types')
      .set(as('admin'))
      .send({ widthMm: -27, thicknessMm: 'thin', lengthMm: 120, pitch: '10/6', material: 'steel', stock: 1.5 });
    const problem = expectProblem(res, 400);
    const pointers = problem.errors!.map((e) => e.pointer).sort();
    assert.deepEqual(pointers, ['#/lengthMm', '#/material', '#/pitch', '#/stock', '#/thicknessMm', '#/widthMm']);
    assert.match(problem.errors!.find((e) => e.pointer === '#/pitch')!.detail, /coarser first/);
    assert.equal(await BladeType.count(), before);
  });

  test('when an admin adds a blade type, then its pitch is stored in one written form, its sizes to the procedure’s precision, and the same blade again is refused', async () => {
    const res = await request(app)
      .post('/api/blades/types')
      .set(as('admin'))
      .send({ widthMm: 27.04, thicknessMm: 0.904, lengthMm: 3101.4, pitch: ' 6-10 TPI', material: 'bi-metal', stock: 4, note: 'Shelf B2' })
      .expect(201);
    assert.equal(res.body.pitch, '6/10');
    assert.equal(res.body.label, '27 × 0.9 × 3101 mm · 6/10 TPI · Bi-metal');
    const row = await BladeType.findByPk(res.body.id);
    assert.deepEqual(
      { w: row!.widthMm, t: row!.thicknessMm, l: row!.lengthMm, p: row!.pitch, m: row!.material, s: row!.stock, listed: row!.listed, note: row!.note },
      { w: 27, t: 0.9, l: 3101, p: '6/10', m: 'bi-metal', s: 4, listed: true, note: 'Shelf B2' },
    );
    const again = expectProblem(
      await request(app).post('/api/blades/types').set(as('admin')).send({ widthMm: 27, thicknessMm: 0.9, lengthMm: 3101, pitch: '6/10', material: 'bi-metal', stock: 1 }),
      409,
    );
    assert.equal(again.errors?.[0]?.pointer, '#/pitch');
    assert.equal((await BladeType.findByPk(res.body.id))!.stock, 4);
  });

  test('when an admin changes the stock count, then it is stored; a bad count is refused on its field and the count stays', async () => {
    const type = await stockType('3/4', 'bi-metal', 2, 3102);
    const changed = await request(app).patch(`/api/blades/types/${type.id}`).set(as('admin')).send({ stock: 7 }).expect(200);
    assert.equal(changed.body.stock, 7);
    const problem = expectProblem(await request(app).patch(`/api/blades/types/${type.id}`).set(as('admin')).send({ stock: -1 }), 400);
    assert.equal(problem.errors?.[0]?.pointer, '#/stock');
    assert.equal((await BladeType.findByPk(type.id))!.stock, 7);
    expectProblem(await request(app).patch(`/api/blades/types/${randomUUID()}`).set(as('admin')).send({ stock: 1 }), 404);
  });
});

describe('fitting through the blade change', () => {
  test('when a blade change is signed off, then the blade it recorded is fitted to the machine from stock, and not before', async () => {
    const machine = await freshMachine('Fitting saw');
    // 6/10 at this length: the demo stock list (api/db/seed-history.ts) already holds its 4/6 and 3/4.
    const type = await stockType('6/10', 'bi-metal', 3);
    const recordId = await bladeChange(machine.id, { pitch: '6/10', material: 'bi-metal' });
    assert.equal(await BladeFitting.count({ where: { machineId: machine.id } }), 0, 'nothing is fitted until the record is signed off');
    await signOff(recordId);

    const fittings = await BladeFitting.findAll({ where: { machineId: machine.id } });
    assert.equal(fittings.length, 1);
    assert.equal(fittings[0]!.recordId, recordId);
    assert.equal(fittings[0]!.bladeTypeId, type.id);
    assert.equal(fittings[0]!.fittedById, trainee.id);
    assert.equal(fittings[0]!.fromStock, true);
    assert.equal(fittings[0]!.removedAt, null);
    assert.equal((await BladeType.findByPk(type.id))!.stock, 2);

    const res = await request(app).get(`/api/blades/machines/${machine.id}`).set(as('trainee')).expect(200);
    assert.equal(res.body.current.id, fittings[0]!.id);
    assert.equal(res.body.current.bladeType.label, '27 × 0.9 × 2742 mm · 6/10 TPI · Bi-metal');
    assert.equal(res.body.current.fittedBy.displayName, 'Blades Trainee');
    assert.equal((await currentBlade(machine.id))!.id, fittings[0]!.id);
    const types = await request(app).get('/api/blades/types').set(as('auditor')).expect(200);
    assert.equal(types.body.find((t: { id: string }) => t.id === type.id).onSaws >= 1, true);
  });

  test('when the fitted blade is on no stock list, then it is added as an unlisted type with no stock taken, and listing it later keeps that type', async () => {
    const machine = await freshMachine('Unlisted saw');
    const recordId = await bladeChange(machine.id, { pitch: '0.75/1.25 tpi', material: 'carbon' });
    await signOff(recordId);
    const fitting = (await BladeFitting.findOne({ where: { recordId } }))!;
    const type = (await BladeType.findByPk(fitting.bladeTypeId))!;
    assert.deepEqual(
      { p: type.pitch, m: type.material, l: type.lengthMm, listed: type.listed, stock: type.stock, fromStock: fitting.fromStock },
      { p: '0.75/1.25', m: 'carbon', l: 2742, listed: false, stock: 0, fromStock: false },
    );
    const listed = await request(app)
      .post('/api/blades/types')
      .set(as('admin'))
      .send({ widthMm: 27, thicknessMm: 0.9, lengthMm: 2742, pitch: '0.75/1.25', material: 'carbon', stock: 2 })
      .expect(200);
    assert.equal(listed.body.id, type.id);
    const after = (await BladeType.findByPk(type.id))!;
    assert.equal(after.listed, true);
    assert.equal(after.stock, 2);
  });

  test('when the next blade change is signed off, then the old blade comes off with the reason its wear reading gives, and the history lists newest first', async () => {
    const machine = await freshMachine('History saw');
    await stockType('8/12', 'bi-metal', 5);
    const first = await bladeChange(machine.id, { pitch: '8/12', material: 'bi-metal' });
    await signOff(first);
    const second = await bladeChange(machine.id, { pitch: '8/12', material: 'bi-metal' }, { wear: 'teeth-stripped', 'wear-note': 'Six teeth gone near the weld.' });
    await signOff(second);
    assert.equal((await SetupRecord.findByPk(second))!.result, 'failed');

    const old = (await BladeFitting.findOne({ where: { recordId: first } }))!;
    assert.equal(old.removalReason, 'stripped_teeth');
    assert.equal(old.removalNote, 'Teeth missing or stripped. Six teeth gone near the weld.');
    assert.equal(old.removalRecordId, second);
    assert.equal(old.removedById, trainee.id);
    const fresh = (await BladeFitting.findOne({ where: { recordId: second } }))!;
    assert.equal(old.removedAt!.getTime(), fresh.fittedAt.getTime());
    assert.equal(fresh.removedAt, null);

    const res = await request(app).get(`/api/blades/machines/${machine.id}`).set(as('auditor')).expect(200);
    assert.deepEqual(
      res.body.fittings.map((f: { recordId: string }) => f.recordId),
      [second, first],
    );
    assert.equal(res.body.fittings[1].removalReasonLabel, 'Stripped teeth');
    assert.equal(res.body.current.recordId, second);
  });

  test('when a record without a new-blade step is signed off, then no blade is fitted', async () => {
    const key = `blades-nofit-${randomUUID().slice(0, 8)}`;
    await approve(fixture(key));
    const machine = await freshMachine('No fitting saw');
    await new RecordMaker(app, key).signed({ performer: trainee, witness: competent, approver: competent, machineId: machine.id });
    assert.equal(await BladeFitting.count({ where: { machineId: machine.id } }), 0);
    const res = await request(app).get(`/api/blades/machines/${machine.id}`).set(as('trainee')).expect(200);
    assert.equal(res.body.current, null);
    assert.deepEqual(res.body.fittings, []);
  });
});

describe('taking a blade off', () => {
  test('when a competent person takes the blade off with a reason, then it is stored once; a trainee or auditor cannot, and "other" needs a note', async () => {
    const machine = await freshMachine('Removal saw');
    await stockType('10/14', 'bi-metal', 1);
    await signOff(await bladeChange(machine.id, { pitch: '10/14', material: 'bi-metal' }));
    const fitting = (await BladeFitting.findOne({ where: { machineId: machine.id } }))!;
    const url = `/api/blades/fittings/${fitting.id}/removal`;

    expectProblem(await request(app).post(url).set(as('trainee')).send({ reason: 'worn' }), 403);
    expectProblem(await request(app).post(url).set(as('auditor')).send({ reason: 'worn' }), 403);
    const noNote = expectProblem(await request(app).post(url).set(as('competent')).send({ reason: 'other' }), 400);
    assert.deepEqual(noNote.errors!.map((e) => e.pointer), ['#/note']);
    const badReason = expectProblem(await request(app).post(url).set(as('competent')).send({ reason: 'tired' }), 400);
    assert.deepEqual(badReason.errors!.map((e) => e.pointer), ['#/reason']);
    assert.equal((await BladeFitting.findByPk(fitting.id))!.removedAt, null);

    const res = await request(app).post(url).set(as('competent')).send({ reason: 'wrong_pitch', note: 'Job is 8 mm wall tube.' }).expect(200);
    assert.equal(res.body.removalReasonLabel, 'Wrong pitch for the job');
    const stored = (await BladeFitting.findByPk(fitting.id))!;
    assert.equal(stored.removalReason, 'wrong_pitch');
    assert.equal(stored.removalNote, 'Job is 8 mm wall tube.');
    assert.equal(stored.removedById, competent.id);
    assert.equal(stored.removalRecordId, null);
    expectProblem(await request(app).post(url).set(as('admin')).send({ reason: 'worn' }), 409);
    assert.equal((await BladeFitting.findByPk(fitting.id))!.removalReason, 'wrong_pitch');
    assert.equal(await currentBlade(machine.id), null);
  });

  test('when anyone edits a removed fitting or deletes a fitting in SQL, then the database refuses', async () => {
    const machine = await freshMachine('Locked history saw');
    await stockType('2/3', 'bi-metal', 1);
    await signOff(await bladeChange(machine.id, { pitch: '2/3', material: 'bi-metal' }));
    const fitting = (await BladeFitting.findOne({ where: { machineId: machine.id } }))!;
    await request(app).post(`/api/blades/fittings/${fitting.id}/removal`).set(as('admin')).send({ reason: 'broken' }).expect(200);
    const r = { replacements: { id: fitting.id } };
    await assert.rejects(db().query(`UPDATE blade_fittings SET removal_reason = 'worn' WHERE id = :id`, r), /kept as history/);
    await assert.rejects(db().query(`DELETE FROM blade_fittings WHERE id = :id`, r), /cannot be deleted/);
  });
});

describe('cut area and break-in', () => {
  test('when cuts are logged on the blade on the saw, then the area is the maths library’s and the break-in left counts down from the default', async () => {
    const machine = await freshMachine('Break-in saw');
    await stockType('5/8', 'bi-metal', 2);
    await signOff(await bladeChange(machine.id, { pitch: '5/8', material: 'bi-metal' }));
    const fitting = (await BladeFitting.findOne({ where: { machineId: machine.id } }))!;
    const url = `/api/blades/fittings/${fitting.id}/cuts`;

    // Fresh blade: the default break-in area is the top of the makers' range, 100 in² = 645.16 cm²
    // (CHECKS.md "Blade break-in: about half the normal feed for the first 50–100 in² (323–645 cm²)").
    const fresh = await request(app).get(`/api/blades/fittings/${fitting.id}`).set(as('trainee')).expect(200);
    assert.ok(Math.abs(fresh.body.breakIn.breakInArea.in2 - 100) < 1e-9);
    assert.ok(Math.abs(fresh.body.breakIn.breakInArea.cm2 - 645.16) < 1e-9);
    assert.equal(fresh.body.breakIn.feedFraction, 0.5);

    // Round bar: π·D²/4 (common practice: the area of a circle); 50 mm → 19.635 cm² a cut, 10 cuts → 196.35 cm².
    const round = await request(app).post(url).set(as('trainee')).send({ shape: 'round', unit: 'mm', diameter: 50, count: 10 }).expect(201);
    assert.ok(Math.abs(round.body.area.cm2 - 196.35) < 0.01);
    // Tube 4 in OD × 3 in ID (wall ½ in): π/4·(16 − 9) = 5.50 in² a cut (CHECKS.md, Tooth pitch, tube worked example).
    const tube = await request(app).post(url).set(as('competent')).send({ shape: 'tube', unit: 'in', outside: 4, wall: 0.5, count: 2, note: 'Hydraulic tube' }).expect(201);
    assert.ok(Math.abs(tube.body.area.in2 - 2 * 5.4978) < 0.001);

    const stored = await BladeCutLog.findAll({ where: { fittingId: fitting.id }, order: [['loggedAt', 'ASC']] });
    assert.deepEqual(stored.map((c) => [c.shape, c.count, c.sizes]), [
      ['round', 10, { diameter: 50 }],
      ['tube', 2, { outside: 4, wall: 0.5 }],
    ]);
    assert.ok(Math.abs(stored[0]!.areaM2 - 0.019635) < 1e-6);

    const half = await request(app).get(`/api/blades/fittings/${fitting.id}`).set(as('auditor')).expect(200);
    const cutCm2 = 196.35 + 70.94; // 10.9956 in² × 6.4516 cm²/in² (NIST SP 811: 1 in = 2.54 cm exactly)
    assert.ok(Math.abs(half.body.breakIn.areaCut.cm2 - cutCm2) < 0.02);
    assert.ok(Math.abs(half.body.breakIn.remaining.cm2 - (645.16 - cutCm2)) < 0.02);
    assert.equal(half.body.breakIn.complete, false);
    assert.equal(half.body.cuts.length, 2);
    assert.equal(half.body.cuts[0].note, 'Hydraulic tube', 'newest cut first');

    // 100 × 50 mm flat, 8 cuts = 400 cm²: past the break-in area, so normal feed.
    await request(app).post(url).set(as('admin')).send({ shape: 'rectangle', unit: 'mm', width: 100, height: 50, count: 8 }).expect(201);
    const done = await request(app).get(`/api/blades/machines/${machine.id}`).set(as('trainee')).expect(200);
    assert.equal(done.body.current.breakIn.complete, true);
    assert.equal(done.body.current.breakIn.remaining.cm2, 0);
    assert.equal(done.body.current.breakIn.percentDone, 100);
    assert.equal(done.body.current.breakIn.feedFraction, 1);
    assert.equal(done.body.current.cutEntries, 3);
  });

  test('when a cut entry is wrong or the blade is off the saw, then it is refused on its fields and nothing is logged', async () => {
    const machine = await freshMachine('Bad cuts saw');
    await stockType('6', 'carbon', 1);
    await signOff(await bladeChange(machine.id, { pitch: '6', material: 'carbon' }));
    const fitting = (await BladeFitting.findOne({ where: { machineId: machine.id } }))!;
    const url = `/api/blades/fittings/${fitting.id}/cuts`;

    const wall = expectProblem(await request(app).post(url).set(as('trainee')).send({ shape: 'tube', unit: 'mm', outside: 40, wall: 20, count: 1 }), 400);
    assert.deepEqual(wall.errors!.map((e) => e.pointer), ['#/wall']);
    const missing = expectProblem(await request(app).post(url).set(as('trainee')).send({ shape: 'rectangle', unit: 'mm', width: 40, count: 1 }), 400);
    assert.deepEqual(missing.errors!.map((e) => e.pointer), ['#/height']);
    const count = expectProblem(await request(app).post(url).set(as('trainee')).send({ shape: 'round', unit: 'cm', diameter: 40, count: 0 }), 400);
    assert.deepEqual(count.errors!.map((e) => e.pointer).sort(), ['#/count', '#/unit']);
    expectProblem(await request(app).post(url).set(as('auditor')).send({ shape: 'round', unit: 'mm', diameter: 40, count: 1 }), 403);
    assert.equal(await BladeCutLog.count({ where: { fittingId: fitting.id } }), 0);

    await request(app).post(`/api/blades/fittings/${fitting.id}/removal`).set(as('competent')).send({ reason: 'worn' }).expect(200);
    expectProblem(await request(app).post(url).set(as('trainee')).send({ shape: 'round', unit: 'mm', diameter: 40, count: 1 }), 409);
    assert.equal(await BladeCutLog.count({ where: { fittingId: fitting.id } }), 0);
  });
});

describe('who may do what', () => {
  test('when each role calls the blade routes, then everyone reads, only admins keep stock, and signed-out callers are refused', async () => {
    const machine = await freshMachine('Roles saw');
    const type = await stockType('1.4/2', 'bi-metal', 1, 3103);
    for (const who of ['trainee', 'competent', 'auditor', 'admin']) {
      await request(app).get('/api/blades/types').set(as(who)).expect(200);
      await request(app).get('/api/blades/machines').set(as(who)).expect(200);
      await request(app).get(`/api/blades/machines/${machine.id}`).set(as(who)).expect(200);
    }
    const body = { widthMm: 27, thicknessMm: 0.9, lengthMm: 3104, pitch: '4', material: 'carbon', stock: 1 };
    for (const who of ['trainee', 'competent', 'auditor']) {
      expectProblem(await request(app).post('/api/blades/types').set(as(who)).send(body), 403);
      expectProblem(await request(app).patch(`/api/blades/types/${type.id}`).set(as(who)).send({ stock: 9 }), 403);
    }
    assert.equal(await BladeType.count({ where: { lengthMm: 3104 } }), 0);
    assert.equal((await BladeType.findByPk(type.id))!.stock, 1);
    expectProblem(await request(app).get('/api/blades/types'), 401);
    expectProblem(await request(app).get(`/api/blades/machines/${randomUUID()}`).set(as('trainee')), 404);
    const list = await request(app).get('/api/blades/machines').set(as('trainee')).expect(200);
    const mine = list.body.find((m: { machine: { id: string } }) => m.machine.id === machine.id);
    assert.equal(mine.current, null);
  });
});
