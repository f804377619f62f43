import assert from 'node:assert/strict';
import { randomUUID } from 'node:crypto';
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { after, before, describe, test } from 'node:test';
import PgBoss from 'pg-boss';
import { Op } from 'sequelize';
import sharp from 'sharp';
import request from 'supertest';
import { createApp } from '../../api/app';
import { JOB_SCHEMA } from '../../api/db/migrations/0007-outbox-and-invitations';
import { DEMO_MACHINES } from '../../api/db/seed';
import { createLogger } from '../../api/lib/logger';
import { OutboxMessage } from '../../api/modules/mail/model';
import { Notifier } from '../../api/modules/mail/notifier';
import { Outbox } from '../../api/modules/mail/outbox';
import { Machine } from '../../api/modules/machines/model';
import { Invitation } from '../../api/modules/people/model';
import { setActive, type Person } from '../../api/modules/people/repository';
import { hashInvitationToken } from '../../api/modules/people/service';
import { freePort } from '../../scripts/lib/ports';
import { startSmtpStandIn, type SmtpStandIn } from '../../scripts/lib/smtp';
import { db, makePerson, ownThrottles, PASSWORD, signIn, testConfig } from '../support/api';
import { readMailbox, tokenFrom, waitFor, type StoredMail } from '../support/mail';
import { approve, fixture } from '../support/procedures';

const PUBLIC_URL = 'https://setwright.brackenford-works.example';
const silent = createLogger('silent');

// The relay this file talks to is its own stand-in, on a port of its own, stopped to begin with;
// the queue is its own too, so no other test file's worker delivers these messages.
const folder = mkdtempSync(join(tmpdir(), 'setwright-mail-test-'));
const port = await freePort();
const config = testConfig({
  MAIL_QUEUE: `mail-test-${randomUUID().slice(0, 8)}`,
  SMTP_HOST: '127.0.0.1',
  SMTP_PORT: String(port),
  SMTP_IGNORE_TLS: 'true',
  MAIL_POLL_SECONDS: '0.5',
  MAIL_RETRY_DELAY_SECONDS: '1',
  PUBLIC_URL,
});
const outbox = new Outbox(db(), config, silent);
/** A second API instance delivering from the same queue, as when the API runs on several machines. */
const secondOutbox = new Outbox(db(), config, silent);
const app = createApp({ config, sequelize: db(), logger: silent, outbox, throttleNamespace: ownThrottles() });
const notifier = new Notifier(outbox, config, silent);
let standIn: SmtpStandIn | undefined;

let trainee: Person, competent: Person, asleep: Person, admin: Person;
const tokens: Record<string, string> = {};
const as = (who: string) => ({ authorization: `Bearer ${tokens[who]}` });
let procedureKey: string;
let machine: Machine;
/** Every outbox id this file caused, by what caused it. */
const queued: Record<string, string[]> = {};
let finishedId: string, returnedId: string;
const inviteeEmail = `invitee.${randomUUID().slice(0, 8)}@tests.example`;
const reason = 'The tension photo is blurred; take it again with the gauge face square on.';

async function freshMachine(): Promise<Machine> {
  return Machine.create({ ...DEMO_MACHINES[0]!, name: `Mail saw ${randomUUID().slice(0, 6)}`, assetTag: `M-${randomUUID().slice(0, 8)}` });
}

/** A record done and finished by the trainee, ready for sign-off. */
async function finishedRecord(): Promise<string> {
  const m = await freshMachine();
  const started = await request(app).post('/api/records').set(as('trainee')).send({ machineId: m.id, procedureKey }).expect(201);
  const id = started.body.id as string;
  const post = (stepId: string, values: object, extra: object = {}) =>
    request(app).post(`/api/records/${id}/entries`).set(as('trainee')).send({ idempotencyKey: randomUUID(), stepId, values, ...extra }).expect(201);
  await post('isolate', { lock: 'L4' });
  await post('tension', { reading: 800 });
  await post('track', { clear: true }, { witness: { email: competent.email, password: PASSWORD } });
  const jpeg = await sharp({ create: { width: 40, height: 30, channels: 3, background: '#345' } }).jpeg().toBuffer();
  const photo = await request(app).post('/api/photos').set(as('trainee')).attach('photo', jpeg, 'g.jpg').expect(201);
  await post('evidence', { shot: [photo.body.id] });
  await request(app).post(`/api/records/${id}/finish`).set(as('trainee')).send({ password: PASSWORD }).expect(200);
  return id;
}

const mine = async () => {
  const ids = Object.values(queued).flat();
  return OutboxMessage.findAll({ where: { id: { [Op.in]: ids } } });
};
const addressedTo = (mail: StoredMail[], email: string) => mail.filter((m) => m.to.includes(email));

before(async () => {
  db();
  trainee = await makePerson(['trainee'], 'Mail Trainee');
  competent = await makePerson(['competent_person'], 'Mail Competent');
  asleep = await makePerson(['competent_person'], 'Mail Deactivated Competent');
  admin = await makePerson(['workshop_admin'], 'Mail Admin');
  await setActive(asleep.id, false);
  for (const [name, p] of Object.entries({ trainee, competent, admin })) tokens[name] = (await signIn(app, p.email)).token;
  procedureKey = `mail-${randomUUID().slice(0, 8)}`;
  await approve(fixture(procedureKey, 1, 'Tension check for mail'));
  machine = await freshMachine();
});

describe('e-mail through the outbox', () => {
  after(async () => {
    await outbox.stop();
    await secondOutbox.stop();
    await standIn?.stop();
    rmSync(folder, { recursive: true, force: true });
  });

  test('when the relay is down, then every notice waits in the outbox with its failed tries counted, and nothing is lost', async () => {
    await outbox.start();
    await secondOutbox.start();

    finishedId = await finishedRecord();
    queued['awaiting'] = (await OutboxMessage.findAll({ where: { recordId: finishedId, kind: 'awaiting_sign_off' } })).map((r) => r.id);

    returnedId = await finishedRecord();
    await request(app).post(`/api/records/${returnedId}/send-back`).set(as('competent')).send({ reason }).expect(200);
    queued['awaiting'].push(...(await OutboxMessage.findAll({ where: { recordId: returnedId, kind: 'awaiting_sign_off' } })).map((r) => r.id));
    queued['returned'] = (await OutboxMessage.findAll({ where: { recordId: returnedId, kind: 'record_returned' } })).map((r) => r.id);

    const invited = await request(app).post('/api/people').set(as('admin')).send({ email: inviteeEmail, displayName: 'Mail Invitee', roles: ['trainee'] }).expect(201);
    queued['invitation'] = (await OutboxMessage.findAll({ where: { kind: 'invitation', toAddress: inviteeEmail } })).map((r) => r.id);
    assert.equal(invited.body.state, 'invited');

    queued['taggedOut'] = await notifier.notifyTaggedOut(machine, { id: returnedId });
    queued['due'] = await notifier.sendWeeklyDue([
      { machine, procedureTitle: 'Blade tension by gauge', dueOn: '2026-05-14' },
      { machine, procedureTitle: 'Guide bearing setting', dueOn: '2026-05-12', reason: 'after a blade change' },
    ]);
    queued['expiring'] = await notifier.notifyAuthorisationExpiring({ person: trainee, procedureTitle: 'Blade change', expiresOn: '2026-06-01' });

    // Who was meant to hear of each: the stored rows say so before anything is sent.
    const rows = await mine();
    const to = (kind: string) => rows.filter((r) => r.kind === kind).map((r) => r.toAddress);
    assert.ok(to('awaiting_sign_off').includes(competent.email), 'the active competent person');
    assert.ok(!to('awaiting_sign_off').includes(asleep.email), 'not the deactivated competent person');
    assert.ok(!to('awaiting_sign_off').includes(trainee.email), 'not the performer');
    assert.deepEqual(to('record_returned'), [trainee.email]);
    assert.deepEqual(to('invitation'), [inviteeEmail]);
    assert.ok(to('machine_tagged_out').includes(admin.email));
    assert.ok(to('due_this_week').includes(admin.email) && to('due_this_week').includes(competent.email));
    assert.ok(!to('due_this_week').includes(trainee.email));
    assert.deepEqual(to('authorisation_expiring'), [trainee.email]);
    for (const kind of Object.keys(queued)) assert.ok(queued[kind]!.length > 0, `${kind} queued`);

    // The workers try, fail (nothing listens on the port) and keep the messages for later.
    await waitFor('every message tried at least once', async () => (await mine()).every((r) => r.attempts >= 1), 20_000);
    for (const row of await mine()) {
      assert.equal(row.status, 'queued', `${row.kind} to ${row.toAddress} still queued`);
      assert.match(row.lastError ?? '', /ECONNREFUSED|connect/i);
      assert.equal(row.sentAt, null);
    }
    assert.deepEqual(await readMailbox(folder), []);
  });

  test('when the relay comes back, then each message arrives exactly once, though two workers deliver', async () => {
    standIn = await startSmtpStandIn({ directory: folder, port });
    const ids = Object.values(queued).flat();
    // Back-off doubles the wait after each failure, so the last retries may be a while coming.
    await waitFor('every message sent', async () => (await mine()).every((r) => r.status === 'sent'), 120_000);

    const expected = new Set(ids.map((id) => `<${id}@brackenford-works.example>`));
    let mail = await readMailbox(folder);
    assert.equal(mail.length, ids.length, 'one file per message');
    assert.deepEqual(new Set(mail.map((m) => m.messageId)), expected);
    for (const row of await mine()) {
      assert.ok(row.sentAt instanceof Date);
      assert.equal(row.messageId, `<${row.id}@brackenford-works.example>`);
      assert.ok(row.attempts >= 2, 'failed at least once, then went');
    }

    // A job for a message that has gone already (a retried or duplicated job) sends nothing.
    const another = new PgBoss({ connectionString: process.env['DATABASE_URL']!, schema: JOB_SCHEMA, migrate: false, supervise: false, schedule: false });
    await another.start();
    try {
      const jobId = await another.send(config.MAIL_QUEUE, { outboxId: queued['invitation']![0] });
      assert.ok(jobId);
      await waitFor('the duplicate job finished', async () => (await another.getJobById(config.MAIL_QUEUE, jobId!, { includeArchive: true }))?.state === 'completed');
    } finally {
      await another.stop({ graceful: false });
    }
    await new Promise((resolve) => setTimeout(resolve, 1500));
    mail = await readMailbox(folder);
    assert.equal(mail.length, ids.length, 'still one file per message');
  });

  test('when the messages arrive, then each names what it is about and says it in plain words', async () => {
    const mail = await readMailbox(folder);

    const awaiting = addressedTo(mail, competent.email).filter((m) => m.subject.startsWith('To sign:'));
    assert.equal(awaiting.length, 2, 'one for each finished record');
    const first = awaiting.find((m) => m.text.includes(`${PUBLIC_URL}/to-sign/${finishedId}`))!;
    assert.ok(first, 'links to the record to sign');
    assert.match(first.subject, /^To sign: Tension check for mail on Mail saw \w+ \(M-[0-9a-f]{8}\)$/);
    assert.match(first.text, /Mail Trainee has finished "Tension check for mail" \(version 1\)/);
    assert.match(first.html, new RegExp(`href="${PUBLIC_URL}/to-sign/${finishedId}"`));
    assert.equal(addressedTo(mail, asleep.email).length, 0, 'nothing to the deactivated competent person');

    const returned = addressedTo(mail, trainee.email).filter((m) => m.subject.startsWith('Sent back:'));
    assert.equal(returned.length, 1);
    assert.match(returned[0]!.text, /Mail Competent has sent back your record of "Tension check for mail"/);
    assert.ok(returned[0]!.text.includes(`> ${reason}`), 'the reason, quoted');
    assert.ok(returned[0]!.text.includes(`${PUBLIC_URL}/records/${returnedId}`));

    const invitation = addressedTo(mail, inviteeEmail);
    assert.equal(invitation.length, 1);
    assert.equal(invitation[0]!.subject, 'Your Setwright account at Brackenford Fabrication Training Works');
    assert.match(invitation[0]!.text, /Mail Admin has made you an account/);
    assert.match(invitation[0]!.text, /Your role: Trainee\./);
    const token = tokenFrom(invitation[0]!.text);
    assert.ok(invitation[0]!.text.includes(`${PUBLIC_URL}/set-password?token=${token}`));
    const stored = await Invitation.findOne({ where: { tokenHash: hashInvitationToken(token) } });
    assert.ok(stored, 'the link carries the token whose hash is stored');
    assert.equal((await Invitation.count({ where: { tokenHash: token } })), 0, 'the token itself is not stored');

    const tagged = addressedTo(mail, admin.email).filter((m) => m.subject.startsWith('Tagged out:'));
    assert.equal(tagged.length, 1);
    assert.equal(tagged[0]!.subject, `Tagged out: ${machine.name} (${machine.assetTag})`);
    assert.match(tagged[0]!.text, /It failed "Tension check for mail", done by Mail Trainee\./);
    assert.ok(tagged[0]!.text.includes(`${PUBLIC_URL}/machines/${machine.id}`));

    const due = addressedTo(mail, competent.email).filter((m) => m.subject.startsWith('Due this week:'));
    assert.equal(due.length, 1);
    assert.equal(due[0]!.subject, 'Due this week: 2 procedures');
    const lines = due[0]!.text.split('\n').filter((l) => l.startsWith('- '));
    assert.deepEqual(lines, [
      `- Tuesday 12 May 2026: Guide bearing setting on ${machine.name} (${machine.assetTag}) (after a blade change)`,
      `- Thursday 14 May 2026: Blade tension by gauge on ${machine.name} (${machine.assetTag})`,
    ]);

    const expiring = addressedTo(mail, trainee.email).filter((m) => m.subject.startsWith('Your authorisation'));
    assert.equal(expiring.length, 1);
    assert.equal(expiring[0]!.subject, 'Your authorisation for "Blade change" ends on Monday 1 June 2026');

    for (const m of mail) assert.equal(m.from, 'setwright@brackenford-works.example');
  });

  test('when the daily due job runs, then the list from the schedules source goes out once that day; with nothing due, nothing does', async () => {
    const [rows] = await db().query(`SELECT cron, timezone FROM ${JOB_SCHEMA}.schedule WHERE name = :name`, { replacements: { name: `${config.MAIL_QUEUE}.due-this-week` } });
    assert.deepEqual(rows, [{ cron: '0 6 * * *', timezone: 'Europe/London' }], 'every day at 06:00 workshop time');

    let due: { machine: Machine; procedureTitle: string; dueOn: string }[] = [];
    notifier.useDueThisWeek(async () => due);
    const another = new PgBoss({ connectionString: process.env['DATABASE_URL']!, schema: JOB_SCHEMA, migrate: false, supervise: false, schedule: false });
    await another.start();
    const runDaily = async () => {
      // What pg-boss's clock sends at 06:00, sent now.
      const id = await another.send(`${config.MAIL_QUEUE}.due-this-week`, {});
      await waitFor('the daily job done', async () => (await another.getJobById(`${config.MAIL_QUEUE}.due-this-week`, id!, { includeArchive: true }))?.state === 'completed');
    };
    try {
      const before = await OutboxMessage.count({ where: { kind: 'due_this_week' } });
      await runDaily();
      assert.equal(await OutboxMessage.count({ where: { kind: 'due_this_week' } }), before, 'nothing due, nothing sent');
      due = [{ machine, procedureTitle: 'Bow descent speed', dueOn: '2026-05-15' }];
      await runDaily();
      const sent = await OutboxMessage.findAll({ where: { kind: 'due_this_week', toAddress: admin.email, textBody: { [Op.like]: '%Bow descent speed%' } } });
      assert.equal(sent.length, 1);
      assert.equal(sent[0]!.subject, 'Due this week: 1 procedure');
      // Run again the same workshop day (a retry, or a second instance's clock): nothing more goes.
      const afterFirst = await OutboxMessage.count({ where: { kind: 'due_this_week' } });
      await runDaily();
      assert.equal(await OutboxMessage.count({ where: { kind: 'due_this_week' } }), afterFirst, 'the day\'s list goes once');
    } finally {
      await another.stop({ graceful: false });
    }
  });

  test('when authorisations end in 30 or 7 days, then their holders are reminded once on each of those days; other days send nothing', async () => {
    const before = await OutboxMessage.count({ where: { kind: 'authorisation_expiring', toAddress: trainee.email } });
    const ids = await notifier.sendExpiringReminders([
      { personId: trainee.id, procedureTitle: 'Tensioning the blade', expiresOn: '2027-01-01', daysLeft: 30 },
      { personId: trainee.id, procedureTitle: 'Squaring the blade', expiresOn: '2026-12-14', daysLeft: 12 },
      { personId: trainee.id, procedureTitle: 'Tracking the blade', expiresOn: '2026-12-09', daysLeft: 7 },
    ]);
    assert.equal(ids.length, 2);
    const rows = await OutboxMessage.findAll({ where: { kind: 'authorisation_expiring', toAddress: trainee.email }, order: [['createdAt', 'ASC']] });
    assert.equal(rows.length, before + 2);
    const bodies = rows.slice(-2).map((r) => r.textBody).join('\n');
    assert.match(bodies, /Tensioning the blade/);
    assert.match(bodies, /Tracking the blade/);
    assert.doesNotMatch(bodies, /Squaring the blade/);
  });

  test('when a message has markup in what people typed, then the HTML part shows it as text', async () => {
    const ids = await notifier.sendWeeklyDue([{ machine: { ...machine.get(), name: '<b>Saw</b> & "bay"' }, procedureTitle: 'Check <script>', dueOn: '2026-05-13' }]);
    await waitFor('sent', async () => (await OutboxMessage.findAll({ where: { id: ids } })).every((r) => r.status === 'sent'));
    const mail = (await readMailbox(folder)).filter((m) => m.messageId === `<${ids[0]}@brackenford-works.example>`);
    assert.equal(mail.length, 1);
    assert.ok(mail[0]!.html.includes('&lt;b&gt;Saw&lt;/b&gt; &amp; &quot;bay&quot;'));
    assert.ok(!mail[0]!.html.includes('<script>'));
    assert.ok(mail[0]!.text.includes('Check <script> on <b>Saw</b> & "bay"'), 'the plain text is as typed');
  });
});
