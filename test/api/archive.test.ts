import assert from 'node:assert/strict';
import { createHash, randomUUID } from 'node:crypto';
import { before, describe, test } from 'node:test';
import request from 'supertest';
import yauzl from 'yauzl';
import { ProcedureVersion } from '../../api/modules/procedures/model';
import type { Person } from '../../api/modules/people/repository';
import { SetupRecord } from '../../api/modules/records/model';
import { AuditEvent } from '../../api/modules/signoff/model';
import { db, expectProblem, makePerson, testApp } from '../support/api';
import { binaryBody } from '../support/pdf';
import { approve, fixture } from '../support/procedures';
import { listRoutes } from '../support/routes';
import { freshMachine, RecordMaker } from '../support/records';

const app = testApp();
let maker: RecordMaker;
let key: string;
let trainee: Person, secondTrainee: Person, competent: Person, approver: Person, auditor: Person, admin: Person;
let sawA: string, sawB: string;
/** This file's records: a, b and c signed off (b failed), d waiting for sign-off. */
const ids = { a: '', b: '', c: '', d: '' };

type Item = { id: string; status: string; result: string | null; machine: { id: string; name: string }; performedBy: string; approvedBy: string | null; signedAt: string | null };

async function archive(query: Record<string, string | number>, who: Person = auditor) {
  return request(app).get('/api/archive/records').query(query).set(await maker.auth(who));
}

async function idsOf(query: Record<string, string | number>): Promise<string[]> {
  const res = await archive({ procedure: key, ...query });
  assert.equal(res.status, 200, JSON.stringify(res.body));
  return (res.body.items as Item[]).map((i) => i.id);
}


/** Every file of a zip, read with yauzl. */
function unzip(bytes: Buffer): Promise<Map<string, Buffer>> {
  return new Promise((ok, fail) => {
    yauzl.fromBuffer(bytes, { lazyEntries: true }, (err, zip) => {
      if (err || !zip) return fail(err);
      const files = new Map<string, Buffer>();
      zip.on('entry', (entry: yauzl.Entry) => {
        zip.openReadStream(entry, (e, stream) => {
          if (e || !stream) return fail(e);
          const chunks: Buffer[] = [];
          stream.on('data', (c: Buffer) => chunks.push(c));
          stream.on('end', () => {
            files.set(entry.fileName, Buffer.concat(chunks));
            zip.readEntry();
          });
        });
      });
      zip.on('end', () => ok(files));
      zip.on('error', fail);
      zip.readEntry();
    });
  });
}

const sha256 = (b: Buffer) => createHash('sha256').update(b).digest('hex');

before(async () => {
  db();
  trainee = await makePerson(['trainee'], 'Archive Trainee');
  secondTrainee = await makePerson(['trainee'], 'Quennell Archive Second');
  competent = await makePerson(['competent_person'], 'Archive Witness');
  approver = await makePerson(['competent_person'], 'Archive Approver');
  auditor = await makePerson(['auditor'], 'Archive Auditor');
  admin = await makePerson(['workshop_admin'], 'Archive Admin');
  key = `archive-${randomUUID().slice(0, 8)}`;
  await approve(fixture(key, 1, 'Archive tension check'));
  maker = new RecordMaker(app, key);
  sawA = (await freshMachine('Archive saw A')).id;
  sawB = (await freshMachine('Archive saw B')).id;
  ids.a = await maker.signed({ performer: trainee, witness: competent, approver, machineId: sawA });
  ids.b = await maker.signed({ performer: trainee, witness: competent, approver, machineId: sawA, reading: 600 });
  ids.c = await maker.signed({ performer: secondTrainee, witness: competent, approver: competent, machineId: sawB });
  ids.d = await maker.ready({ performer: trainee, witness: competent, machineId: sawA });
});

describe('the archive list', () => {
  test('when an auditor pages through one machine’s records, then the server pages them newest signature first, unsigned last', async () => {
    const first = await archive({ machineId: sawA, size: 2, page: 0 });
    assert.equal(first.status, 200);
    assert.equal(first.body.total, 3);
    assert.deepEqual(first.body.items.map((i: Item) => i.id), [ids.b, ids.a]);
    const second = await archive({ machineId: sawA, size: 2, page: 1 });
    assert.deepEqual(second.body.items.map((i: Item) => i.id), [ids.d]);
    assert.equal(second.body.total, 3);
    const item = first.body.items[0] as Item;
    assert.equal(item.status, 'signed_off');
    assert.equal(item.result, 'failed');
    assert.equal(item.performedBy, 'Archive Trainee');
    assert.equal(item.approvedBy, 'Archive Approver');
    assert.equal(item.signedAt, (await SetupRecord.findByPk(ids.b))!.signedAt!.toISOString());
  });

  test('when it is filtered by procedure, state, result or person, then only the matching records come back', async () => {
    assert.deepEqual((await idsOf({})).sort(), Object.values(ids).sort());
    assert.deepEqual(await idsOf({ result: 'failed' }), [ids.b]);
    assert.deepEqual(await idsOf({ status: 'ready_for_signoff' }), [ids.d]);
    assert.deepEqual(await idsOf({ person: 'quennell' }), [ids.c], 'by the performer’s name, in any case');
    assert.deepEqual((await idsOf({ person: 'Archive Approver' })).sort(), [ids.a, ids.b].sort(), 'by the signer’s name');
    assert.deepEqual((await idsOf({ person: 'Archive Witness' })).sort(), Object.values(ids).sort(), 'witnesses sign too');
    assert.deepEqual(await idsOf({ person: '100%_' }), [], 'LIKE wildcards in the text are taken literally');
    assert.deepEqual(await idsOf({ machineId: sawB }), [ids.c]);
  });

  test('when it is filtered by a date range, then signedAt or createdAt decides, and a range ending today takes all of today', async () => {
    const today = new Date().toISOString().slice(0, 10);
    assert.deepEqual((await idsOf({ from: today, to: today })).sort(), [ids.a, ids.b, ids.c].sort(), 'unsigned records have no signature date');
    assert.deepEqual((await idsOf({ from: today, to: today, dateField: 'createdAt' })).sort(), Object.values(ids).sort());
    assert.deepEqual(await idsOf({ from: '2001-01-01', to: '2001-12-31' }), []);
    const c = await SetupRecord.findByPk(ids.c);
    assert.deepEqual(await idsOf({ from: c!.signedAt!.toISOString() }), [ids.c], 'an instant as the start');
  });

  test('when it is sorted by machine, procedure, result or creation, then the server orders every page that way', async () => {
    const byMachine = await idsOf({ sort: 'machine', dir: 'asc' });
    assert.equal(byMachine.at(-1), ids.c, 'saw B after saw A');
    const byResult = await idsOf({ sort: 'result', dir: 'desc' });
    assert.equal(byResult[0], ids.b, 'failed sorts after passed, so first when descending');
    assert.equal(byResult.at(-1), ids.d, 'no result yet comes last');
    assert.deepEqual(await idsOf({ sort: 'createdAt', dir: 'asc' }), [ids.a, ids.b, ids.c, ids.d]);
    assert.equal((await idsOf({ sort: 'procedure' })).length, 4);
  });

  test('when the paging, sort or dates are wrong, then a 400 problem points at each bad parameter', async () => {
    const big = expectProblem(await archive({ size: 101 }), 400);
    assert.deepEqual(big.errors?.map((e) => e.pointer), ['#/query/size']);
    const sort = expectProblem(await archive({ sort: 'hash', page: -1 }), 400);
    assert.deepEqual(sort.errors?.map((e) => e.pointer).sort(), ['#/query/page', '#/query/sort']);
    const range = expectProblem(await archive({ from: '2026-05-02', to: '2026-05-01' }), 400);
    assert.deepEqual(range.errors?.map((e) => e.pointer), ['#/query/to']);
    const date = expectProblem(await archive({ from: 'yesterday' }), 400);
    assert.deepEqual(date.errors?.map((e) => e.pointer), ['#/query/from']);
  });

  test('when a trainee asks for the archive or an evidence pack, then it is a 403 problem; competent persons and admins may read it', async () => {
    expectProblem(await archive({}, trainee), 403);
    expectProblem(await request(app).get('/api/archive/evidence-pack').set(await maker.auth(trainee)), 403);
    assert.equal((await archive({ procedure: key }, competent)).status, 200);
    assert.equal((await archive({ procedure: key }, admin)).status, 200);
    expectProblem(await request(app).get('/api/archive/records'), 401);
  });
});

describe('the evidence pack', () => {
  test('when an auditor exports a procedure’s records, then the zip holds each signed PDF, an index and a manifest whose hashes match', async () => {
    const auditsBefore = await AuditEvent.count({ where: { action: 'records.exported', actorId: auditor.id } });
    const res = await request(app).get('/api/archive/evidence-pack').query({ procedure: key }).set(await maker.auth(auditor)).buffer(true).parse(binaryBody);
    assert.equal(res.status, 200);
    assert.equal(res.headers['content-type'], 'application/zip');
    assert.equal(res.headers['x-record-count'], '3');
    assert.match(res.headers['content-disposition'], /^attachment; filename="evidence-pack-[A-Za-z0-9._-]+\.zip"$/);
    const files = await unzip(res.body as Buffer);
    const manifest = JSON.parse(files.get('manifest.json')!.toString('utf8'));
    assert.equal(manifest.recordCount, 3);
    assert.deepEqual([...files.keys()].filter((n) => n !== 'manifest.json').sort(), manifest.files.map((f: { path: string }) => f.path).sort(), 'the manifest lists every other file');
    for (const f of manifest.files as { path: string; sha256: string; bytes: number }[]) {
      assert.equal(sha256(files.get(f.path)!), f.sha256, `SHA-256 of ${f.path}`);
      assert.equal(files.get(f.path)!.length, f.bytes);
    }
    const signed = [ids.a, ids.b, ids.c];
    assert.deepEqual(manifest.records.map((r: { id: string }) => r.id).sort(), [...signed].sort());
    for (const r of manifest.records as { id: string; recordHash: string; file: string }[]) {
      const row = await SetupRecord.findByPk(r.id);
      assert.equal(r.recordHash, row!.recordHash);
      assert.equal(files.get(r.file)!.subarray(0, 5).toString('latin1'), '%PDF-');
    }

    const lines = files.get('index.csv')!.toString('utf8').trim().split('\r\n');
    assert.equal(lines[0], 'record id,machine,asset tag,procedure,version,performed by,approved by,signed at (UTC),result,record hash,previous hash,pdf file');
    assert.equal(lines.length, 4);
    const failedRow = lines.find((l) => l.startsWith(ids.b))!.split(',');
    const b = await SetupRecord.findByPk(ids.b);
    assert.equal(failedRow[3], 'Archive tension check');
    assert.equal(failedRow[4], '1');
    assert.equal(failedRow[5], 'Archive Trainee');
    assert.equal(failedRow[6], 'Archive Approver');
    assert.equal(failedRow[7], b!.signedAt!.toISOString());
    assert.equal(failedRow[8], 'Failed');
    assert.equal(failedRow[9], b!.recordHash);
    assert.equal(failedRow[10], b!.previousHash);

    const audits = await AuditEvent.findAll({ where: { action: 'records.exported', actorId: auditor.id }, order: [['id', 'ASC']] });
    assert.equal(audits.length, auditsBefore + 1);
    assert.equal(audits.at(-1)!.detail['count'], 3);
    assert.deepEqual((audits.at(-1)!.detail['filter'] as { procedure: string }).procedure, key);
  });

  test('when the filter selects nothing, then the pack is still a valid zip with an empty index and says 0 records', async () => {
    const res = await request(app).get('/api/archive/evidence-pack').query({ procedure: key, from: '2001-01-01', to: '2001-01-31' }).set(await maker.auth(auditor)).buffer(true).parse(binaryBody);
    assert.equal(res.headers['x-record-count'], '0');
    const files = await unzip(res.body as Buffer);
    assert.equal(JSON.parse(files.get('manifest.json')!.toString('utf8')).recordCount, 0);
    assert.equal(files.get('index.csv')!.toString('utf8').trim().split('\r\n').length, 1);
  });

  test('when a pack is asked for records that are not signed off, then it is a 400 problem and nothing is exported', async () => {
    const before = await AuditEvent.count({ where: { action: 'records.exported' } });
    const problem = expectProblem(await request(app).get('/api/archive/evidence-pack').query({ status: 'underway' }).set(await maker.auth(auditor)), 400);
    assert.equal(problem.errors?.[0]?.pointer, '#/query/status');
    assert.equal(await AuditEvent.count({ where: { action: 'records.exported' } }), before);
  });
});

describe('an auditor reads and never changes', () => {
  test('when an auditor calls every route that writes, then each one refuses with a 403 problem and nothing changes', async () => {
    const writes = listRoutes(app).filter((r) => ['POST', 'PUT', 'PATCH', 'DELETE'].includes(r.method) && !r.path.startsWith('/api/auth/'));
    assert.ok(writes.length >= 10, `found ${writes.length} write routes`);
    for (const path of ['/api/records/:id/sign-off', '/api/records/:id/addenda', '/api/photos', '/api/records']) {
      assert.ok(writes.some((w) => w.path === path), `the walk finds ${path}`);
    }
    const approved = await ProcedureVersion.findOne({ where: { key, status: 'approved' } });
    const machineId = sawA;
    const fill = (path: string) =>
      path
        .replace(/^\/api\/machines\/:id/, `/api/machines/${machineId}`)
        .replace(':id', ids.a)
        .replace(':key', key)
        .replace(':version', String(approved!.version))
        .replace(/:[A-Za-z]+/g, randomUUID());
    const before = {
      record: (await SetupRecord.findByPk(ids.a))!.toJSON(),
      ready: (await SetupRecord.findByPk(ids.d))!.toJSON(),
      versions: await ProcedureVersion.count({ where: { key } }),
      audits: await AuditEvent.count({ where: { actorId: auditor.id } }),
    };
    const as = await maker.auth(auditor);
    for (const route of writes) {
      const res = await request(app)[route.method.toLowerCase() as 'post'](fill(route.path)).set(as).send({ password: 'saw-demo-2026', reason: 'An auditor tries', text: 'An auditor tries to add this.' });
      assert.equal(res.status, 403, `${route.method} ${route.path} answered ${res.status}: ${JSON.stringify(res.body)}`);
      assert.match(String(res.headers['content-type']), /^application\/problem\+json/);
    }
    assert.deepEqual((await SetupRecord.findByPk(ids.a))!.toJSON(), before.record);
    assert.deepEqual((await SetupRecord.findByPk(ids.d))!.toJSON(), before.ready);
    assert.equal(await ProcedureVersion.count({ where: { key } }), before.versions);
    assert.equal(await AuditEvent.count({ where: { actorId: auditor.id } }), before.audits, 'no audit event: nothing happened');
  });

  test('when an auditor reads, then the archive, the record, its PDF and its check all answer', async () => {
    const as = await maker.auth(auditor);
    assert.equal((await archive({ procedure: key })).status, 200);
    assert.equal((await request(app).get(`/api/records/${ids.a}`).set(as)).status, 200);
    assert.equal((await request(app).get(`/api/records/${ids.a}/check`).set(as)).body.intact, true);
    const pdf = await request(app).get(`/api/records/${ids.a}/pdf`).set(as).buffer(true).parse(binaryBody);
    assert.equal(pdf.status, 200);
  });
});
