import assert from 'node:assert/strict';
import { randomUUID } from 'node:crypto';
import { before, describe, test } from 'node:test';
import request from 'supertest';
import type { Role } from '../../api/contracts/roles';
import { makePerson, signIn, testApp } from '../support/api';
import { listRoutes } from '../support/routes';

type Who = 'anonymous' | Role;
const ROLES: Role[] = ['trainee', 'competent_person', 'auditor', 'workshop_admin'];
const EVERYONE = ROLES;
const RUNNERS: Role[] = ['trainee', 'competent_person'];
const READERS: Role[] = ['competent_person', 'auditor', 'workshop_admin'];
const ADMIN: Role[] = ['workshop_admin'];
const SIGNERS: Role[] = ['competent_person'];
const OPEN = 'open' as const;

/**
 * Who may call each route: the roles that get past the role check (anonymous callers get 401
 * unless the route is open). Every route Express declares must be listed here.
 */
const MATRIX: Record<string, Role[] | typeof OPEN> = {
  'GET /api/health': OPEN,
  'POST /api/auth/login': OPEN,
  'POST /api/auth/refresh': OPEN,
  'POST /api/auth/logout': OPEN,
  'POST /api/auth/set-password': OPEN,
  'GET /api/people/me': EVERYONE,
  'GET /api/people': ADMIN,
  'POST /api/people': ADMIN,
  'GET /api/people/:id': ADMIN,
  'PUT /api/people/:id/roles': ADMIN,
  'POST /api/people/:id/invitation': ADMIN,
  'POST /api/people/:id/deactivate': ADMIN,
  'POST /api/people/:id/reactivate': ADMIN,
  'GET /api/machines': EVERYONE,
  'POST /api/machines': ADMIN,
  'GET /api/machines/labels.pdf': ADMIN,
  'GET /api/machines/:id': EVERYONE,
  'PUT /api/machines/:id': ADMIN,
  'PUT /api/machines/:id/schedules': ADMIN,
  'GET /api/machines/:id/photo': EVERYONE,
  'GET /api/machines/:id/trends': EVERYONE,
  'GET /api/schedules/due': ['trainee', 'competent_person', 'workshop_admin'],
  'POST /api/photos': ['trainee', 'competent_person', 'workshop_admin'],
  'GET /api/photos/:id': EVERYONE,
  'GET /api/photos/:id/display': EVERYONE,
  'GET /api/photos/:id/thumb': EVERYONE,
  'DELETE /api/photos/:id': ['trainee', 'competent_person', 'workshop_admin'],
  'GET /api/procedures': EVERYONE,
  'GET /api/procedures/:key/versions': EVERYONE,
  'POST /api/procedures/:key/drafts': ADMIN,
  'GET /api/procedures/:key/versions/:version': EVERYONE,
  'PUT /api/procedures/:key/versions/:version': ADMIN,
  // Drafts only, by their author or an admin: for anyone else the answer is 403 whatever the draft.
  'DELETE /api/procedures/:key/versions/:version': ADMIN,
  'GET /api/procedures/:key/versions/:version/diff': READERS,
  'POST /api/procedures/:key/versions/:version/approve': ['competent_person', 'workshop_admin'],
  'GET /api/blades/types': EVERYONE,
  'POST /api/blades/types': ADMIN,
  'GET /api/blades/types/:id': EVERYONE,
  'PATCH /api/blades/types/:id': ADMIN,
  'GET /api/blades/machines': EVERYONE,
  'GET /api/blades/machines/:id': EVERYONE,
  'GET /api/blades/fittings/:id': EVERYONE,
  'POST /api/blades/fittings/:id/removal': ['competent_person', 'workshop_admin'],
  'POST /api/blades/fittings/:id/cuts': ['trainee', 'competent_person', 'workshop_admin'],
  'GET /api/competencies/matrix': READERS,
  'GET /api/competencies/matrix.csv': READERS,
  'GET /api/competencies/authorisations': READERS,
  'POST /api/competencies/authorisations': SIGNERS,
  'POST /api/competencies/authorisations/:id/revoke': ['competent_person', 'workshop_admin'],
  'GET /api/competencies/expiring': READERS,
  'GET /api/records': EVERYONE,
  'POST /api/records': RUNNERS,
  'GET /api/records/:id': EVERYONE,
  'POST /api/records/:id/entries': RUNNERS,
  'POST /api/records/:id/finish': RUNNERS,
  'POST /api/records/:id/void': ['trainee', 'competent_person', 'workshop_admin'],
  'GET /api/records/:id/signatures': EVERYONE,
  'POST /api/records/:id/sign-off': SIGNERS,
  'POST /api/records/:id/send-back': SIGNERS,
  'POST /api/records/:id/addenda': ['competent_person', 'workshop_admin'],
  'GET /api/records/:id/check': EVERYONE,
  'GET /api/records/:id/audit': READERS,
  'GET /api/records/:id/pdf': EVERYONE,
  'GET /api/archive/records': READERS,
  'GET /api/archive/evidence-pack': READERS,
  'GET /api/sign-off/queue': SIGNERS,
  // Development and tests only: the SMTP stand-in's stored messages (not mounted in production).
  'GET /api/dev/mail': ADMIN,
};

const app = testApp();
const tokens = new Map<Who, string>();

before(async () => {
  for (const role of ROLES) {
    const person = await makePerson([role], `Matrix ${role}`);
    tokens.set(role, (await signIn(app, person.email)).token);
  }
});

/** A concrete URL for a declared path: unknown ids, a real procedure key, version 1. */
function urlFor(path: string): string {
  return path.replace(/:id\b/g, randomUUID()).replace(':key', 'blade-tension').replace(':version', '1');
}

describe('the authorisation matrix', () => {
  const routes = listRoutes(app);

  test('when the app declares its routes, then every one is in the matrix and every matrix row is a real route', () => {
    const declared = routes.map((r) => `${r.method} ${r.path}`);
    const missing = declared.filter((r) => !(r in MATRIX));
    const stale = Object.keys(MATRIX).filter((r) => !declared.includes(r));
    assert.deepEqual(missing, [], `routes with no row in the matrix: ${missing.join(', ')}`);
    assert.deepEqual(stale, [], `matrix rows for routes that no longer exist: ${stale.join(', ')}`);
  });

  for (const route of routes) {
    const key = `${route.method} ${route.path}`;
    test(`when each role calls ${key}, then only the roles in the matrix get past the role check`, async () => {
      const allowed = MATRIX[key];
      if (!allowed) return; // reported by the completeness test above
      const wrong: string[] = [];
      for (const who of ['anonymous', ...ROLES] as Who[]) {
        let req = request(app)[route.method.toLowerCase() as 'get'](urlFor(route.path));
        if (who !== 'anonymous') req = req.set('authorization', `Bearer ${tokens.get(who)}`);
        if (route.method !== 'GET' && route.method !== 'DELETE') req = req.send({});
        const res = await req;
        const got = res.status === 401 || res.status === 403 ? res.status : 'past';
        if (allowed === OPEN) {
          // Open routes have no role check; a 401 there is their own answer (a refresh with no cookie).
          if (got === 403) wrong.push(`${who}: expected no role check, got 403`);
        } else {
          const expected = who === 'anonymous' ? 401 : allowed.includes(who) ? 'past' : 403;
          if (got !== expected) wrong.push(`${who}: expected ${expected}, got ${res.status}`);
        }
        if (res.status >= 400) assert.match(String(res.headers['content-type']), /application\/problem\+json/, `${key} as ${who}`);
        assert.ok(res.status < 500, `${key} as ${who} answered ${res.status}: ${JSON.stringify(res.body)}`);
      }
      assert.deepEqual(wrong, [], key);
    });
  }
});
