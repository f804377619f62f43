import { randomUUID } from 'node:crypto';
import { after } from 'node:test';
import bcrypt from 'bcryptjs';
import type { Express } from 'express';
import request from 'supertest';
import type { Sequelize } from 'sequelize';
import { createApp } from '../../api/app';
import { loadConfig, type Config } from '../../api/config';
import type { Role } from '../../api/contracts/roles';
import { createDatabase } from '../../api/db/database';
import { DEMO_PASSWORD } from '../../api/db/seed';
import { createLogger } from '../../api/lib/logger';
import { upsertPerson, type Person } from '../../api/modules/people/repository';

let sequelize: Sequelize | undefined;
// Registered when the test file imports this module, so it runs once, after the whole file.
after(async () => {
  await sequelize?.close();
});

/** The one database connection of this test file (the cluster that `npm test` started), closed after the file. */
export function db(): Sequelize {
  if (!sequelize) {
    const config = testConfig();
    sequelize = createDatabase(config.DATABASE_URL, 4);
  }
  return sequelize;
}

export function testConfig(overrides: Record<string, string> = {}): Config {
  if (!process.env['DATABASE_URL']) throw new Error('Run the API tests through `npm test`, which starts their database.');
  return loadConfig({ ...process.env, NODE_ENV: 'test', LOG_LEVEL: 'silent', ...overrides });
}

/**
 * A throttle namespace of its own for one app: the throttles count in one shared table, so without
 * it the tries of every app in the test run would add up (as they should between real instances).
 */
export function ownThrottles(): string {
  return `test-${randomUUID()}:`;
}

/** A fresh app on the real database, with throttle counts of its own; overrides change its settings (for throttling limits, say). */
export function testApp(overrides: Record<string, string> = {}): Express {
  const config = testConfig(overrides);
  return createApp({ config, sequelize: db(), logger: createLogger('silent'), throttleNamespace: ownThrottles() });
}

export const PASSWORD = DEMO_PASSWORD;
let cachedHash: string | undefined;

/** A new person with these roles, unique to the test, with the shared test password. */
export async function makePerson(roles: Role[], name = 'Test person'): Promise<Person> {
  db();
  cachedHash ??= await bcrypt.hash(PASSWORD, testConfig().BCRYPT_COST);
  const email = `${name.toLowerCase().replace(/[^a-z]+/g, '.')}.${randomUUID().slice(0, 8)}@tests.example`;
  return upsertPerson({ email, displayName: name, passwordHash: cachedHash, roles });
}

/** Sign in through the API and return the access token and the refresh cookie. */
export async function signIn(app: Express, email: string, password = PASSWORD) {
  const res = await request(app).post('/api/auth/login').send({ email, password }).expect(200);
  const cookie = ([] as string[]).concat(res.headers['set-cookie'] ?? []).find((c) => c.startsWith('sw_refresh='));
  return { token: res.body.accessToken as string, cookie: cookie!.split(';')[0]!, body: res.body };
}

/** Assert the RFC 9457 shape and return the body. */
export function expectProblem(res: request.Response, status: number) {
  if (res.status !== status) throw new Error(`expected ${status}, got ${res.status}: ${JSON.stringify(res.body)}`);
  if (!String(res.headers['content-type']).startsWith('application/problem+json')) {
    throw new Error(`expected problem+json, got ${res.headers['content-type']}`);
  }
  for (const key of ['type', 'title', 'status', 'detail']) {
    if (!(key in res.body)) throw new Error(`problem lacks "${key}": ${JSON.stringify(res.body)}`);
  }
  return res.body as { type: string; title: string; status: number; detail: string; errors?: { pointer: string; detail: string }[] };
}
