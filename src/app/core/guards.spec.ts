import { provideHttpClient } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { provideZonelessChangeDetection } from '@angular/core';
import { TestBed } from '@angular/core/testing';
import { provideRouter, Router, UrlSegment, type Route, type UrlTree } from '@angular/router';
import type { SessionResponse } from '@setwright/contracts/auth';
import type { Role } from '@setwright/contracts/roles';
import { roleGuard, signedInGuard, signedOutGuard } from './guards';
import { Session } from './session';

describe('guards', () => {
  let http: HttpTestingController;

  beforeEach(() => {
    TestBed.configureTestingModule({
      providers: [provideZonelessChangeDetection(), provideRouter([]), provideHttpClient(), provideHttpClientTesting()],
    });
    http = TestBed.inject(HttpTestingController);
  });
  afterEach(() => http.verify());

  function signInAs(roles: Role[]) {
    const session = TestBed.inject(Session);
    const done = session.signIn({ email: 'a@tests.example', password: 'p' });
    const body: SessionResponse = { accessToken: 't', expiresIn: 900, user: { id: 'u', email: 'a@tests.example', displayName: 'A', roles } };
    http.expectOne('/api/auth/login').flush(body);
    return done;
  }

  const segments = (path: string) => path.split('/').filter(Boolean).map((p) => new UrlSegment(p, {}));
  const route: Route = {};
  const serialise = (r: unknown) => TestBed.inject(Router).serializeUrl(r as UrlTree);

  it('when nobody is signed in and the session cannot be renewed, then it sends them to sign in and back', async () => {
    const result = TestBed.runInInjectionContext(() => signedInGuard(route, segments('machines')));
    http.expectOne('/api/auth/refresh').flush({ type: '/problems/not-signed-in', title: 'Not signed in', status: 401 }, { status: 401, statusText: 'Unauthorized' });
    expect(serialise(await result)).toBe('/sign-in?next=%2Fmachines');
  });

  it('when the refresh cookie is still good, then the page opens without a sign-in', async () => {
    const result = TestBed.runInInjectionContext(() => signedInGuard(route, segments('today')));
    http.expectOne('/api/auth/refresh').flush({ accessToken: 't', expiresIn: 900, user: { id: 'u', email: 'a@x.example', displayName: 'A', roles: ['auditor'] } });
    expect(await result).toBeTrue();
    expect(TestBed.inject(Session).roles()).toEqual(['auditor']);
  });

  it('when the person lacks the role, then it sends them to Today with a note', async () => {
    await signInAs(['trainee']);
    const result = TestBed.runInInjectionContext(() => roleGuard('workshop_admin', 'auditor')(route, []));
    expect(serialise(result)).toBe('/today?denied=1');
  });

  it('when the person holds one of the roles, then the page opens', async () => {
    await signInAs(['trainee', 'auditor']);
    expect(TestBed.runInInjectionContext(() => roleGuard('workshop_admin', 'auditor')(route, []))).toBeTrue();
  });

  it('when someone signed in opens the sign-in page, then they go to Today', async () => {
    await signInAs(['trainee']);
    expect(serialise(TestBed.runInInjectionContext(() => signedOutGuard(route, [])))).toBe('/today');
  });
});
