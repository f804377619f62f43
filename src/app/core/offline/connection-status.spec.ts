import { provideHttpClient, withInterceptors } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { provideZonelessChangeDetection } from '@angular/core';
import { TestBed } from '@angular/core/testing';
import { provideRouter } from '@angular/router';
import { deleteDB } from 'idb';
import { problemInterceptor, tokenInterceptor } from '../interceptors';
import { Session } from '../session';
import { ConnectionStatus } from './connection-status';
import { OFFLINE_DB_NAME, OfflineDb } from './offline-db';
import { Outbox } from './outbox';

describe('ConnectionStatus (the shell’s indicator)', () => {
  let dbName: string;

  beforeEach(async () => {
    dbName = `setwright-status-spec-${crypto.randomUUID()}`;
    TestBed.configureTestingModule({
      imports: [ConnectionStatus],
      providers: [
        provideZonelessChangeDetection(),
        provideRouter([]),
        provideHttpClient(withInterceptors([problemInterceptor, tokenInterceptor])),
        provideHttpClientTesting(),
        { provide: OFFLINE_DB_NAME, useValue: dbName },
      ],
    });
    const signingIn = TestBed.inject(Session).signIn({ email: 'e@tests.example', password: 'p' });
    TestBed.inject(HttpTestingController)
      .expectOne('/api/auth/login')
      .flush({ accessToken: 't', expiresIn: 900, user: { id: 'u1', email: 'e@tests.example', displayName: 'Ellis', roles: ['trainee'] } });
    await signingIn;
  });

  afterEach(async () => {
    TestBed.inject(HttpTestingController).verify();
    await TestBed.inject(OfflineDb).close();
    TestBed.resetTestingModule();
    await deleteDB(dbName);
  });

  it('when the network goes and steps are kept, then it says Offline and how many wait on this device, in a polite live region', async () => {
    const fixture = TestBed.createComponent(ConnectionStatus);
    await fixture.whenStable();
    const status = (fixture.nativeElement as HTMLElement).querySelector('[role=status]')!;
    expect(status.getAttribute('aria-live')).toBe('polite');
    expect(status.textContent).toContain('Online');

    window.dispatchEvent(new Event('offline'));
    await fixture.whenStable();
    expect(status.textContent).toContain('Offline');
    expect(status.textContent).toContain('Steps you save are kept on this device');

    const outbox = TestBed.inject(Outbox);
    for (let i = 0; i < 100 && outbox.loadedFor() !== 'u1'; i++) await new Promise((r) => setTimeout(r, 10));
    const preview = { evaluation: { inputs: [], computed: [], complete: true, outOfLimits: false, missing: [] }, outcome: 'done' as const };
    await outbox.keepEntry('r1', { idempotencyKey: crypto.randomUUID(), stepId: 'isolate', values: {} }, preview);
    await outbox.keepEntry('r1', { idempotencyKey: crypto.randomUUID(), stepId: 'open-up', values: {} }, preview);
    await fixture.whenStable();
    expect(status.textContent).toContain('2 waiting on this device');
    expect(status.getAttribute('data-state')).toBe('offline');
  });
});
