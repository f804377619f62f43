import assert from 'node:assert/strict';
import { createSecretKey } from 'node:crypto';
import { describe, test } from 'node:test';
import jwt from 'jsonwebtoken';
import request from 'supertest';
import { RefreshToken } from '../../api/modules/auth/model';
import { hashRefreshToken } from '../../api/modules/auth/tokens';
import { User } from '../../api/modules/people/model';
import { setActive } from '../../api/modules/people/repository';
import { DEMO_PEOPLE } from '../../api/db/seed';
import { createApp } from '../../api/app';
import { createLogger } from '../../api/lib/logger';
import { db, expectProblem, makePerson, ownThrottles, PASSWORD, signIn, testApp, testConfig } from '../support/api';

describe('signing in', () => {
  test('when the email and password are right, then a token, the person and a refresh cookie come back, and only a hash of the refresh token is stored', async () => {
    const app = testApp();
    const person = await makePerson(['trainee', 'auditor'], 'Signin Right');
    const res = await request(app).post('/api/auth/login').send({ email: person.email.toUpperCase(), password: PASSWORD }).expect(200);
    assert.equal(typeof res.body.accessToken, 'string');
    assert.equal(res.body.expiresIn, 900);
    assert.deepEqual(res.body.user, { id: person.id, email: person.email, displayName: 'Signin Right', roles: ['auditor', 'trainee'] });
    assert.ok(!JSON.stringify(res.body).includes('$2'), 'no password hash in the response');
    const cookie = ([] as string[]).concat(res.headers['set-cookie']).find((c) => c.startsWith('sw_refresh='))!;
    assert.match(cookie, /HttpOnly/);
    assert.match(cookie, /SameSite=Strict/);
    assert.match(cookie, /Path=\/api\/auth/);
    const value = cookie.split(';')[0]!.split('=')[1]!;
    const rows = await RefreshToken.findAll({ where: { userId: person.id } });
    assert.equal(rows.length, 1);
    assert.equal(rows[0]!.tokenHash, hashRefreshToken(value));
    assert.notEqual(rows[0]!.tokenHash, value);
  });

  test('when the app stores a password, then it is a bcrypt hash of cost 12 or more', async () => {
    db();
    const user = await User.findOne({ where: { email: DEMO_PEOPLE[0]!.email } });
    const cost = Number(user!.passwordHash.split('$')[2]);
    assert.ok(cost >= 12, `cost ${cost}`);
  });

  test('when the password is wrong or the email unknown or the account deactivated, then all three get the same 401 problem and no refresh token', async () => {
    const app = testApp();
    const person = await makePerson(['trainee'], 'Signin Wrong');
    const off = await makePerson(['trainee'], 'Signin Deactivated');
    await setActive(off.id, false);
    const wrong = expectProblem(await request(app).post('/api/auth/login').send({ email: person.email, password: 'not it' }), 401);
    const unknown = expectProblem(await request(app).post('/api/auth/login').send({ email: 'nobody@tests.example', password: 'not it' }), 401);
    const deactivated = expectProblem(await request(app).post('/api/auth/login').send({ email: off.email, password: PASSWORD }), 401);
    const strip = (b: Record<string, unknown>) => ({ ...b, instance: undefined });
    assert.deepEqual(strip(wrong), strip(unknown));
    assert.deepEqual(strip(deactivated), strip(unknown));
    assert.equal(wrong.errors?.[0]?.pointer, '#/password');
    assert.equal(await RefreshToken.count({ where: { userId: [person.id, off.id] } }), 0);
  });

  test('when the body is not valid, then a 400 problem points at each field', async () => {
    const res = await request(testApp()).post('/api/auth/login').send({ email: 'not-an-email', password: '' });
    const problem = expectProblem(res, 400);
    const pointers = problem.errors!.map((e) => e.pointer).sort();
    assert.deepEqual(pointers, ['#/email', '#/password']);
    assert.ok(problem.errors!.every((e) => e.detail.length > 0));
  });

  test('when the body is not JSON at all, then a 400 problem says it could not be read', async () => {
    const res = await request(testApp()).post('/api/auth/login').set('content-type', 'application/json').send('{"email":');
    const problem = expectProblem(res, 400);
    assert.equal(problem.type, '/problems/unreadable-request');
  });
});

describe('throttling sign-in', () => {
  test('when one account fails too often, then the next attempt is a 429 problem, even with the right password', async () => {
    const app = testApp({ LOGIN_LIMIT_PER_ACCOUNT: '3' });
    const person = await makePerson(['trainee'], 'Throttle Account');
    for (let i = 0; i < 3; i++) {
      expectProblem(await request(app).post('/api/auth/login').send({ email: person.email, password: 'guess' + i }), 401);
    }
    const res = await request(app).post('/api/auth/login').send({ email: person.email, password: PASSWORD });
    const problem = expectProblem(res, 429);
    assert.equal(problem.type, '/problems/too-many-sign-in-attempts');
    assert.ok(res.headers['ratelimit'], 'rate-limit headers are sent');
    assert.equal(await RefreshToken.count({ where: { userId: person.id } }), 0);
  });

  test('when one address tries many accounts, then it is throttled too', async () => {
    const app = testApp({ LOGIN_LIMIT_PER_ADDRESS: '2' });
    expectProblem(await request(app).post('/api/auth/login').send({ email: 'a@tests.example', password: 'x' }), 401);
    expectProblem(await request(app).post('/api/auth/login').send({ email: 'b@tests.example', password: 'x' }), 401);
    const problem = expectProblem(await request(app).post('/api/auth/login').send({ email: 'c@tests.example', password: 'x' }), 429);
    assert.match(problem.detail, /this device/);
  });
});

describe('access tokens', () => {
  const config = testConfig();
  const key = createSecretKey(Buffer.from(config.JWT_SECRET));
  const base = { issuer: config.JWT_ISSUER, audience: config.JWT_AUDIENCE, expiresIn: 300 } as const;

  async function meWith(token: string) {
    return request(testApp()).get('/api/people/me').set('authorization', `Bearer ${token}`);
  }

  test('when the token is good, then the person comes back', async () => {
    const person = await makePerson(['trainee'], 'Token Good');
    const res = await meWith(jwt.sign({}, key, { ...base, subject: person.id, algorithm: 'HS256' }));
    assert.equal(res.status, 200);
    assert.equal(res.body.id, person.id);
  });

  const cases: [string, (id: string) => string][] = [
    ['signed with another key', (id) => jwt.sign({}, 'another secret that is long enough to pass', { ...base, subject: id })],
    ['unsigned (alg none)', (id) => jwt.sign({}, null as unknown as string, { ...base, subject: id, algorithm: 'none' })],
    ['from another issuer', (id) => jwt.sign({}, key, { ...base, issuer: 'someone-else', subject: id })],
    ['for another audience', (id) => jwt.sign({}, key, { ...base, audience: 'another-api', subject: id })],
    ['expired', (id) => jwt.sign({ exp: Math.floor(Date.now() / 1000) - 60 }, key, { issuer: base.issuer, audience: base.audience, subject: id })],
    ['with its payload edited', (id) => {
      const [h, , s] = jwt.sign({}, key, { ...base, subject: id }).split('.');
      const body = Buffer.from(JSON.stringify({ sub: id, roles: ['workshop_admin'], iss: base.issuer, aud: base.audience, exp: 9999999999 })).toString('base64url');
      return `${h}.${body}.${s}`;
    }],
    ['not a token at all', () => 'not.a.token'],
  ];
  for (const [name, make] of cases) {
    test(`when the token is ${name}, then the request is a 401 problem`, async () => {
      const person = await makePerson(['trainee'], 'Token Bad');
      const problem = expectProblem(await meWith(make(person.id)), 401);
      assert.equal(problem.type, '/problems/not-signed-in');
    });
  }

  test('when there is no token, then a protected route is a 401 problem', async () => {
    expectProblem(await request(testApp()).get('/api/machines'), 401);
  });

  test('when a person is deactivated, then their access token and refresh token stop working at once', async () => {
    const app = testApp();
    const person = await makePerson(['competent_person'], 'Token Deactivated');
    const { token, cookie } = await signIn(app, person.email);
    await request(app).get('/api/people/me').set('authorization', `Bearer ${token}`).expect(200);
    await setActive(person.id, false);
    expectProblem(await request(app).get('/api/people/me').set('authorization', `Bearer ${token}`), 401);
    expectProblem(await request(app).post('/api/auth/refresh').set('cookie', cookie), 401);
  });
});

describe('refresh and sign-out', () => {
  test('when the refresh cookie is used, then a new token comes back and the old refresh token is revoked', async () => {
    const app = testApp();
    const person = await makePerson(['auditor'], 'Refresh Rotate');
    const first = await signIn(app, person.email);
    const res = await request(app).post('/api/auth/refresh').set('cookie', first.cookie).expect(200);
    assert.equal(res.body.user.id, person.id);
    const rows = await RefreshToken.findAll({ where: { userId: person.id }, order: [['createdAt', 'ASC']] });
    assert.equal(rows.length, 2);
    assert.ok(rows[0]!.revokedAt, 'the used token is revoked');
    assert.equal(rows[1]!.revokedAt, null);
  });

  test('when a refresh token is replayed, then it is refused and every session of that person ends', async () => {
    const app = testApp();
    const person = await makePerson(['auditor'], 'Refresh Replay');
    const first = await signIn(app, person.email);
    await request(app).post('/api/auth/refresh').set('cookie', first.cookie).expect(200);
    expectProblem(await request(app).post('/api/auth/refresh').set('cookie', first.cookie), 401);
    assert.equal(await RefreshToken.count({ where: { userId: person.id, revokedAt: null } }), 0);
  });

  test('when a person signs out, then their refresh token is revoked and the cookie cleared', async () => {
    const app = testApp();
    const person = await makePerson(['trainee'], 'Sign Out');
    const { cookie } = await signIn(app, person.email);
    const res = await request(app).post('/api/auth/logout').set('cookie', cookie).expect(204);
    assert.match(String(res.headers['set-cookie']), /sw_refresh=;/);
    expectProblem(await request(app).post('/api/auth/refresh').set('cookie', cookie), 401);
    assert.equal(await RefreshToken.count({ where: { userId: person.id, revokedAt: null } }), 0);
  });
});

describe('secrets in the logs', () => {
  test('when people sign in, fail to, and use their tokens with request logging on, then no password, hash or token reaches the log', async () => {
    const lines: string[] = [];
    const logger = createLogger('debug', { write: (line: string) => void lines.push(line) });
    const config = testConfig({ NODE_ENV: 'development', LOG_LEVEL: 'debug' });
    const app = createApp({ config, sequelize: db(), logger, throttleNamespace: ownThrottles() });
    const person = await makePerson(['trainee'], 'Log Watcher');
    await request(app).post('/api/auth/login').send({ email: person.email, password: 'a-wrong-password-123' }).expect(401);
    const ok = await request(app).post('/api/auth/login').send({ email: person.email, password: PASSWORD }).expect(200);
    await request(app).get('/api/people/me').set('authorization', `Bearer ${ok.body.accessToken}`).expect(200);
    const log = lines.join('');
    assert.ok(lines.length >= 3, 'requests were logged');
    assert.ok(!log.includes(PASSWORD) && !log.includes('a-wrong-password-123'), 'no password');
    assert.ok(!log.includes(ok.body.accessToken), 'no access token');
    assert.ok(!/\$2[aby]\$/.test(log), 'no bcrypt hash');
    assert.ok(!/sw_refresh=/.test(log), 'no refresh cookie');
  });
});
