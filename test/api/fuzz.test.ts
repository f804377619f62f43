import assert from 'node:assert/strict';
import { before, describe, test } from 'node:test';
import fc from 'fast-check';
import request from 'supertest';
import { QueryTypes } from 'sequelize';
import { db, makePerson, signIn, testApp } from '../support/api';
import { listRoutes } from '../support/routes';

/** Routes that accept any body by design (sign-out only clears the caller's own cookie). */
const ACCEPTS_ANYTHING = new Set(['POST /api/auth/logout']);
const RUNS_PER_ROUTE = Number(process.env['FUZZ_RUNS_PER_ROUTE'] ?? 340);
const FIELD_NAMES = ['email', 'password', 'values', 'stepId', 'idempotencyKey', 'reason', 'text', 'machineId', 'procedureKey', 'spec', 'name',
  'roles', 'acceptFailed', 'witness', 'correctiveNote', 'displayName', 'assetTag', 'token', 'expiresAt', 'personId', 'count', 'body', 'from'];

const badBody = fc.oneof(
  fc.anything({ maxDepth: 3 }),
  fc.dictionary(fc.constantFrom(...FIELD_NAMES), fc.anything({ maxDepth: 2 }), { maxKeys: 6 }),
  fc.array(fc.anything({ maxDepth: 1 }), { maxLength: 4 }),
);
const badParam = fc.oneof(fc.string({ maxLength: 30 }), fc.uuid(), fc.constantFrom('..', '%00', '1 OR 1=1', "'; DROP TABLE users; --"));
const badQuery = fc.dictionary(fc.constantFrom('page', 'size', 'sort', 'from', 'to', 'status', 'machineId', 'against', 'ids'), fc.string({ maxLength: 12 }), { maxKeys: 3 });

/**
 * Row counts and last-change times of every table: the fingerprint that refused requests must not move.
 * Except the throttles' counters: a refused sign-in or witness try is meant to count against its limit.
 */
async function fingerprint(): Promise<Record<string, string>> {
  const tables = await db().query<{ name: string }>(
    `SELECT table_name::text AS name FROM information_schema.tables WHERE table_schema = 'public' AND table_type = 'BASE TABLE' AND table_name NOT LIKE 'pgboss%' AND table_name <> 'throttle_counters' ORDER BY table_name`,
    { type: QueryTypes.SELECT },
  );
  const out: Record<string, string> = {};
  for (const { name } of tables) {
    const [row] = await db().query<{ n: string }>(`SELECT count(*)::text AS n FROM "${name}"`, { type: QueryTypes.SELECT });
    out[name] = row!.n;
  }
  return out;
}

const app = testApp({ LOGIN_LIMIT_PER_ADDRESS: '100000', LOGIN_LIMIT_PER_ACCOUNT: '100000' });
let token = '';

before(async () => {
  const everyone = await makePerson(['trainee', 'competent_person', 'auditor', 'workshop_admin'], 'Fuzz Everyone');
  token = (await signIn(app, everyone.email)).token;
});

describe('property-based fuzzing of every write route', () => {
  const writes = listRoutes(app).filter((r) => r.method !== 'GET' && !ACCEPTS_ANYTHING.has(`${r.method} ${r.path}`));

  test(`when ${writes.length} write routes get ${RUNS_PER_ROUTE} generated bad inputs each, then none is a 5xx, all are problem+json, and the database does not change`, async () => {
    assert.ok(writes.length * RUNS_PER_ROUTE >= 10_000 || process.env['FUZZ_RUNS_PER_ROUTE'], 'at least 10,000 inputs in total');
    const before = await fingerprint();
    let sent = 0;
    for (const route of writes) {
      await fc.assert(
        fc.asyncProperty(badBody, badParam, badQuery, async (body, param, query) => {
          const url = route.path.replace(/:(\w+)/g, () => encodeURIComponent(param));
          const res = await request(app)
            [route.method.toLowerCase() as 'post'](url)
            .query(query)
            .set('authorization', `Bearer ${token}`)
            .set('content-type', 'application/json')
            .send(JSON.stringify(body ?? null));
          sent++;
          assert.ok(res.status >= 400 && res.status < 500, `${route.method} ${url} ${JSON.stringify(body)?.slice(0, 200)} → ${res.status} ${JSON.stringify(res.body).slice(0, 300)}`);
          assert.match(String(res.headers['content-type']), /^application\/problem\+json/);
        }),
        { numRuns: RUNS_PER_ROUTE },
      );
    }
    assert.ok(sent >= writes.length * RUNS_PER_ROUTE);
    assert.deepEqual(await fingerprint(), before, 'refused requests left the database as it was');
  });
});
