import assert from 'node:assert/strict';
import { randomUUID } from 'node:crypto';
import { before, describe, test } from 'node:test';
import request from 'supertest';
import { DEMO_MACHINES } from '../../api/db/seed';
import { Machine } from '../../api/modules/machines/model';
import { loadProcedurePacks, procedureChecksum } from '../../api/modules/procedures/loader';
import { ProcedureVersion } from '../../api/modules/procedures/model';
import { SetupRecord } from '../../api/modules/records/model';
import type { Person } from '../../api/modules/people/repository';
import type { ProcedureDiff } from '../../procedures/diff';
import { procedureSchema, type Procedure } from '../../procedures/schema';
import { db, expectProblem, makePerson, signIn, testApp } from '../support/api';

/** A small procedure of our own: an isolation step, a reading with a worked-out stress, a powered check. */
function fixture(key: string, version = 1): Procedure {
  return procedureSchema.parse({
    key,
    version,
    title: 'Test tension check',
    intendedUse: 'Checking the procedure library in tests.',
    scope: 'Test machines only.',
    machineKind: 'horizontal_bandsaw',
    hazards: ['Sharp blade'],
    steps: [
      { id: 'isolate', title: 'Isolate the saw', kind: 'isolation', instruction: 'Isolate it.', inputs: [{ id: 'lock', type: 'text', label: 'Lock number' }] },
      {
        id: 'tension',
        title: 'Read the tension gauge',
        kind: 'reading',
        instruction: 'Read the gauge.',
        inputs: [{ id: 'reading', type: 'number', label: 'Gauge reading', unit: 'kgf', decimals: 0, limits: { min: 700, max: 900 } }],
        computed: [
          {
            id: 'stress',
            label: 'Stress in one strand',
            fn: 'bladeStress',
            args: { force: { $input: 'reading' }, reads: { $spec: 'tensionReads' }, width: { $spec: 'bladeWidthMm', unit: 'mm' }, thickness: { $spec: 'bladeThicknessMm', unit: 'mm' } },
            output: 'stress',
            unit: 'MPa',
            decimals: 1,
          },
        ],
      },
      { id: 'track', title: 'Track under power', kind: 'check', powered: true, instruction: 'Run it and watch.', inputs: [{ id: 'clear', type: 'yesno', label: 'Blade runs clear of the flange', expected: true }] },
    ],
  });
}

/** Store a version as the pack loader would (approved, from a file). */
async function stored(body: Procedure, status: 'approved' | 'retired' = 'approved') {
  return ProcedureVersion.create({
    key: body.key,
    version: body.version,
    title: body.title,
    machineKind: body.machineKind,
    status,
    body,
    checksum: procedureChecksum(body),
    source: 'pack',
    approvedAt: new Date(),
  });
}

const app = testApp();
let machineId: string;
let admin: Person, otherAdmin: Person, competent: Person, auditor: Person, trainee: Person;
const tokens: Record<string, string> = {};
const as = (who: string) => ({ authorization: `Bearer ${tokens[who]}` });
const newKey = (prefix = 'lib') => `${prefix}-${randomUUID().slice(0, 8)}`;

before(async () => {
  db();
  machineId = (await Machine.findOne({ where: { assetTag: DEMO_MACHINES[0]!.assetTag } }))!.id;
  admin = await makePerson(['workshop_admin'], 'Library Admin');
  otherAdmin = await makePerson(['workshop_admin'], 'Library Second Admin');
  competent = await makePerson(['competent_person'], 'Library Competent');
  auditor = await makePerson(['auditor'], 'Library Auditor');
  trainee = await makePerson(['trainee'], 'Library Trainee');
  for (const [name, p] of Object.entries({ admin, otherAdmin, competent, auditor, trainee })) tokens[name] = (await signIn(app, p.email)).token;
});

/** A procedure with an approved v1 and an open draft v2 written by the admin. */
async function withDraft(key = newKey()) {
  await stored(fixture(key, 1));
  const res = await request(app).post(`/api/procedures/${key}/drafts`).set(as('admin')).send({});
  assert.equal(res.status, 201, JSON.stringify(res.body));
  return { key, draft: res.body as { version: number; body: Procedure } };
}

/** The draft's body with a change made to it. */
function edited(body: Procedure, change: (b: Procedure) => void): Procedure {
  const copy = structuredClone(body);
  change(copy);
  return copy;
}

describe('the procedure library', () => {
  test('when a workshop admin lists every version, then drafts, approved and retired versions come with who wrote and approved them', async () => {
    const key = newKey();
    await stored(fixture(key, 1), 'retired');
    await stored(fixture(key, 2));
    const draft = await request(app).post(`/api/procedures/${key}/drafts`).set(as('admin')).send({}).expect(201);
    assert.equal(draft.body.version, 3);

    const res = await request(app).get('/api/procedures').query({ all: '1' }).set(as('admin')).expect(200);
    const mine = (res.body as { key: string; version: number; status: string; author: { displayName: string } | null; source: string }[]).filter((v) => v.key === key);
    assert.deepEqual(mine.map((v) => [v.version, v.status, v.source]), [[3, 'draft', 'editor'], [2, 'approved', 'pack'], [1, 'retired', 'pack']]);
    assert.equal(mine[0]!.author?.displayName, 'Library Admin');
    assert.equal(mine[1]!.author, null);

    const one = await request(app).get(`/api/procedures/${key}/versions`).set(as('auditor')).expect(200);
    assert.deepEqual(one.body.map((v: { version: number }) => v.version), [3, 2, 1]);
    const rows = await ProcedureVersion.findAll({ where: { key }, order: [['version', 'ASC']] });
    assert.deepEqual(rows.map((r) => r.status), ['retired', 'approved', 'draft']);
  });

  test('when a trainee asks for every version or for a draft, then they see approved versions only', async () => {
    const { key, draft } = await withDraft();
    const list = await request(app).get('/api/procedures').query({ all: '1' }).set(as('trainee')).expect(200);
    const mine = (list.body as { key: string; status: string }[]).filter((v) => v.key === key);
    assert.deepEqual(mine.map((v) => v.status), ['approved']);
    const versions = await request(app).get(`/api/procedures/${key}/versions`).set(as('trainee')).expect(200);
    assert.deepEqual(versions.body.map((v: { version: number }) => v.version), [1]);
    expectProblem(await request(app).get(`/api/procedures/${key}/versions/${draft.version}`).set(as('trainee')), 404);
    await request(app).get(`/api/procedures/${key}/versions/1`).set(as('trainee')).expect(200);
    await request(app).get(`/api/procedures/${key}/versions/${draft.version}`).set(as('competent')).expect(200);
    assert.equal((await ProcedureVersion.findOne({ where: { key, version: draft.version } }))!.status, 'draft');
  });
});

describe('starting a draft', () => {
  test('when an admin starts a draft, then it copies the approved version as the next version number, written by them', async () => {
    const key = newKey();
    await stored(fixture(key, 1));
    const res = await request(app).post(`/api/procedures/${key}/drafts`).set(as('admin')).send({}).expect(201);
    assert.equal(res.headers['location'], `/api/procedures/${key}/versions/2`);
    assert.equal(res.body.status, 'draft');
    assert.equal(res.body.version, 2);
    assert.equal(res.body.body.version, 2);
    assert.equal(res.body.author.id, admin.id);
    const row = await ProcedureVersion.findOne({ where: { key, version: 2 } });
    assert.equal(row!.status, 'draft');
    assert.equal(row!.source, 'editor');
    assert.equal(row!.authorId, admin.id);
    assert.equal(row!.approvedById, null);
    assert.deepEqual(row!.body.steps, fixture(key).steps);
    assert.equal(row!.checksum, procedureChecksum(row!.body));
    assert.notEqual(row!.checksum, procedureChecksum(fixture(key, 1)));
  });

  test('when a draft is already open, then another is refused and nothing is added', async () => {
    const { key } = await withDraft();
    const problem = expectProblem(await request(app).post(`/api/procedures/${key}/drafts`).set(as('otherAdmin')).send({}), 409);
    assert.match(problem.detail, /already a draft/);
    assert.equal(await ProcedureVersion.count({ where: { key } }), 2);
  });

  test('when two admins start a draft at the same moment, then exactly one succeeds', async () => {
    const key = newKey();
    await stored(fixture(key, 1));
    const [a, b] = await Promise.all([
      request(app).post(`/api/procedures/${key}/drafts`).set(as('admin')).send({}),
      request(app).post(`/api/procedures/${key}/drafts`).set(as('otherAdmin')).send({}),
    ]);
    assert.deepEqual([a.status, b.status].sort(), [201, 409]);
    assert.equal(await ProcedureVersion.count({ where: { key, status: 'draft' } }), 1);
  });

  test('when a draft is started from a named version, then that version is copied; an unknown version points at "from"', async () => {
    const key = newKey();
    const old = fixture(key, 1);
    old.title = 'The first wording';
    await stored(old, 'retired');
    await stored(fixture(key, 2));
    const missing = expectProblem(await request(app).post(`/api/procedures/${key}/drafts`).set(as('admin')).send({ from: 9 }), 400);
    assert.equal(missing.errors?.[0]?.pointer, '#/from');
    assert.equal(await ProcedureVersion.count({ where: { key } }), 2);
    const res = await request(app).post(`/api/procedures/${key}/drafts`).set(as('admin')).send({ from: 1 }).expect(201);
    assert.equal(res.body.version, 3);
    assert.equal((await ProcedureVersion.findOne({ where: { key, version: 3 } }))!.title, 'The first wording');
  });

  test('when the procedure does not exist, then the answer is 404 and nothing is made', async () => {
    const key = newKey();
    expectProblem(await request(app).post(`/api/procedures/${key}/drafts`).set(as('admin')).send({}), 404);
    assert.equal(await ProcedureVersion.count({ where: { key } }), 0);
  });
});

describe('saving a draft', () => {
  test('when the author saves a changed body, then it is stored with a new checksum and title', async () => {
    const { key, draft } = await withDraft();
    const body = edited(draft.body, (b) => {
      b.title = 'Test tension check, revised';
      b.steps[1]!.instruction = 'Read the gauge with your eye level with the needle.';
    });
    const res = await request(app).put(`/api/procedures/${key}/versions/2`).set(as('admin')).send(body).expect(200);
    assert.equal(res.body.title, 'Test tension check, revised');
    const row = await ProcedureVersion.findOne({ where: { key, version: 2 } });
    assert.equal(row!.title, 'Test tension check, revised');
    assert.equal(row!.body.steps[1]!.instruction, 'Read the gauge with your eye level with the needle.');
    assert.equal(row!.checksum, procedureChecksum(procedureSchema.parse(body)));
    assert.equal(res.body.checksum, row!.checksum);
  });

  test('when the body breaks the procedure schema, then each problem points at its field and nothing changes', async () => {
    const { key, draft } = await withDraft();
    const before = await ProcedureVersion.findOne({ where: { key, version: 2 } });
    const bad = structuredClone(draft.body) as unknown as { steps: { title: string; inputs: { limits?: unknown }[] }[] };
    bad.steps[1]!.inputs[0]!.limits = { min: 'seven hundred', max: 900 };
    bad.steps[2]!.title = '';
    const problem = expectProblem(await request(app).put(`/api/procedures/${key}/versions/2`).set(as('admin')).send(bad), 400);
    const pointers = problem.errors!.map((e) => e.pointer).sort();
    assert.deepEqual(pointers, ['#/steps/1/inputs/0/limits/min', '#/steps/2/title']);
    const after = await ProcedureVersion.findOne({ where: { key, version: 2 } });
    assert.equal(after!.checksum, before!.checksum);
    assert.deepEqual(after!.body, before!.body);
  });

  test('when the body names an unknown maths function or a field that does not exist, then those are pointed at', async () => {
    const { key, draft } = await withDraft();
    const body = edited(draft.body, (b) => {
      b.steps[1]!.computed[0]!.fn = 'guessTheStress';
      b.steps[1]!.computed[0]!.args = { ...b.steps[1]!.computed[0]!.args, force: { $input: 'readingg' } };
    });
    const problem = expectProblem(await request(app).put(`/api/procedures/${key}/versions/2`).set(as('admin')).send(body), 400);
    assert.deepEqual(problem.errors!.map((e) => e.pointer), ['#/steps/1/computed/0/fn', '#/steps/1/computed/0/args/force/$input']);
    assert.match(problem.errors![0]!.detail, /no maths function/);
    assert.equal((await ProcedureVersion.findOne({ where: { key, version: 2 } }))!.body.steps[1]!.computed[0]!.fn, 'bladeStress');
  });

  test('when the body’s key or version differs from the address, then it is refused', async () => {
    const { key, draft } = await withDraft();
    const body = edited(draft.body, (b) => {
      b.key = 'someone-else';
      b.version = 7;
    });
    const problem = expectProblem(await request(app).put(`/api/procedures/${key}/versions/2`).set(as('admin')).send(body), 400);
    assert.deepEqual(problem.errors!.map((e) => e.pointer).sort(), ['#/key', '#/version']);
    assert.equal((await ProcedureVersion.findOne({ where: { key, version: 2 } }))!.body.key, key);
  });

  test('when an approved or retired version is sent, then it is refused with 409 and stays as it was', async () => {
    const key = newKey();
    await stored(fixture(key, 1), 'retired');
    const approved = await stored(fixture(key, 2));
    const body = edited(fixture(key, 2), (b) => (b.title = 'Edited after approval'));
    expectProblem(await request(app).put(`/api/procedures/${key}/versions/2`).set(as('admin')).send(body), 409);
    expectProblem(await request(app).put(`/api/procedures/${key}/versions/1`).set(as('admin')).send({ ...body, version: 1 }), 409);
    const row = await ProcedureVersion.findByPk(approved.id);
    assert.equal(row!.title, 'Test tension check');
    assert.equal(row!.checksum, approved.checksum);
  });

  test('when another admin saves someone else’s draft, then it is refused so that they could still approve it with clean hands', async () => {
    const { key, draft } = await withDraft();
    const body = edited(draft.body, (b) => (b.title = 'Taken over'));
    const problem = expectProblem(await request(app).put(`/api/procedures/${key}/versions/2`).set(as('otherAdmin')).send(body), 403);
    assert.match(problem.detail, /author/);
    assert.equal((await ProcedureVersion.findOne({ where: { key, version: 2 } }))!.title, 'Test tension check');
  });

  test('when the draft does not exist, then saving answers 404', async () => {
    const key = newKey();
    expectProblem(await request(app).put(`/api/procedures/${key}/versions/1`).set(as('admin')).send(fixture(key)), 404);
    assert.equal(await ProcedureVersion.count({ where: { key } }), 0);
  });
});

describe('deleting a draft', () => {
  test('when the author deletes their draft, then it is gone and the approved version stays', async () => {
    const { key } = await withDraft();
    await request(app).delete(`/api/procedures/${key}/versions/2`).set(as('admin')).expect(204);
    const rows = await ProcedureVersion.findAll({ where: { key } });
    assert.deepEqual(rows.map((r) => [r.version, r.status]), [[1, 'approved']]);
  });

  test('when another admin deletes it, then it is gone; when a competent person or trainee tries, then it is refused', async () => {
    const { key } = await withDraft();
    expectProblem(await request(app).delete(`/api/procedures/${key}/versions/2`).set(as('competent')), 403);
    expectProblem(await request(app).delete(`/api/procedures/${key}/versions/2`).set(as('trainee')), 403);
    assert.equal(await ProcedureVersion.count({ where: { key, version: 2 } }), 1);
    await request(app).delete(`/api/procedures/${key}/versions/2`).set(as('otherAdmin')).expect(204);
    assert.equal(await ProcedureVersion.count({ where: { key, version: 2 } }), 0);
  });

  test('when an approved version is deleted, then it is refused and kept', async () => {
    const key = newKey();
    await stored(fixture(key, 1));
    expectProblem(await request(app).delete(`/api/procedures/${key}/versions/1`).set(as('admin')), 409);
    assert.equal(await ProcedureVersion.count({ where: { key } }), 1);
  });
});

describe('differences between versions', () => {
  test('when a draft changes one step and adds another, then the difference against the approved version says so step by step', async () => {
    const { key, draft } = await withDraft();
    const body = edited(draft.body, (b) => {
      b.steps[1]!.title = 'Read the tension gauge twice';
      const reading = b.steps[1]!.inputs[0]!;
      if (reading.type === 'number') reading.limits = { min: 750, max: 900 };
      b.steps.push({ id: 'photo', title: 'Photograph the gauge', kind: 'photo', instruction: 'Take a photo.', cautions: [], powered: false, inputs: [], computed: [] });
    });
    await request(app).put(`/api/procedures/${key}/versions/2`).set(as('admin')).send(body).expect(200);
    const res = await request(app).get(`/api/procedures/${key}/versions/2/diff`).set(as('competent')).expect(200);
    const diff = res.body as ProcedureDiff;
    assert.deepEqual(diff.from, { key, version: 1 });
    assert.deepEqual(diff.to, { key, version: 2 });
    assert.deepEqual(diff.steps.map((s) => [s.id, s.change]), [['isolate', 'unchanged'], ['tension', 'changed'], ['track', 'unchanged'], ['photo', 'added']]);
    const tension = diff.steps[1]!;
    assert.deepEqual(tension.fields, ['title', 'inputs']);
    assert.deepEqual(tension.inputs.map((i) => [i.id, i.change, i.fields]), [['reading', 'changed', ['limits']]]);

    const same = await request(app).get(`/api/procedures/${key}/versions/1/diff`).query({ against: 1 }).set(as('auditor')).expect(200);
    assert.equal(same.body.same, true);
    const unknown = expectProblem(await request(app).get(`/api/procedures/${key}/versions/2/diff`).query({ against: 5 }).set(as('admin')), 400);
    assert.equal(unknown.errors?.[0]?.pointer, '#/query/against');
    assert.equal((await ProcedureVersion.findOne({ where: { key, version: 2 } }))!.status, 'draft');
  });
});

describe('approving a draft', () => {
  test('when the author tries to approve their own draft, then it is refused, saying someone else must', async () => {
    const { key } = await withDraft();
    const problem = expectProblem(await request(app).post(`/api/procedures/${key}/versions/2/approve`).set(as('admin')), 403);
    assert.match(problem.detail, /You wrote this draft, so someone else must approve it/);
    const rows = await ProcedureVersion.findAll({ where: { key }, order: [['version', 'ASC']] });
    assert.deepEqual(rows.map((r) => [r.version, r.status]), [[1, 'approved'], [2, 'draft']]);
    assert.equal(rows[1]!.approvedById, null);
  });

  test('when a competent person approves, then the old version retires, the draft is approved, and the next record uses it', async () => {
    const { key, draft } = await withDraft();
    const body = edited(draft.body, (b) => (b.title = 'Test tension check, second edition'));
    await request(app).put(`/api/procedures/${key}/versions/2`).set(as('admin')).send(body).expect(200);
    const earlier = await request(app).post('/api/records').set(as('trainee')).send({ machineId, procedureKey: key }).expect(201);
    assert.equal(earlier.body.procedure.version, 1);

    const res = await request(app).post(`/api/procedures/${key}/versions/2/approve`).set(as('competent')).expect(200);
    assert.equal(res.body.status, 'approved');
    assert.equal(res.body.approvedBy.id, competent.id);
    const rows = await ProcedureVersion.findAll({ where: { key }, order: [['version', 'ASC']] });
    assert.deepEqual(rows.map((r) => [r.version, r.status]), [[1, 'retired'], [2, 'approved']]);
    assert.equal(rows[1]!.approvedById, competent.id);
    assert.ok(rows[1]!.approvedAt instanceof Date);
    assert.equal(rows[1]!.authorId, admin.id);

    const later = await request(app).post('/api/records').set(as('trainee')).send({ machineId, procedureKey: key }).expect(201);
    assert.equal(later.body.procedure.version, 2);
    assert.equal(later.body.procedureBody.title, 'Test tension check, second edition');
    assert.equal((await SetupRecord.findByPk(later.body.id))!.procedureVersionId, rows[1]!.id);
    assert.equal((await SetupRecord.findByPk(earlier.body.id))!.procedureVersionId, rows[0]!.id);
  });

  test('when another workshop admin approves, then it is approved by them', async () => {
    const { key } = await withDraft();
    await request(app).post(`/api/procedures/${key}/versions/2/approve`).set(as('otherAdmin')).expect(200);
    const row = await ProcedureVersion.findOne({ where: { key, version: 2 } });
    assert.equal(row!.status, 'approved');
    assert.equal(row!.approvedById, otherAdmin.id);
  });

  test('when the version is not a draft, then approving it is refused and nothing moves', async () => {
    const key = newKey();
    await stored(fixture(key, 1), 'retired');
    await stored(fixture(key, 2));
    expectProblem(await request(app).post(`/api/procedures/${key}/versions/1/approve`).set(as('competent')), 409);
    expectProblem(await request(app).post(`/api/procedures/${key}/versions/2/approve`).set(as('competent')), 409);
    const rows = await ProcedureVersion.findAll({ where: { key }, order: [['version', 'ASC']] });
    assert.deepEqual(rows.map((r) => r.status), ['retired', 'approved']);
  });

  test('when an approved version made in the editor is changed in SQL, then the database refuses', async () => {
    const { key } = await withDraft();
    await request(app).post(`/api/procedures/${key}/versions/2/approve`).set(as('competent')).expect(200);
    const row = (await ProcedureVersion.findOne({ where: { key, version: 2 } }))!;
    const sql = db();
    await assert.rejects(sql.query(`UPDATE procedure_versions SET body = jsonb_set(body, '{title}', '"quietly edited"') WHERE id = :id`, { replacements: { id: row.id } }), /cannot be changed/);
    await assert.rejects(sql.query(`UPDATE procedure_versions SET approved_by_id = NULL WHERE id = :id`, { replacements: { id: row.id } }), /cannot be changed/);
    await assert.rejects(sql.query(`UPDATE procedure_versions SET status = 'draft' WHERE id = :id`, { replacements: { id: row.id } }), /cannot be changed/);
    const again = await ProcedureVersion.findByPk(row.id);
    assert.equal(again!.status, 'approved');
    assert.equal(again!.body.title, 'Test tension check');
    assert.equal(again!.checksum, row.checksum);
  });

  test('when a newer version was approved after the draft was started, then the older draft cannot replace it', async () => {
    const { key } = await withDraft();
    await ProcedureVersion.update({ status: 'retired' }, { where: { key, version: 1 } });
    await stored(fixture(key, 3));
    const problem = expectProblem(await request(app).post(`/api/procedures/${key}/versions/2/approve`).set(as('competent')), 409);
    assert.match(problem.detail, /Version 3 was approved after this draft was started/);
    const rows = await ProcedureVersion.findAll({ where: { key }, order: [['version', 'ASC']] });
    assert.deepEqual(rows.map((r) => [r.version, r.status]), [[1, 'retired'], [2, 'draft'], [3, 'approved']]);
  });

  test('when a pack file takes a version number already used in the app, then loading stops and names the next free number', async () => {
    const { key } = await withDraft();
    const file = fixture(key, 2);
    await assert.rejects(
      loadProcedurePacks(db(), [{ file: `test/${key}/v2.json`, body: file, checksum: procedureChecksum(file) }]),
      /already used by a version written in the app\. Give the file a version number after the app's versions \(v3\.json\)/,
    );
    assert.equal((await ProcedureVersion.findOne({ where: { key, version: 2 } }))!.source, 'editor');
  });

  test('when a second draft is opened after an approval, then it is numbered after the approved one', async () => {
    const { key } = await withDraft();
    await request(app).post(`/api/procedures/${key}/versions/2/approve`).set(as('competent')).expect(200);
    const next = await request(app).post(`/api/procedures/${key}/drafts`).set(as('otherAdmin')).send({}).expect(201);
    assert.equal(next.body.version, 3);
    assert.equal(next.body.body.title, 'Test tension check');
    assert.equal(await ProcedureVersion.count({ where: { key } }), 3);
  });
});

describe('who may do what', () => {
  test('when nobody is signed in, then every procedure route answers 401', async () => {
    const { key } = await withDraft();
    const calls = [
      request(app).get('/api/procedures'),
      request(app).get(`/api/procedures/${key}/versions`),
      request(app).get(`/api/procedures/${key}/versions/2`),
      request(app).post(`/api/procedures/${key}/drafts`).send({}),
      request(app).put(`/api/procedures/${key}/versions/2`).send(fixture(key, 2)),
      request(app).delete(`/api/procedures/${key}/versions/2`),
      request(app).get(`/api/procedures/${key}/versions/2/diff`),
      request(app).post(`/api/procedures/${key}/versions/2/approve`),
    ];
    for (const res of await Promise.all(calls)) expectProblem(res, 401);
    assert.equal((await ProcedureVersion.findOne({ where: { key, version: 2 } }))!.status, 'draft');
  });

  test('when a trainee, an auditor or a competent person tries to write, then it is refused', async () => {
    const { key, draft } = await withDraft();
    const body = edited(draft.body, (b) => (b.title = 'Not theirs to change'));
    for (const who of ['trainee', 'auditor', 'competent']) {
      expectProblem(await request(app).post(`/api/procedures/${key}/drafts`).set(as(who)).send({}), 403);
      expectProblem(await request(app).put(`/api/procedures/${key}/versions/2`).set(as(who)).send(body), 403);
    }
    for (const who of ['trainee', 'auditor']) {
      expectProblem(await request(app).post(`/api/procedures/${key}/versions/2/approve`).set(as(who)), 403);
      expectProblem(await request(app).delete(`/api/procedures/${key}/versions/2`).set(as(who)), 403);
    }
    const rows = await ProcedureVersion.findAll({ where: { key }, order: [['version', 'ASC']] });
    assert.deepEqual(rows.map((r) => [r.version, r.status, r.title]), [[1, 'approved', 'Test tension check'], [2, 'draft', 'Test tension check']]);
  });

  test('when a trainee asks for a difference, then it is refused; an auditor may read it', async () => {
    const { key } = await withDraft();
    expectProblem(await request(app).get(`/api/procedures/${key}/versions/2/diff`).set(as('trainee')), 403);
    const res = await request(app).get(`/api/procedures/${key}/versions/2/diff`).set(as('auditor')).expect(200);
    assert.equal(res.body.same, true);
    assert.equal(await ProcedureVersion.count({ where: { key } }), 2);
  });
});
