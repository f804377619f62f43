import { provideHttpClient, withInterceptors } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting, type TestRequest } from '@angular/common/http/testing';
import { MatInputHarness } from '@angular/material/input/testing';
import { provideZonelessChangeDetection } from '@angular/core';
import { TestBed } from '@angular/core/testing';
import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';
import { MatButtonHarness } from '@angular/material/button/testing';
import { MatStepperHarness } from '@angular/material/stepper/testing';
import { provideRouter } from '@angular/router';
import type { RecordDetail } from '@setwright/contracts/records';
import { procedureSchema } from '@setwright/procedures/schema';
import { deleteDB } from 'idb';
import { problemInterceptor, tokenInterceptor } from '../../core/interceptors';
import { DeviceCopies } from '../../core/offline/device-copies';
import { OFFLINE_DB_NAME, OfflineDb } from '../../core/offline/offline-db';
import { Outbox } from '../../core/offline/outbox';
import type { EntryItem } from '../../core/offline/outbox-items';
import { Session } from '../../core/session';
import { RecordRunner } from './record-runner';

const body = procedureSchema.parse({
  key: 'runner-fixture',
  version: 3,
  title: 'Fitting a blade',
  intendedUse: 'Tests.',
  scope: 'Tests.',
  machineKind: 'horizontal_bandsaw',
  hazards: ['Sharp blade'],
  ppe: [{ level: 'mandatory', code: 'M004', text: 'Wear eye protection.' }],
  steps: [
    { id: 'isolate', title: 'Isolate the saw', kind: 'isolation', instruction: 'Isolate it.', inputs: [{ id: 'lock', type: 'text', label: 'Lock number' }] },
    { id: 'track', title: 'Track under power', kind: 'check', powered: true, instruction: 'Run it.', inputs: [{ id: 'clear', type: 'yesno', label: 'Runs clear', expected: true }] },
  ],
});

function record(entries: RecordDetail['entries'], status: RecordDetail['status'] = 'underway'): RecordDetail {
  return {
    id: 'r1',
    status,
    result: null,
    machine: { id: 'm1', name: 'Bay 2 bandsaw', assetTag: 'BFW-SAW-01' },
    procedure: { id: 'p1', key: body.key, version: 3, title: body.title },
    startedBy: { id: 'u1', displayName: 'Ellis' },
    createdAt: new Date().toISOString(),
    finishedAt: null,
    procedureBody: body,
    machineSpec: {},
    entries,
    voidReason: null,
  };
}

const isolated = {
  id: 'e1',
  stepId: 'isolate',
  attempt: 1,
  values: { lock: 'L7' },
  evaluation: { inputs: [], computed: [], complete: true, outOfLimits: false, missing: [] },
  outcome: 'done' as const,
  correctiveNote: null,
  enteredBy: { id: 'u1', displayName: 'Ellis' },
  witnessedBy: null,
  witnessedAt: null,
  idempotencyKey: '00000000-0000-4000-8000-000000000001',
  createdAt: new Date().toISOString(),
};

const preview = { evaluation: { inputs: [], computed: [], complete: true, outOfLimits: false, missing: [] }, outcome: 'done' as const };

/** Wait (for real: IndexedDB) until the condition holds. */
async function until(what: string, ok: () => boolean | Promise<boolean>, ms = 3000) {
  const end = Date.now() + ms;
  while (!(await ok())) {
    if (Date.now() > end) throw new Error(`timed out waiting until ${what}`);
    await new Promise((r) => setTimeout(r, 10));
  }
}

describe('RecordRunner', () => {
  let dbName: string;

  /** `before` runs on the device before the runner opens (signed in, nothing fetched yet). */
  async function setUp(detail: RecordDetail | null, before?: () => Promise<void>) {
    dbName = `setwright-runner-spec-${crypto.randomUUID()}`;
    TestBed.configureTestingModule({
      imports: [RecordRunner],
      providers: [
        provideZonelessChangeDetection(),
        provideRouter([]),
        provideHttpClient(withInterceptors([problemInterceptor, tokenInterceptor])),
        provideHttpClientTesting(),
        { provide: OFFLINE_DB_NAME, useValue: dbName },
      ],
    });
    const http = TestBed.inject(HttpTestingController);
    const session = TestBed.inject(Session);
    const signingIn = session.signIn({ email: 'e@tests.example', password: 'p' });
    http.expectOne('/api/auth/login').flush({ accessToken: 't', expiresIn: 900, user: { id: 'u1', email: 'e@tests.example', displayName: 'Ellis', roles: ['trainee'] } });
    await signingIn;
    await before?.();
    const fixture = TestBed.createComponent(RecordRunner);
    fixture.componentRef.setInput('id', 'r1');
    fixture.detectChanges();
    if (detail) http.expectOne('/api/records/r1').flush(detail);
    await fixture.whenStable();
    return { fixture, http, loader: TestbedHarnessEnvironment.loader(fixture) };
  }
  afterEach(async () => {
    TestBed.inject(HttpTestingController).verify();
    await TestBed.inject(OfflineDb).close();
    TestBed.resetTestingModule();
    await deleteDB(dbName);
  });

  it('when a record is opened, then each step shows its state, and a powered step waits for a witness', async () => {
    const { loader } = await setUp(record([isolated]));
    const stepper = await loader.getHarness(MatStepperHarness);
    const steps = await stepper.getSteps();
    const labels = await Promise.all(steps.map((s) => s.getLabel()));
    expect(labels[0]).toContain('Isolate the saw');
    expect(labels[0]).toContain('Done');
    expect(labels[1]).toContain('Track under power');
    expect(labels[1]).toContain('Waiting for witness');
    expect(labels[2]).toContain('Finish');
  });

  it('when a step is not yet saved, then finishing is not offered', async () => {
    const { loader } = await setUp(record([isolated]));
    const stepper = await loader.getHarness(MatStepperHarness);
    await stepper.selectStep({ label: /Finish/ });
    const finish = await loader.getHarness(MatButtonHarness.with({ text: 'Finish and send for sign-off' }));
    expect(await finish.isDisabled()).toBeTrue();
  });

  it('when every step is saved and finished, then the record says it is ready for sign-off', async () => {
    const tracked = { ...isolated, id: 'e2', stepId: 'track', values: { clear: true }, witnessedBy: { id: 'u2', displayName: 'Dougal' }, idempotencyKey: '00000000-0000-4000-8000-000000000002' };
    const { loader, http, fixture } = await setUp(record([isolated, tracked]));
    const stepper = await loader.getHarness(MatStepperHarness);
    await stepper.selectStep({ label: /Finish/ });
    const finish = await loader.getHarness(MatButtonHarness.with({ text: 'Finish and send for sign-off' }));
    expect(await finish.isDisabled()).toBeFalse();
    await finish.click();
    const root = TestbedHarnessEnvironment.documentRootLoader(fixture);
    expect(document.querySelector('sw-sign-dialog')!.textContent).toContain('Performed by');
    await (await root.getHarness(MatInputHarness.with({ selector: '[formControlName=password]' }))).setValue('secret');
    const clicking = (await root.getHarness(MatButtonHarness.with({ text: 'Sign' }))).click();
    let found: TestRequest[] = [];
    for (let i = 0; i < 40 && !found.length; i++) {
      await new Promise((r) => setTimeout(r, 25));
      found = http.match('/api/records/r1/finish');
    }
    const req = found[0]!;
    expect(req.request.body).toEqual({ acceptFailed: false, password: 'secret' });
    req.flush({ ...record([isolated, tracked], 'ready_for_signoff'), result: 'passed' });
    await clicking;
    await new Promise((r) => setTimeout(r, 50));
    await fixture.whenStable();
    expect((fixture.nativeElement as HTMLElement).textContent).toContain('ready for sign-off');
  });

  it('when steps were saved on this tablet without a connection, then a reload shows the tablet’s copy, marks them waiting on this device, and finishing waits for them', async () => {
    const { fixture, loader } = await setUp(null, async () => {
      const outbox = TestBed.inject(Outbox);
      window.dispatchEvent(new Event('offline'));
      TestBed.tick();
      await until('the queue is loaded', () => outbox.loadedFor() === 'u1');
      await TestBed.inject(DeviceCopies).saveRecord(record([]));
      await outbox.keepEntry('r1', { idempotencyKey: crypto.randomUUID(), stepId: 'isolate', values: { lock: 'L7' } }, preview);
    });
    await until('the copy is shown', () => !!(fixture.nativeElement as HTMLElement).querySelector('sw-step-form'));
    await fixture.whenStable();
    const text = (fixture.nativeElement as HTMLElement).textContent!;
    expect(text).toContain('this is the copy kept on this tablet');
    expect(text).toContain('0 of 2 steps saved on the server');
    expect(text).toContain('1 waiting on this device');

    const stepper = await loader.getHarness(MatStepperHarness);
    const labels = await Promise.all((await stepper.getSteps()).map((s) => s.getLabel()));
    expect(labels[0]).toContain('Done');
    expect(labels[0]).toContain('Waiting on this device');
    expect(labels[1]).not.toContain('Waiting on this device');
    await stepper.selectStep({ label: /Finish/ });
    const finish = await loader.getHarness(MatButtonHarness.with({ text: 'Finish and send for sign-off' }));
    expect(await finish.isDisabled()).toBeTrue();
    expect((fixture.nativeElement as HTMLElement).textContent).toContain('1 step still waits on this tablet');
  });

  it('when the server would not take a step kept on the tablet, then the runner says why, shows what was kept, and lets the trainee keep it for reference or discard it', async () => {
    const conflict: EntryItem = {
      kind: 'entry',
      userId: 'u1',
      recordId: 'r1',
      createdAt: new Date().toISOString(),
      state: 'conflict',
      tries: 0,
      problem: { reason: 'changed', detail: 'This step was saved from another device by Ellis while this tablet was offline.', at: new Date().toISOString() },
      request: { idempotencyKey: crypto.randomUUID(), stepId: 'isolate', values: { lock: 'L9' } },
      basedOn: { status: 'underway', attempt: 0 },
      preview,
      delivered: null,
    };
    const { fixture, loader } = await setUp(record([isolated]), async () => {
      await TestBed.inject(OfflineDb).add(conflict);
    });
    const host = fixture.nativeElement as HTMLElement;
    await until('the conflict is shown', () => !!host.querySelector('sw-device-items li'));
    await fixture.whenStable();
    expect(host.querySelector('sw-device-items h2')!.textContent).toContain('1 saved on this tablet needs your decision');
    expect(host.querySelector('sw-device-items')!.textContent).toContain('Changed from another device');
    expect(host.querySelector('sw-device-items dl')!.textContent).toContain('L9');
    expect(await loader.getHarnessOrNull(MatButtonHarness.with({ text: 'Send again as a new attempt' }))).not.toBeNull();

    await (await loader.getHarness(MatButtonHarness.with({ text: 'Keep on this tablet for reference' }))).click();
    await until('it is kept', async () => (await TestBed.inject(OfflineDb).items('u1'))[0]?.state === 'kept');
    await fixture.whenStable();
    expect(host.querySelector('sw-device-items h2')!.textContent).toContain('Kept on this tablet for reference');

    await (await loader.getHarness(MatButtonHarness.with({ text: 'Discard the tablet copy' }))).click();
    await until('it is gone from the device', async () => (await TestBed.inject(OfflineDb).items('u1')).length === 0);
    await fixture.whenStable();
    expect(host.querySelector('sw-device-items li')).toBeNull();
  });
});
