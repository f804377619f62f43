import assert from 'node:assert/strict';
import { randomUUID } from 'node:crypto';
import { after, before, describe, test } from 'node:test';
import bcrypt from 'bcryptjs';
import request from 'supertest';
import { createApp } from '../../api/app';
import { createLogger } from '../../api/lib/logger';
import { RefreshToken } from '../../api/modules/auth/model';
import { OutboxMessage } from '../../api/modules/mail/model';
import { Outbox } from '../../api/modules/mail/outbox';
import { Invitation, NO_PASSWORD, RoleAssignment, User } from '../../api/modules/people/model';
import type { Person } from '../../api/modules/people/repository';
import { hashInvitationToken } from '../../api/modules/people/service';
import { AuditEvent } from '../../api/modules/signoff/model';
import { db, expectProblem, makePerson, ownThrottles, signIn, testConfig } from '../support/api';
import { readMailbox, tokenFrom, waitFor } from '../support/mail';

const PUBLIC_URL = 'https://setwright.brackenford-works.example';
const silent = createLogger('silent');
// Delivered to the test run's own SMTP stand-in, through a queue of this file's own.
const settings = { MAIL_QUEUE: `people-test-${randomUUID().slice(0, 8)}`, MAIL_POLL_SECONDS: '0.5', MAIL_RETRY_DELAY_SECONDS: '1', PUBLIC_URL };
const mailFolder = process.env['MAIL_STAND_IN_DIR']!;
const outbox = new Outbox(db(), testConfig(settings), silent);
const peopleApp = (overrides: Record<string, string> = {}) => {
  const config = testConfig({ ...settings, ...overrides });
  return createApp({ config, sequelize: db(), logger: silent, outbox, throttleNamespace: ownThrottles() });
};
const app = peopleApp();

let admin: Person, otherAdmin: Person, trainee: Person, competent: Person, auditor: Person;
const tokens: Record<string, string> = {};
const as = (who: string) => ({ authorization: `Bearer ${tokens[who]}` });
const uniqueEmail = (who: string) => `${who}.${randomUUID().slice(0, 8)}@tests.example`;
const NEW_PASSWORD = 'band saw blade 27 x 0.9';

/** The one invitation e-mail the stand-in received for this address. */
async function invitationMail(email: string) {
  const mail = await waitFor(`the invitation to ${email}`, async () => {
    const found = (await readMailbox(mailFolder)).filter((m) => m.to.includes(email));
    return found.length ? found : null;
  });
  assert.equal(mail.length, 1, 'exactly one invitation');
  return mail[0]!;
}

async function invite(email: string, roles = ['trainee'], displayName = 'Invited Person') {
  return request(app).post('/api/people').set(as('admin')).send({ email, displayName, roles });
}

before(async () => {
  db();
  admin = await makePerson(['workshop_admin'], 'People Admin');
  otherAdmin = await makePerson(['workshop_admin', 'competent_person'], 'People Second Admin');
  trainee = await makePerson(['trainee'], 'People Trainee');
  competent = await makePerson(['competent_person'], 'People Competent');
  auditor = await makePerson(['auditor'], 'People Auditor');
  for (const [name, p] of Object.entries({ admin, otherAdmin, trainee, competent, auditor })) tokens[name] = (await signIn(app, p.email)).token;
  await outbox.start();
});

describe('people admin', () => {
  after(async () => {
    await outbox.stop();
  });

  describe('inviting', () => {
    test('when an admin invites someone, then an inactive account, a hashed 72-hour link and an e-mail with it are made; the link sets the password and they can sign in', async () => {
      const email = uniqueEmail('new.starter');
      const res = await invite(email, ['trainee', 'auditor'], 'New Starter');
      assert.equal(res.status, 201, JSON.stringify(res.body));
      assert.equal(res.body.email, email);
      assert.equal(res.body.state, 'invited');
      assert.deepEqual(res.body.roles, ['auditor', 'trainee']);
      const expires = Date.parse(res.body.invitationExpiresAt);
      assert.ok(Math.abs(expires - (Date.now() + 72 * 3600_000)) < 60_000, 'the link works for 72 hours');

      const user = await User.findOne({ where: { email } });
      assert.equal(user!.active, false);
      assert.equal(user!.passwordHash, NO_PASSWORD);
      const invitations = await Invitation.findAll({ where: { userId: user!.id } });
      assert.equal(invitations.length, 1);
      assert.match(invitations[0]!.tokenHash, /^[0-9a-f]{64}$/);
      assert.equal(invitations[0]!.invitedById, admin.id);
      assert.equal(await AuditEvent.count({ where: { action: 'person.invited', actorId: admin.id, detail: { personId: user!.id } } }), 1);
      expectProblem(await request(app).post('/api/auth/login').send({ email, password: NEW_PASSWORD }), 401);

      const mail = await invitationMail(email);
      assert.equal(mail.subject, 'Your Setwright account at Brackenford Fabrication Training Works');
      assert.match(mail.text, /Your roles: Trainee, Auditor\./);
      const token = tokenFrom(mail.text);
      assert.ok(mail.text.includes(`${PUBLIC_URL}/set-password?token=${token}`));
      assert.equal(invitations[0]!.tokenHash, hashInvitationToken(token), 'only the hash of the token is stored');
      const sent = await OutboxMessage.findOne({ where: { kind: 'invitation', toAddress: email } });
      assert.equal(sent!.status, 'sent');

      const set = await request(app).post('/api/auth/set-password').send({ token, password: NEW_PASSWORD }).expect(200);
      assert.deepEqual(set.body, { email, displayName: 'New Starter' });
      const after = await User.findByPk(user!.id);
      assert.equal(after!.active, true);
      assert.ok(await bcrypt.compare(NEW_PASSWORD, after!.passwordHash));
      assert.ok(Number(after!.passwordHash.split('$')[2]) >= 12, 'bcrypt cost from config, 12 or more');
      assert.ok((await Invitation.findByPk(invitations[0]!.id))!.usedAt instanceof Date);
      assert.equal(await AuditEvent.count({ where: { action: 'person.password_set', actorId: user!.id } }), 1);

      const session = await signIn(app, email, NEW_PASSWORD);
      assert.deepEqual(session.body.user.roles, ['auditor', 'trainee']);
      const list = await request(app).get('/api/people').set(as('admin')).expect(200);
      const row = list.body.find((p: { id: string }) => p.id === user!.id);
      assert.equal(row.state, 'active');
      assert.equal(row.invitationExpiresAt, null);
    });

    test('when the link is used a second time, then it is refused on the token and the password stays as first set', async () => {
      const email = uniqueEmail('twice');
      await invite(email).then((r) => assert.equal(r.status, 201));
      const token = tokenFrom((await invitationMail(email)).text);
      await request(app).post('/api/auth/set-password').send({ token, password: NEW_PASSWORD }).expect(200);
      const hash = (await User.findOne({ where: { email } }))!.passwordHash;
      const problem = expectProblem(await request(app).post('/api/auth/set-password').send({ token, password: 'someone else 12345' }), 422);
      assert.equal(problem.errors?.[0]?.pointer, '#/token');
      assert.match(problem.detail, /used already, has run out/);
      assert.equal((await User.findOne({ where: { email } }))!.passwordHash, hash);
      expectProblem(await request(app).post('/api/auth/login').send({ email, password: 'someone else 12345' }), 401);
    });

    test('when the link has run out, then it is refused and the account stays inactive', async () => {
      const email = uniqueEmail('late');
      await invite(email).then((r) => assert.equal(r.status, 201));
      const token = tokenFrom((await invitationMail(email)).text);
      const user = await User.findOne({ where: { email } });
      await Invitation.update({ expiresAt: new Date(Date.now() - 1000) }, { where: { userId: user!.id } });
      const problem = expectProblem(await request(app).post('/api/auth/set-password').send({ token, password: NEW_PASSWORD }), 422);
      assert.equal(problem.errors?.[0]?.pointer, '#/token');
      const after = await User.findByPk(user!.id);
      assert.equal(after!.active, false);
      assert.equal(after!.passwordHash, NO_PASSWORD);
      assert.equal((await Invitation.findOne({ where: { userId: user!.id } }))!.usedAt, null);
      const listed = (await request(app).get(`/api/people/${user!.id}`).set(as('admin')).expect(200)).body;
      assert.ok(Date.parse(listed.invitationExpiresAt) < Date.now(), 'the page can say the link ran out');
    });

    test('when an admin sends the invitation again, then the old link stops working and the new one works', async () => {
      const email = uniqueEmail('again');
      const first = await invite(email);
      const oldToken = tokenFrom((await invitationMail(email)).text);
      await request(app).post(`/api/people/${first.body.id}/invitation`).set(as('admin')).expect(201);
      const mail = await waitFor('the second invitation', async () => {
        const found = (await readMailbox(mailFolder)).filter((m) => m.to.includes(email));
        return found.length === 2 ? found : null;
      });
      const newToken = mail.map((m) => tokenFrom(m.text)).find((t) => t !== oldToken)!;
      expectProblem(await request(app).post('/api/auth/set-password').send({ token: oldToken, password: NEW_PASSWORD }), 422);
      await request(app).post('/api/auth/set-password').send({ token: newToken, password: NEW_PASSWORD }).expect(200);
      const rows = await Invitation.findAll({ where: { userId: first.body.id } });
      assert.equal(rows.length, 2);
      assert.equal(rows.filter((r) => r.revokedAt).length, 1);
      assert.equal(rows.filter((r) => r.usedAt).length, 1);
      // Once they have a password there is nothing to invite them to.
      const problem = expectProblem(await request(app).post(`/api/people/${first.body.id}/invitation`).set(as('admin')), 409);
      assert.match(problem.detail, /set a password already/);
    });

    test('when the new password is short or the link is mangled, then a 400 problem points at each and nothing changes', async () => {
      const email = uniqueEmail('short');
      await invite(email).then((r) => assert.equal(r.status, 201));
      const token = tokenFrom((await invitationMail(email)).text);
      const short = expectProblem(await request(app).post('/api/auth/set-password').send({ token, password: 'eleven char' }), 400);
      assert.deepEqual(short.errors, [{ pointer: '#/password', detail: 'Use at least 12 characters.' }]);
      const long = expectProblem(await request(app).post('/api/auth/set-password').send({ token, password: 'x'.repeat(73) }), 400);
      assert.equal(long.errors?.[0]?.pointer, '#/password');
      const mangled = expectProblem(await request(app).post('/api/auth/set-password').send({ token: 'abc', password: NEW_PASSWORD }), 400);
      assert.equal(mangled.errors?.[0]?.pointer, '#/token');
      const unknown = expectProblem(await request(app).post('/api/auth/set-password').send({ token: 'A'.repeat(43), password: NEW_PASSWORD }), 422);
      assert.equal(unknown.errors?.[0]?.pointer, '#/token');
      const user = await User.findOne({ where: { email } });
      assert.equal(user!.active, false);
      assert.equal((await Invitation.findOne({ where: { userId: user!.id } }))!.usedAt, null);
    });

    test('when the invitation has mistakes or the email is taken, then the problem points at the fields and nobody is added', async () => {
      const bad = expectProblem(await request(app).post('/api/people').set(as('admin')).send({ email: 'not an email', displayName: '', roles: [] }), 400);
      assert.deepEqual(bad.errors!.map((e) => e.pointer).sort(), ['#/displayName', '#/email', '#/roles']);
      const wrongRole = expectProblem(await request(app).post('/api/people').set(as('admin')).send({ email: uniqueEmail('x'), displayName: 'X Person', roles: ['foreman'] }), 400);
      assert.equal(wrongRole.errors?.[0]?.pointer, '#/roles/0');
      const before = await User.count();
      const taken = expectProblem(await invite(trainee.email.toUpperCase()), 409);
      assert.deepEqual(taken.errors, [{ pointer: '#/email', detail: 'Someone already has this email address.' }]);
      assert.equal(await User.count(), before);
      assert.equal(await OutboxMessage.count({ where: { kind: 'invitation', toAddress: trainee.email } }), 0);
    });

    test('when set-password is tried again and again from one address, then it is throttled like sign-in', async () => {
      const throttled = peopleApp({ LOGIN_LIMIT_PER_ADDRESS: '3' });
      for (let i = 0; i < 3; i++) expectProblem(await request(throttled).post('/api/auth/set-password').send({ token: 'B'.repeat(43), password: NEW_PASSWORD }), 422);
      const problem = expectProblem(await request(throttled).post('/api/auth/set-password').send({ token: 'B'.repeat(43), password: NEW_PASSWORD }), 429);
      assert.equal(problem.title, 'Too many attempts');
    });
  });

  describe('roles and deactivation', () => {
    test('when an admin changes someone’s roles, then exactly those roles are stored and the change is in the audit trail', async () => {
      const person = await makePerson(['trainee'], 'Roles Change');
      const res = await request(app).put(`/api/people/${person.id}/roles`).set(as('admin')).send({ roles: ['competent_person', 'auditor'] }).expect(200);
      assert.deepEqual(res.body.roles, ['auditor', 'competent_person']);
      const stored = (await RoleAssignment.findAll({ where: { userId: person.id } })).map((r) => r.role).sort();
      assert.deepEqual(stored, ['auditor', 'competent_person']);
      const event = await AuditEvent.findOne({ where: { action: 'person.roles_changed', actorId: admin.id }, order: [['at', 'DESC']] });
      assert.deepEqual(event!.detail, { personId: person.id, before: ['trainee'], after: ['auditor', 'competent_person'] });
    });

    test('when the roles are empty, repeated or unknown, then a 400 problem points at roles and nothing changes', async () => {
      const person = await makePerson(['trainee'], 'Roles Bad');
      const empty = expectProblem(await request(app).put(`/api/people/${person.id}/roles`).set(as('admin')).send({ roles: [] }), 400);
      assert.deepEqual(empty.errors, [{ pointer: '#/roles', detail: 'Give at least one role.' }]);
      const twice = expectProblem(await request(app).put(`/api/people/${person.id}/roles`).set(as('admin')).send({ roles: ['trainee', 'trainee'] }), 400);
      assert.equal(twice.errors?.[0]?.pointer, '#/roles');
      expectProblem(await request(app).put(`/api/people/${person.id}/roles`).set(as('admin')).send({ roles: ['boss'] }), 400);
      expectProblem(await request(app).put(`/api/people/not-a-uuid/roles`).set(as('admin')).send({ roles: ['trainee'] }), 400);
      expectProblem(await request(app).put(`/api/people/${randomUUID()}/roles`).set(as('admin')).send({ roles: ['trainee'] }), 404);
      assert.deepEqual((await RoleAssignment.findAll({ where: { userId: person.id } })).map((r) => r.role), ['trainee']);
    });

    test('when an admin removes their own admin role, then it is refused on roles; another admin may remove it', async () => {
      const problem = expectProblem(await request(app).put(`/api/people/${otherAdmin.id}/roles`).set(as('otherAdmin')).send({ roles: ['competent_person'] }), 403);
      assert.equal(problem.errors?.[0]?.pointer, '#/roles');
      assert.deepEqual((await RoleAssignment.findAll({ where: { userId: otherAdmin.id } })).map((r) => r.role).sort(), ['competent_person', 'workshop_admin']);
      // Keeping their admin role while changing the rest is fine.
      await request(app).put(`/api/people/${otherAdmin.id}/roles`).set(as('otherAdmin')).send({ roles: ['workshop_admin', 'competent_person', 'auditor'] }).expect(200);
      const demoted = await makePerson(['workshop_admin'], 'Roles Demoted Admin');
      const res = await request(app).put(`/api/people/${demoted.id}/roles`).set(as('admin')).send({ roles: ['trainee'] }).expect(200);
      assert.deepEqual(res.body.roles, ['trainee']);
    });

    test('when an admin deactivates someone, then their sessions end at once and they cannot sign in; reactivated, they can', async () => {
      const person = await makePerson(['trainee'], 'Deactivated Later');
      const session = await signIn(app, person.email);
      await request(app).get('/api/people/me').set({ authorization: `Bearer ${session.token}` }).expect(200);
      const res = await request(app).post(`/api/people/${person.id}/deactivate`).set(as('admin')).expect(200);
      assert.equal(res.body.state, 'deactivated');
      const user = await User.findByPk(person.id);
      assert.equal(user!.active, false);
      assert.ok(user!.deactivatedAt instanceof Date);
      assert.equal(await RefreshToken.count({ where: { userId: person.id, revokedAt: null } }), 0, 'every refresh token revoked');
      expectProblem(await request(app).get('/api/people/me').set({ authorization: `Bearer ${session.token}` }), 401);
      expectProblem(await request(app).post('/api/auth/refresh').set('Cookie', session.cookie), 401);
      expectProblem(await request(app).post('/api/auth/login').send({ email: person.email, password: 'saw-demo-2026' }), 401);
      assert.equal(await AuditEvent.count({ where: { action: 'person.deactivated', actorId: admin.id, detail: { personId: person.id } } }), 1);

      const back = await request(app).post(`/api/people/${person.id}/reactivate`).set(as('admin')).expect(200);
      assert.equal(back.body.state, 'active');
      assert.equal((await User.findByPk(person.id))!.deactivatedAt, null);
      await signIn(app, person.email);
    });

    test('when an admin tries to deactivate themselves, then it is refused and they stay active', async () => {
      const problem = expectProblem(await request(app).post(`/api/people/${admin.id}/deactivate`).set(as('admin')), 403);
      assert.match(problem.detail, /cannot deactivate yourself/);
      assert.equal((await User.findByPk(admin.id))!.active, true);
      assert.equal((await User.findByPk(admin.id))!.deactivatedAt, null);
    });

    test('when an invited person is deactivated, then their link stops working; reactivated, they are invited again and need a new link', async () => {
      const email = uniqueEmail('stopped');
      const invited = await invite(email);
      const token = tokenFrom((await invitationMail(email)).text);
      await request(app).post(`/api/people/${invited.body.id}/deactivate`).set(as('admin')).expect(200);
      expectProblem(await request(app).post('/api/auth/set-password').send({ token, password: NEW_PASSWORD }), 422);
      const back = await request(app).post(`/api/people/${invited.body.id}/reactivate`).set(as('admin')).expect(200);
      assert.equal(back.body.state, 'invited');
      assert.equal(back.body.active, false);
      assert.equal(back.body.invitationExpiresAt, null, 'the old link is gone');
      expectProblem(await request(app).post('/api/auth/set-password').send({ token, password: NEW_PASSWORD }), 422);
      const taken = expectProblem(await invite(email), 409);
      assert.equal(taken.errors?.[0]?.pointer, '#/email');
    });
  });

  describe('who may do what', () => {
    test('when anyone but a workshop admin calls a people admin route, then it is 403 (401 signed out) and nothing changes', async () => {
      const target = await makePerson(['trainee'], 'Matrix Target');
      const email = uniqueEmail('matrix');
      const routes: { method: 'get' | 'post' | 'put'; path: string; body?: object; ok: number }[] = [
        { method: 'get', path: '/api/people', ok: 200 },
        { method: 'get', path: `/api/people/${target.id}`, ok: 200 },
        { method: 'post', path: '/api/people', body: { email, displayName: 'Matrix Invitee', roles: ['trainee'] }, ok: 201 },
        { method: 'put', path: `/api/people/${target.id}/roles`, body: { roles: ['trainee', 'auditor'] }, ok: 200 },
        { method: 'post', path: `/api/people/${target.id}/deactivate`, ok: 200 },
        { method: 'post', path: `/api/people/${target.id}/reactivate`, ok: 200 },
        { method: 'get', path: '/api/dev/mail', ok: 200 },
      ];
      for (const route of routes) {
        const call = (headers: Record<string, string>) => request(app)[route.method](route.path).set(headers).send(route.body);
        expectProblem(await call({}), 401);
        for (const who of ['trainee', 'competent', 'auditor']) {
          const problem = expectProblem(await call(as(who)), 403);
          assert.match(problem.detail, /workshop_admin/, `${who} on ${route.method} ${route.path}`);
        }
        if (route.path === `/api/people/${target.id}/deactivate`) {
          assert.equal((await User.findByPk(target.id))!.active, true, 'nobody but an admin deactivated them');
        }
      }
      assert.equal(await User.count({ where: { email } }), 0, 'nobody but an admin invited anyone');
      assert.deepEqual((await RoleAssignment.findAll({ where: { userId: target.id } })).map((r) => r.role), ['trainee']);
      for (const route of routes) {
        const res = await request(app)[route.method](route.path).set(as('admin')).send(route.body);
        assert.equal(res.status, route.ok, `admin on ${route.method} ${route.path}: ${JSON.stringify(res.body)}`);
      }
      // The invitation route of an invited person, for every role too.
      const invited = (await User.findOne({ where: { email } }))!;
      for (const who of ['trainee', 'competent', 'auditor']) expectProblem(await request(app).post(`/api/people/${invited.id}/invitation`).set(as(who)), 403);
      expectProblem(await request(app).post(`/api/people/${invited.id}/invitation`), 401);
      assert.equal(await Invitation.count({ where: { userId: invited.id } }), 1);
      await request(app).post(`/api/people/${invited.id}/invitation`).set(as('admin')).expect(201);
      // Set-password is open: no token needed, the link is the credential.
      expectProblem(await request(app).post('/api/auth/set-password').send({ token: 'C'.repeat(43), password: NEW_PASSWORD }), 422);
    });

    test('when a workshop admin opens the people list, then everyone is there with roles and state', async () => {
      const email = uniqueEmail('listed');
      await invite(email, ['competent_person'], 'Listed Invitee');
      const res = await request(app).get('/api/people').set(as('admin')).expect(200);
      const byEmail = new Map(res.body.map((p: { email: string }) => [p.email, p]));
      assert.deepEqual(byEmail.get(trainee.email), {
        id: trainee.id,
        email: trainee.email,
        displayName: 'People Trainee',
        roles: ['trainee'],
        active: true,
        state: 'active',
        invitationExpiresAt: null,
        createdAt: (await User.findByPk(trainee.id))!.createdAt.toISOString(),
      });
      const invited = byEmail.get(email) as { state: string; roles: string[]; invitationExpiresAt: string };
      assert.equal(invited.state, 'invited');
      assert.deepEqual(invited.roles, ['competent_person']);
      assert.ok(Date.parse(invited.invitationExpiresAt) > Date.now());
      assert.ok(!JSON.stringify(res.body).includes('$2'), 'no password hashes');
    });
  });

  describe('the stand-in’s mailbox', () => {
    test('when an admin lists the stand-in’s mail in development, then each message shows with its links', async () => {
      const email = uniqueEmail('mailbox');
      await invite(email, ['trainee'], 'Mailbox Invitee');
      const token = tokenFrom((await invitationMail(email)).text);
      const dev = peopleApp({ NODE_ENV: 'development' });
      const res = await request(dev).get('/api/dev/mail').set(as('admin')).expect(200);
      const message = res.body.find((m: { to: string[] }) => m.to.some((t) => t.includes(email)));
      assert.equal(message.subject, 'Your Setwright account at Brackenford Fabrication Training Works');
      assert.deepEqual(message.to, [`Mailbox Invitee <${email}>`]);
      assert.deepEqual(message.links, [`${PUBLIC_URL}/set-password?token=${token}`]);
      assert.match(message.from, /setwright@brackenford-works\.example/);
      const times = res.body.map((m: { id: string }) => m.id);
      assert.deepEqual(times, [...times].sort().reverse(), 'newest first');
    });

    test('when the server runs in production, then there is no mailbox route at all', async () => {
      const production = peopleApp({ NODE_ENV: 'production' });
      const problem = expectProblem(await request(production).get('/api/dev/mail').set(as('admin')), 404);
      assert.match(problem.detail, /There is no GET \/api\/dev\/mail/);
    });
  });
});
