import assert from 'node:assert/strict';
import { spawn, type ChildProcess } from 'node:child_process';
import { randomUUID } from 'node:crypto';
import { resolve } from 'node:path';
import { after, before, describe, test } from 'node:test';
import bcrypt from 'bcryptjs';
import pg from 'pg';
import PgBoss from 'pg-boss';
import { Op, type Sequelize } from 'sequelize';
import request from 'supertest';
import { loadConfig } from '../../api/config';
import { createDatabase } from '../../api/db/database';
import { createMigrator } from '../../api/db/migrate';
import { JOB_SCHEMA } from '../../api/db/migrations/0007-outbox-and-invitations';
import { DEMO_PASSWORD } from '../../api/db/seed';
import { Authorisation } from '../../api/modules/competencies/model';
import { addDays, workshopDate } from '../../api/modules/competencies/service';
import { MachineSchedule } from '../../api/modules/machines/model';
import { OutboxMessage } from '../../api/modules/mail/model';
import { upsertPerson, type Person } from '../../api/modules/people/repository';
import { readPackFiles } from '../../api/modules/procedures/loader';
import { SetupRecord, StepEntry } from '../../api/modules/records/model';
import { freePort } from '../../scripts/lib/ports';
import { readMailbox, waitFor, type StoredMail } from '../support/mail';
import { approve, fixture } from '../support/procedures';
import { freshMachine, photoBytes } from '../support/records';

// Two real API processes (api/main.ts, as `npm start` and a deployment run it) on one database of
// their own, created empty here so that both migrate it and load the packs at the same moment.
// They share the run's object-store and SMTP stand-ins, as N instances share one store and one relay.
const ROOT = resolve(import.meta.dirname, '..', '..');
const ACCOUNT_LIMIT = 4;
const base = new URL(process.env['DATABASE_URL']!);
const dbName = `setwright_two_${randomUUID().slice(0, 8)}`;
const url = Object.assign(new URL(base.href), { pathname: `/${dbName}` }).href;
const adminUrl = process.env['DATABASE_ADMIN_URL']!;
const mailDir = process.env['MAIL_STAND_IN_DIR']!;

interface Instance {
  name: string;
  url: string;
  child: ChildProcess;
  /** Every pino line it wrote, parsed. */
  logs: { level: number; msg: string; [key: string]: unknown }[];
  /** Anything else it wrote (stack traces, warnings). */
  other: string[];
  exited?: number | null;
}

const instances: Instance[] = [];
let sequelize: Sequelize | undefined;

async function admin<T>(work: (client: pg.Client) => Promise<T>): Promise<T> {
  const client = new pg.Client({ connectionString: adminUrl });
  await client.connect();
  try {
    return await work(client);
  } finally {
    await client.end();
  }
}

function startInstance(name: string, port: number): Instance {
  const child = spawn(process.execPath, ['--import', 'tsx', 'api/main.ts'], {
    cwd: ROOT,
    env: {
      ...process.env,
      DATABASE_URL: url,
      DATABASE_POOL_MAX: '4',
      PORT: String(port),
      HOST: '127.0.0.1',
      LOG_LEVEL: 'info',
      LOGIN_LIMIT_PER_ACCOUNT: String(ACCOUNT_LIMIT),
      MAIL_POLL_SECONDS: '0.5',
      PUBLIC_URL: 'https://setwright.brackenford-works.example',
    },
    stdio: ['ignore', 'pipe', 'pipe'],
  });
  const instance: Instance = { name, url: `http://127.0.0.1:${port}`, child, logs: [], other: [] };
  let rest = '';
  child.stdout!.setEncoding('utf8').on('data', (chunk: string) => {
    const lines = (rest + chunk).split('\n');
    rest = lines.pop()!;
    for (const line of lines.filter(Boolean)) {
      try {
        instance.logs.push(JSON.parse(line));
      } catch {
        instance.other.push(line);
      }
    }
  });
  child.stderr!.setEncoding('utf8').on('data', (chunk: string) => instance.other.push(...chunk.split('\n').filter(Boolean)));
  child.on('exit', (code) => (instance.exited = code));
  instances.push(instance);
  return instance;
}

async function stopInstance(i: Instance) {
  if (i.exited !== undefined) return;
  const gone = new Promise<void>((ok) => i.child.once('exit', () => ok()));
  i.child.kill('SIGTERM');
  const killer = setTimeout(() => i.child.kill('SIGKILL'), 8000);
  await gone;
  clearTimeout(killer);
}

/** Everything a process has said, for a failure's message. */
const said = (i: Instance) => [...i.logs.map((l) => JSON.stringify(l)), ...i.other].join('\n');

/** A process that has stopped or logged an error fails the test with what it said. */
function healthy(i: Instance) {
  const errors = i.logs.filter((l) => l.level >= 50);
  assert.equal(i.exited, undefined, `${i.name} stopped (exit ${i.exited}):\n${said(i)}`);
  assert.deepEqual(errors, [], `${i.name} logged errors:\n${said(i)}`);
}

// Stop both processes and drop their database whatever happened above.
after(async () => {
  await Promise.all(instances.map(stopInstance));
  await sequelize?.close();
  await admin((c) => c.query(`DROP DATABASE IF EXISTS ${pg.escapeIdentifier(dbName)} WITH (FORCE)`));
});
process.once('exit', () => {
  for (const i of instances) if (i.exited === undefined) i.child.kill('SIGKILL');
});

let a: Instance, b: Instance;
let trainee: Person, competent: Person, other: Person, workshopAdmin: Person;
const tokens: Record<string, string> = {};
const bearer = (who: string) => ({ authorization: `Bearer ${tokens[who]}` });
const login = (i: Instance, email: string, password: string) => request(i.url).post('/api/auth/login').send({ email, password });

async function makePerson(roles: Person['roles'], name: string, hash: string): Promise<Person> {
  return upsertPerson({ email: `${name.toLowerCase().replace(/[^a-z]+/g, '.')}.${randomUUID().slice(0, 8)}@tests.example`, displayName: name, passwordHash: hash, roles });
}

const to = (mail: StoredMail[], email: string, subject: RegExp) => mail.filter((m) => m.to.includes(email) && subject.test(m.subject));

describe('two API processes on one database', () => {
  before(async () => {
    const owner = decodeURIComponent(base.username);
    await admin((c) => c.query(`CREATE DATABASE ${pg.escapeIdentifier(dbName)} OWNER ${pg.escapeIdentifier(owner)}`));
  });

  test('when both start at the same moment on an empty database, then both come up without an error and every migration and pack version is there once', async () => {
    const [portA, portB] = [await freePort(), await freePort()];
    a = startInstance('instance A', portA);
    b = startInstance('instance B', portB);
    const spawned = Date.now();
    for (const i of [a, b]) {
      // Two processes loading the whole API through tsx on a busy 2-core machine can take a while.
      await waitFor(`${i.name} healthy`, async () => {
        if (i.exited !== undefined) return true;
        return (await fetch(`${i.url}/api/health`).then((r) => r.ok, () => false)) || undefined;
      }, 90_000).catch((err: Error) => {
        throw new Error(`${err.message} after ${Date.now() - spawned} ms; it said:\n${said(i)}`);
      });
      healthy(i);
      assert.ok(i.logs.some((l) => l.msg === 'mail worker started'), `${i.name} delivers mail`);
    }

    // How long each took, from spawning to its log lines (pino's times), for the record.
    for (const i of [a, b]) {
      const at = (msg: string) => Number(i.logs.find((l) => l.msg === msg)?.['time'] ?? NaN) - spawned;
      console.log(`${i.name}: database ready after ${at('database ready')} ms, listening after ${at('Setwright is listening')} ms`);
    }
    // The start-up lock let one migrate and load; the other found it done.
    const ready = [a, b].map((i) => i.logs.find((l) => l.msg === 'database ready') as unknown as { migrations: string[]; procedures: string[] });
    sequelize = createDatabase(url, 4);
    const migrator = createMigrator(sequelize);
    assert.deepEqual(await migrator.pending(), [], 'nothing left to migrate');
    const all = (await migrator.executed()).map((m) => m.name);
    assert.ok(all.includes('0020-shared-throttles-and-mail-batches'));
    assert.deepEqual(ready.map((r) => r.migrations.length).sort((x, y) => x - y), [0, all.length], 'one applied every migration, the other none');
    const packs = readPackFiles();
    assert.deepEqual(ready.map((r) => r.procedures.length).sort((x, y) => x - y), [0, packs.length], 'one loaded every pack version, the other none');

    const [applied] = await sequelize.query('SELECT name, COUNT(*)::int AS n FROM schema_migrations GROUP BY name ORDER BY name');
    assert.deepEqual(applied, all.map((name) => ({ name, n: 1 })));
    const [versions] = await sequelize.query(`SELECT key, version, COUNT(*)::int AS n FROM procedure_versions GROUP BY key, version ORDER BY key, version`);
    assert.equal(versions.length, packs.length);
    assert.ok((versions as { n: number }[]).every((v) => v.n === 1), 'no version loaded twice');
    const [approved] = await sequelize.query(`SELECT key, COUNT(*)::int AS n FROM procedure_versions WHERE status = 'approved' GROUP BY key HAVING COUNT(*) > 1`);
    assert.deepEqual(approved, [], 'one approved version a key');
    const [schedules] = await sequelize.query(`SELECT name FROM ${JOB_SCHEMA}.schedule`);
    assert.deepEqual(schedules, [{ name: 'mail.due-this-week' }], 'the daily job is scheduled once');

    const hash = await bcrypt.hash(DEMO_PASSWORD, loadConfig({ ...process.env, DATABASE_URL: url }).BCRYPT_COST);
    trainee = await makePerson(['trainee'], 'Scale Trainee', hash);
    competent = await makePerson(['competent_person'], 'Scale Competent', hash);
    other = await makePerson(['competent_person'], 'Scale Second Competent', hash);
    workshopAdmin = await makePerson(['workshop_admin'], 'Scale Admin', hash);
  });

  test('when wrong passwords for one account alternate between the two, then the per-account limit holds across both', async () => {
    const remaining: string[] = [];
    for (let n = 0; n < ACCOUNT_LIMIT; n++) {
      const res = await login(n % 2 ? b : a, trainee.email, `wrong guess ${n}`).expect(401);
      // RateLimit carries both throttles ("40-in-15min"; r=…, "4-in-15min"; r=…): the account's is the one with its limit.
      remaining.push(new RegExp(`"${ACCOUNT_LIMIT}-in-[^"]*"; r=(\\d+)`).exec(String(res.headers['ratelimit']))?.[1] ?? String(res.headers['ratelimit']));
    }
    // One count for both: each try, on whichever instance, leaves one fewer.
    assert.deepEqual(remaining, ['3', '2', '1', '0']);
    for (const i of [a, b]) {
      const res = await login(i, trainee.email, DEMO_PASSWORD);
      assert.equal(res.status, 429, `${i.name}: ${JSON.stringify(res.body)}`);
      assert.match(String(res.headers['content-type']), /^application\/problem\+json/);
      assert.equal(res.body.type, '/problems/too-many-sign-in-attempts');
      assert.ok(Number(res.headers['retry-after']) > 0, 'Retry-After is sent');
    }
    const [rows] = await sequelize!.query('SELECT hits FROM throttle_counters WHERE key = $1', { bind: [`sign-in-account:account:${trainee.email}`] });
    assert.deepEqual(rows, [{ hits: ACCOUNT_LIMIT + 2 }], 'one row in the shared table counts every try');
    await sequelize!.query('DELETE FROM throttle_counters WHERE key = $1', { bind: [`sign-in-account:account:${trainee.email}`] });

    // Sign-ins that work take their count back (skipSuccessfulRequests), on either instance.
    tokens['trainee'] = (await login(a, trainee.email, DEMO_PASSWORD).expect(200)).body.accessToken;
    tokens['competent'] = (await login(b, competent.email, DEMO_PASSWORD).expect(200)).body.accessToken;
    tokens['other'] = (await login(a, other.email, DEMO_PASSWORD).expect(200)).body.accessToken;
    const account = await waitFor('the successful sign-in taken back', async () => {
      const [r] = await sequelize!.query('SELECT hits FROM throttle_counters WHERE key = $1', { bind: [`sign-in-account:account:${competent.email}`] });
      return (r as { hits: number }[])[0]?.hits === 0 ? r : undefined;
    }, 5000);
    assert.ok(account);
    healthy(a);
    healthy(b);
  });

  test('when a record is started on one and continued, witnessed and signed on the other, then it is one record, signed once, and the sign-off notice is e-mailed once to each competent person', async () => {
    const key = `scale-${randomUUID().slice(0, 8)}`;
    await approve(fixture(key, 1, 'Tension check on two instances'));
    const machine = await freshMachine('Scale saw');

    const started = await request(a.url).post('/api/records').set(bearer('trainee')).send({ machineId: machine.id, procedureKey: key }).expect(201);
    const id = started.body.id as string;
    const entry = (i: Instance, stepId: string, values: object, extra: object = {}) =>
      request(i.url).post(`/api/records/${id}/entries`).set(bearer('trainee')).send({ idempotencyKey: randomUUID(), stepId, values, ...extra });
    await entry(b, 'isolate', { lock: 'L7' }).expect(201);
    await entry(a, 'tension', { reading: 800 }).expect(201);
    // A witness on the other instance, with their own sign-in.
    const witnessed = await entry(b, 'track', { clear: true }, { witness: { email: competent.email, password: DEMO_PASSWORD } }).expect(201);
    assert.equal(witnessed.body.witnessedBy.id, competent.id);
    // The photo goes into the shared object store through A and is used through B.
    const photo = await request(a.url).post('/api/photos').set(bearer('trainee')).attach('photo', await photoBytes('#456'), 'gauge.jpg').expect(201);
    await entry(b, 'evidence', { shot: [photo.body.id] }).expect(201);
    await request(b.url).post(`/api/records/${id}/finish`).set(bearer('trainee')).send({ password: DEMO_PASSWORD }).expect(200);
    const seen = await request(a.url).get(`/api/records/${id}`).set(bearer('trainee')).expect(200);
    assert.equal(seen.body.status, 'ready_for_signoff');

    await request(a.url).post(`/api/records/${id}/sign-off`).set(bearer('other')).send({ password: DEMO_PASSWORD }).expect(200);
    const check = await request(b.url).get(`/api/records/${id}/check`).set(bearer('trainee')).expect(200);
    assert.equal(check.body.intact, true, JSON.stringify(check.body));

    const record = await SetupRecord.findByPk(id);
    assert.equal(record!.status, 'signed_off');
    assert.equal(await SetupRecord.count({ where: { machineId: machine.id } }), 1);
    assert.equal(await StepEntry.count({ where: { recordId: id } }), 4);

    // Both instances deliver mail; each notice still goes once.
    const notices = await OutboxMessage.findAll({ where: { recordId: id, kind: 'awaiting_sign_off' } });
    assert.deepEqual(notices.map((n) => n.toAddress).sort(), [competent.email, other.email].sort());
    await waitFor('the notices sent', async () => (await OutboxMessage.findAll({ where: { recordId: id } })).every((n) => n.status === 'sent'), 20_000);
    await new Promise((ok) => setTimeout(ok, 1500));
    const mail = await readMailbox(mailDir);
    for (const p of [competent, other]) {
      const got = to(mail, p.email, /^To sign:/).filter((m) => m.text.includes(id));
      assert.equal(got.length, 1, `${p.displayName} got ${got.length} sign-off notices`);
    }
    healthy(a);
    healthy(b);
  });

  test('when the daily job fires on both instances the same day, then the due list and the expiry reminder are e-mailed once', async () => {
    // Something due (a schedule never met on a new machine) and an authorisation that ends in 30 days.
    const machine = await freshMachine('Scale due saw');
    await MachineSchedule.create({ machineId: machine.id, procedureKey: 'blade-tension', intervalDays: 30, triggers: [], allowedWhileTaggedOut: false });
    const today = workshopDate(loadConfig({ ...process.env, DATABASE_URL: url }).WORKSHOP_TIME_ZONE);
    await Authorisation.create({ personId: trainee.id, procedureKey: 'blade-change', grantedById: workshopAdmin.id, grantedAt: new Date(), expiresOn: addDays(today, 30), note: null });

    // What pg-boss's clock sends at 06:00, sent twice, as if both instances' clocks fired.
    const boss = new PgBoss({ connectionString: url, schema: JOB_SCHEMA, migrate: false, supervise: false, schedule: false });
    await boss.start();
    try {
      const jobs = [await boss.send('mail.due-this-week', {}), await boss.send('mail.due-this-week', {})];
      for (const job of jobs) {
        const done = await waitFor('the daily job run', async () => {
          const j = await boss.getJobById('mail.due-this-week', job!, { includeArchive: true });
          return j && ['completed', 'retry', 'failed'].includes(j.state) ? j : undefined;
        }, 20_000);
        assert.equal(done.state, 'completed', JSON.stringify(done.output));
      }
    } finally {
      await boss.stop({ graceful: false });
    }
    const queued = await OutboxMessage.findAll({ where: { kind: { [Op.in]: ['due_this_week', 'authorisation_expiring'] } } });
    assert.deepEqual(queued.filter((m) => m.kind === 'due_this_week').map((m) => m.toAddress).sort(), [competent.email, other.email, workshopAdmin.email].sort());
    assert.deepEqual(queued.filter((m) => m.kind === 'authorisation_expiring').map((m) => m.toAddress), [trainee.email]);
    await waitFor('the reminders sent', async () => (await OutboxMessage.findAll({ where: { id: queued.map((m) => m.id) } })).every((m) => m.status === 'sent'), 20_000);
    await new Promise((ok) => setTimeout(ok, 1500));
    const mail = await readMailbox(mailDir);
    for (const p of [competent, other, workshopAdmin]) {
      const got = to(mail, p.email, /^Due this week:/);
      assert.equal(got.length, 1, `${p.displayName} got ${got.length} due lists`);
      assert.ok(got[0]!.text.includes(machine.name), 'the list names the machine that is due');
    }
    assert.equal(to(mail, trainee.email, /^Your authorisation/).length, 1);
    const [batches] = await sequelize!.query('SELECT key FROM mail_batches');
    assert.deepEqual(batches, [{ key: `mail:daily:${today}` }], 'the day is marked sent once');
    healthy(a);
    healthy(b);
  });
});
