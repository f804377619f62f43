import { provideHttpClient, withInterceptors } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting, type TestRequest } from '@angular/common/http/testing';
import { provideZonelessChangeDetection } from '@angular/core';
import { TestBed } from '@angular/core/testing';
import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';
import { MatButtonHarness } from '@angular/material/button/testing';
import { MatInputHarness } from '@angular/material/input/testing';
import { provideRouter } from '@angular/router';
import type { RecordDetail } from '@setwright/contracts/records';
import type { SignOffDetail } from '@setwright/contracts/signoff';
import { procedureSchema } from '@setwright/procedures/schema';
import { problemInterceptor, tokenInterceptor } from '../../core/interceptors';
import { Session } from '../../core/session';
import { SignOffReview } from './sign-off-review';

const body = procedureSchema.parse({
  key: 'review-fixture',
  version: 2,
  title: 'Tensioning the blade',
  intendedUse: 'Tests.',
  scope: 'Tests.',
  machineKind: 'horizontal_bandsaw',
  hazards: ['Sharp blade'],
  steps: [{ id: 'tension', title: 'Read the gauge', kind: 'reading', instruction: 'Read it.', inputs: [{ id: 'reading', type: 'number', label: 'Gauge reading', unit: 'kgf' }] }],
});

const entry = (attempt: number, reading: number, outcome: 'done' | 'out_of_limits') => ({
  id: `e${attempt}`,
  stepId: 'tension',
  attempt,
  values: { reading },
  evaluation: {
    inputs: [{ id: 'reading', outcome: outcome === 'done' ? ('pass' as const) : ('fail' as const), limits: { min: 700, max: 900, unit: 'kgf' } }],
    computed: [{ id: 'stress', label: 'Stress in one strand', value: 161.4, unit: 'MPa', display: '161.4 MPa', outcome: 'none' as const }],
    complete: true,
    outOfLimits: outcome !== 'done',
    missing: [],
  },
  outcome,
  correctiveNote: outcome === 'done' ? null : 'Too slack; wound it up.',
  enteredBy: { id: 'trainee', displayName: 'Ellis' },
  witnessedBy: null,
  witnessedAt: null,
  idempotencyKey: `00000000-0000-4000-8000-00000000000${attempt}`,
  createdAt: new Date().toISOString(),
});

const record: RecordDetail = {
  id: 'r1',
  status: 'ready_for_signoff',
  result: 'passed',
  machine: { id: 'm1', name: 'Bay 2 bandsaw', assetTag: 'BFW-SAW-01' },
  procedure: { id: 'p1', key: body.key, version: 2, title: body.title },
  startedBy: { id: 'trainee', displayName: 'Ellis' },
  createdAt: new Date().toISOString(),
  finishedAt: new Date().toISOString(),
  procedureBody: body,
  machineSpec: {},
  entries: [entry(1, 650, 'out_of_limits'), entry(2, 820, 'done')],
  voidReason: null,
};
const detail: SignOffDetail = { signatures: [], returns: [], addenda: [], recordHash: null, previousHash: null, signedAt: null };

describe('SignOffReview', () => {
  async function setUp(userId: string) {
    TestBed.configureTestingModule({
      imports: [SignOffReview],
      providers: [provideZonelessChangeDetection(), provideRouter([]), provideHttpClient(withInterceptors([problemInterceptor, tokenInterceptor])), provideHttpClientTesting()],
    });
    const http = TestBed.inject(HttpTestingController);
    const signingIn = TestBed.inject(Session).signIn({ email: 'c@tests.example', password: 'p' });
    http.expectOne('/api/auth/login').flush({ accessToken: 't', expiresIn: 900, user: { id: userId, email: 'c@tests.example', displayName: 'Dougal', roles: ['competent_person'] } });
    await signingIn;
    const fixture = TestBed.createComponent(SignOffReview);
    fixture.componentRef.setInput('id', 'r1');
    fixture.detectChanges();
    http.expectOne('/api/records/r1').flush(record);
    http.expectOne('/api/records/r1/signatures').flush(detail);
    http.expectOne('/api/records/r1/audit').flush([]);
    await fixture.whenStable();
    return { fixture, http, loader: TestbedHarnessEnvironment.loader(fixture), root: TestbedHarnessEnvironment.documentRootLoader(fixture) };
  }
  afterEach(() => TestBed.inject(HttpTestingController).verify());

  it('when a record is reviewed, then both attempts show with units, limits, the corrective note and the computed value', async () => {
    const { fixture } = await setUp('reviewer');
    const text = (fixture.nativeElement as HTMLElement).textContent!;
    expect(text).toContain('650 kgf');
    expect(text).toContain('820 kgf');
    expect(text).toContain('min 700, max 900 kgf');
    expect(text).toContain('Too slack; wound it up.');
    expect(text).toContain('161.4 MPa');
    expect(text).toContain('re-measured later');
  });

  it('when the competent person signs off, then their password goes with the request and the signatures reload', async () => {
    const { loader, root, http, fixture } = await setUp('reviewer');
    await (await loader.getHarness(MatButtonHarness.with({ text: 'Sign off' }))).click();
    await (await root.getHarness(MatInputHarness.with({ selector: '[formControlName=password]' }))).setValue('secret');
    const clicking = (await root.getHarness(MatButtonHarness.with({ text: 'Sign' }))).click();
    let found: TestRequest[] = [];
    for (let i = 0; i < 40 && !found.length; i++) {
      await new Promise((r) => setTimeout(r, 25));
      found = http.match('/api/records/r1/sign-off');
    }
    expect(found[0]!.request.body).toEqual({ password: 'secret' });
    found[0]!.flush({ ...detail, recordHash: 'a'.repeat(64) });
    await new Promise((r) => setTimeout(r, 50));
    http.expectOne('/api/records/r1').flush({ ...record, status: 'signed_off' });
    http.expectOne('/api/records/r1/signatures').flush({ ...detail, recordHash: 'a'.repeat(64) });
    http.expectOne('/api/records/r1/audit').flush([]);
    await clicking;
    await fixture.whenStable();
    expect((fixture.nativeElement as HTMLElement).textContent).toContain('a'.repeat(64));
  });

  it('when the reviewer performed the record, then no Sign off button is offered', async () => {
    const { loader, fixture } = await setUp('trainee');
    expect(await loader.getAllHarnesses(MatButtonHarness.with({ text: 'Sign off' }))).toEqual([]);
    expect((fixture.nativeElement as HTMLElement).textContent).toContain('another competent person signs it off');
  });
});
