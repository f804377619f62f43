import assert from 'node:assert/strict';
import { execFileSync, spawnSync } from 'node:child_process';
import { randomUUID } from 'node:crypto';
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { before, describe, test } from 'node:test';
import pg from 'pg';
import request from 'supertest';
import { DEMO_MACHINES } from '../../api/db/seed';
import { Machine } from '../../api/modules/machines/model';
import { StepEntry } from '../../api/modules/records/model';
import { postgresBinDir, restartCluster } from '../../scripts/lib/postgres';
import type { Person } from '../../api/modules/people/repository';
import { db, expectProblem, makePerson, signIn, testApp } from '../support/api';
import { approve, fixture } from '../support/procedures';
import { RecordMaker } from '../support/records';

const app = testApp();
let token = '';
let maker: RecordMaker;
let trainee: Person, competent: Person;
let machineId = '';
let procedureKey = '';

before(async () => {
  db();
  trainee = await makePerson(['trainee'], 'Faults Trainee');
  competent = await makePerson(['competent_person'], 'Faults Competent');
  token = (await signIn(app, trainee.email)).token;
  machineId = (await Machine.findOne({ where: { assetTag: DEMO_MACHINES[1]!.assetTag } }))!.id;
  procedureKey = `faults-${randomUUID().slice(0, 8)}`;
  await approve(fixture(procedureKey));
  maker = new RecordMaker(app, procedureKey);
});

describe('when PostgreSQL restarts under load', () => {
  test('when the database restarts during a burst of step-entry writes, then every acknowledged write is stored, the others got a 503 problem, and the API answers again within 5 s', async () => {
    const pgDir = process.env['SETWRIGHT_PG_DIR'];
    assert.ok(pgDir, 'npm test passes the cluster folder');
    const started = await request(app).post('/api/records').set('authorization', `Bearer ${token}`).send({ machineId, procedureKey }).expect(201);
    const recordId = started.body.id as string;
    const acknowledged: string[] = [];
    const refused: number[] = [];
    const refusedBodies: object[] = [];
    let restarting = true;
    const writer = async () => {
      for (let i = 0; i < 40 && (restarting || i < 10); i++) {
        const body = { idempotencyKey: randomUUID(), stepId: 'isolate', values: { lock: `L${i}` } };
        const res = await request(app).post(`/api/records/${recordId}/entries`).set('authorization', `Bearer ${token}`).send(body).timeout(15_000);
        if (res.status === 201) acknowledged.push(res.body.id as string);
        else {
          refused.push(res.status);
          refusedBodies.push(body);
          expectProblem(res, 503);
        }
      }
    };
    const writers = Promise.all([writer(), writer(), writer()]);
    await new Promise((r) => setTimeout(r, 150));
    const restartedAt = Date.now();
    restartCluster(pgDir);
    // The API must answer again soon after the database is back, without being restarted itself.
    let healthyAfter = Infinity;
    while (Date.now() - restartedAt < 15_000) {
      const res = await request(app).get('/api/health');
      if (res.status === 200) {
        healthyAfter = Date.now() - restartedAt;
        break;
      }
      await new Promise((r) => setTimeout(r, 100));
    }
    restarting = false;
    await writers;
    assert.ok(healthyAfter <= 5_000, `answered again after ${healthyAfter} ms`);
    const stored = await StepEntry.findAll({ where: { recordId }, attributes: ['id'] });
    const storedIds = new Set(stored.map((e) => e.id));
    for (const id of acknowledged) assert.ok(storedIds.has(id), `acknowledged entry ${id} is stored`);
    // A write may commit just before its connection drops and still be answered 503: the tablet
    // retries it with the same idempotency key, and gets the stored entry back instead of a copy.
    for (const body of refusedBodies) {
      const retry = await request(app).post(`/api/records/${recordId}/entries`).set('authorization', `Bearer ${token}`).send(body);
      assert.ok(retry.status === 200 || retry.status === 201, `retry answered ${retry.status}`);
    }
    assert.equal(await StepEntry.count({ where: { recordId } }), acknowledged.length + refusedBodies.length, 'each write stored exactly once');
    assert.ok(acknowledged.length > 0);
    console.log(`restart: ${acknowledged.length} writes acknowledged, ${refused.length} refused with 503, healthy again after ${healthyAfter} ms`);
  });
});

describe('backup and restore', () => {
  test('when the database is dumped and restored into a fresh one, then every signed record still checks intact', async () => {
    await maker.signed({ performer: trainee, witness: competent, approver: competent });
    await maker.signed({ performer: trainee, witness: competent, approver: competent });
    const adminUrl = process.env['DATABASE_ADMIN_URL']!;
    const bin = postgresBinDir();
    const dir = mkdtempSync(join(tmpdir(), 'setwright-dump-'));
    const restored = `restore_${randomUUID().slice(0, 8)}`;
    const admin = new pg.Client({ connectionString: adminUrl });
    await admin.connect();
    try {
      const dump = join(dir, 'setwright.dump');
      execFileSync(join(bin, 'pg_dump'), ['--format=custom', '--file', dump, adminUrl]);
      await admin.query(`CREATE DATABASE ${restored} OWNER setwright`);
      const target = new URL(adminUrl);
      target.pathname = `/${restored}`;
      execFileSync(join(bin, 'pg_restore'), ['--no-owner', '--role=setwright', '--dbname', target.toString(), dump]);
      const appUrl = new URL(process.env['DATABASE_URL']!);
      appUrl.pathname = `/${restored}`;
      const check = spawnSync('npx', ['tsx', 'scripts/check-records.ts'], { env: { ...process.env, DATABASE_URL: appUrl.toString() }, encoding: 'utf8' });
      const line = check.stdout.trim().split('\n').pop() ?? '';
      const report = JSON.parse(line) as { checked: number; broken: number };
      assert.equal(check.status, 0, check.stdout + check.stderr);
      assert.ok(report.checked >= 2, `checked ${report.checked} signed records`);
      assert.equal(report.broken, 0);
    } finally {
      await admin.query(`DROP DATABASE IF EXISTS ${restored} WITH (FORCE)`).catch(() => undefined);
      await admin.end();
      rmSync(dir, { recursive: true, force: true });
    }
  });
});
