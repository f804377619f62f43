import { provideHttpClient, withInterceptors } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting, type TestRequest } from '@angular/common/http/testing';
import { provideZonelessChangeDetection } from '@angular/core';
import { TestBed } from '@angular/core/testing';
import { provideRouter } from '@angular/router';
import { deleteDB } from 'idb';
import { firstValueFrom } from 'rxjs';
import type { MachineSummary } from '@setwright/contracts/machines';
import type { ProcedureVersionDetail, ProcedureVersionSummary } from '@setwright/contracts/procedures';
import type { RecordDetail } from '@setwright/contracts/records';
import { procedureSchema } from '@setwright/procedures/schema';
import { problemInterceptor, tokenInterceptor } from '../../core/interceptors';
import { OFFLINE_DB_NAME, OfflineDb } from '../../core/offline/offline-db';
import { Outbox } from '../../core/offline/outbox';
import { Session } from '../../core/session';
import { RecordApi } from './record-api';

const USER = { id: 'a0000000-0000-4000-8000-000000000001', email: 'ellis@tests.example', displayName: 'Ellis Marsh', roles: ['trainee' as const] };
const machine: MachineSummary = {
  id: 'c0000000-0000-4000-8000-000000000001',
  name: 'Bay 2 bandsaw',
  assetTag: 'SAW-02',
  location: 'Bay 2',
  kind: 'horizontal_bandsaw',
  model: 'Workshop built',
  spec: { bladeWidthMm: 27 },
};
const body = procedureSchema.parse({
  key: 'blade-change',
  version: 4,
  title: 'Removing and fitting a blade',
  intendedUse: 'Tests.',
  scope: 'Tests.',
  machineKind: 'horizontal_bandsaw',
  hazards: ['Sharp blade'],
  steps: [{ id: 'isolate', title: 'Isolate the saw', kind: 'isolation', instruction: 'Isolate it.', inputs: [{ id: 'lock', type: 'text', label: 'Lock number' }] }],
});
const summary: ProcedureVersionSummary = {
  id: 'd0000000-0000-4000-8000-000000000004',
  key: 'blade-change',
  version: 4,
  title: body.title,
  machineKind: 'horizontal_bandsaw',
  status: 'approved',
  checksum: 'ab'.repeat(32),
  source: 'pack',
  author: null,
  approvedBy: null,
  approvedAt: null,
  createdAt: '2026-01-05T08:00:00.000Z',
  updatedAt: '2026-01-05T08:00:00.000Z',
};
const detail: ProcedureVersionDetail = { ...summary, body };

async function until(what: string, ok: () => boolean | Promise<boolean>, ms = 3000) {
  const end = Date.now() + ms;
  while (!(await ok())) {
    if (Date.now() > end) throw new Error(`timed out waiting until ${what}`);
    await new Promise((r) => setTimeout(r, 10));
  }
}

describe('RecordApi on a tablet that may be offline', () => {
  let dbName: string;
  let http: HttpTestingController;
  let api: RecordApi;

  beforeEach(async () => {
    dbName = `setwright-record-api-spec-${crypto.randomUUID()}`;
    TestBed.configureTestingModule({
      providers: [
        provideZonelessChangeDetection(),
        provideRouter([]),
        provideHttpClient(withInterceptors([problemInterceptor, tokenInterceptor])),
        provideHttpClientTesting(),
        { provide: OFFLINE_DB_NAME, useValue: dbName },
      ],
    });
    http = TestBed.inject(HttpTestingController);
    const signingIn = TestBed.inject(Session).signIn({ email: USER.email, password: 'p' });
    http.expectOne('/api/auth/login').flush({ accessToken: 't', expiresIn: 900, user: USER });
    await signingIn;
    api = TestBed.inject(RecordApi);
    TestBed.tick();
    await until('the queue is loaded', () => TestBed.inject(Outbox).loadedFor() === USER.id);
  });

  afterEach(async () => {
    http.verify();
    await TestBed.inject(OfflineDb).close();
    TestBed.resetTestingModule();
    await deleteDB(dbName);
  });

  /** The request to this URL once it has been made (IndexedDB work may come before it). */
  async function asked(url: string): Promise<TestRequest> {
    let found: TestRequest | undefined;
    await until(url, () => !!(found = http.match(url)[0]));
    return found!;
  }

  /** Open the machine's procedures online, which keeps each approved version on the tablet. */
  async function keepProcedures() {
    const listing = firstValueFrom(api.procedures('horizontal_bandsaw'));
    http.expectOne('/api/procedures?machineKind=horizontal_bandsaw').flush([summary]);
    expect((await listing).map((p) => p.key)).toEqual(['blade-change']);
    (await asked('/api/procedures/blade-change/versions/4')).flush(detail);
    await until('the version is kept', async () => !!(await TestBed.inject(OfflineDb).procedure(`${USER.id}/horizontal_bandsaw/blade-change`)));
  }

  it('when a record is started without a connection, then it starts on the tablet with its own id from the kept machine and procedure, and its start waits in the queue', async () => {
    await keepProcedures();
    // A second listing with the same checksum fetches nothing more.
    const again = firstValueFrom(api.procedures('horizontal_bandsaw'));
    http.expectOne('/api/procedures?machineKind=horizontal_bandsaw').flush([summary]);
    await again;
    await new Promise((r) => setTimeout(r, 50));
    http.expectNone('/api/procedures/blade-change/versions/4');

    window.dispatchEvent(new Event('offline'));
    const starting = api.start(machine.id, 'blade-change');
    // The machine comes through HttpClient, which the service worker answers from its copy.
    (await asked(`/api/machines/${machine.id}`)).flush(machine);
    const record: RecordDetail = await starting;
    http.expectNone('/api/records');

    expect(record.id).toMatch(/^[0-9a-f-]{36}$/);
    expect(record.status).toBe('underway');
    expect(record.procedure).toEqual({ id: summary.id, key: 'blade-change', version: 4, title: body.title });
    expect(record.machine).toEqual({ id: machine.id, name: machine.name, assetTag: machine.assetTag });
    expect(record.machineSpec).toEqual(machine.spec);
    expect(record.startedBy).toEqual({ id: USER.id, displayName: USER.displayName });
    const outbox = TestBed.inject(Outbox);
    expect(outbox.isLocalOnly(record.id)).toBeTrue();
    const [start] = await TestBed.inject(OfflineDb).items(USER.id);
    expect(start).toEqual(jasmine.objectContaining({ kind: 'start', state: 'waiting', request: { id: record.id, machineId: machine.id, procedureKey: 'blade-change' } }));

    // The runner opens it from the tablet, asking nothing of the server.
    const opened = await firstValueFrom(api.open(record.id));
    expect(opened.id).toBe(record.id);
    expect(opened.procedureBody.steps.map((s) => s.id)).toEqual(['isolate']);
  });

  it('when a record is started offline but the procedure was never kept on the tablet, then it says how to make it possible and keeps nothing', async () => {
    window.dispatchEvent(new Event('offline'));
    const starting = api.start(machine.id, 'blade-change');
    (await asked(`/api/machines/${machine.id}`)).flush(machine);
    await expectAsync(starting).toBeRejectedWith(jasmine.objectContaining({ detail: jasmine.stringContaining('Open the machine once with a connection') }));
    expect(document.querySelector('.mat-mdc-snack-bar-label')?.textContent).toContain('Open the machine once with a connection');
    expect(await TestBed.inject(OfflineDb).items(USER.id)).toEqual([]);
  });

  it('when a record is opened online, then a copy is kept; offline, the copy opens instead', async () => {
    const server: RecordDetail = {
      id: 'b0000000-0000-4000-8000-000000000001',
      status: 'underway',
      result: null,
      machine: { id: machine.id, name: machine.name, assetTag: machine.assetTag },
      procedure: { id: summary.id, key: 'blade-change', version: 4, title: body.title },
      startedBy: { id: USER.id, displayName: USER.displayName },
      createdAt: '2026-03-02T08:00:00.000Z',
      finishedAt: null,
      procedureBody: body,
      machineSpec: machine.spec,
      entries: [],
      voidReason: null,
    };
    const online = firstValueFrom(api.open(server.id));
    http.expectOne(`/api/records/${server.id}`).flush(server);
    expect((await online).copySavedAt).toBeNull();
    await until('the copy is kept', async () => !!(await TestBed.inject(OfflineDb).record(`${USER.id}/${server.id}`)));

    window.dispatchEvent(new Event('offline'));
    const copy = await firstValueFrom(api.open(server.id));
    http.expectNone(`/api/records/${server.id}`);
    expect(copy.id).toBe(server.id);
    expect(copy.copySavedAt).toMatch(/^\d{4}-\d\d-\d\dT/);
  });
});
