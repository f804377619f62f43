import { provideHttpClient, withInterceptors } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { provideZonelessChangeDetection } from '@angular/core';
import { TestBed } from '@angular/core/testing';
import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';
import { MatButtonHarness } from '@angular/material/button/testing';
import { provideRouter } from '@angular/router';
import type { MachineDetail } from '@setwright/contracts/machines';
import type { ProcedureVersionSummary } from '@setwright/contracts/procedures';
import type { Role } from '@setwright/contracts/roles';
import { problemInterceptor, tokenInterceptor } from '../../core/interceptors';
import { Session } from '../../core/session';
import { MachinePage } from './machine-page';
import { nextRequest, testMachine, testSchedule } from './machine-test-data';

const procedure = (key: string, title: string): ProcedureVersionSummary => ({
  id: `p-${key}`,
  key,
  version: 1,
  title,
  machineKind: 'horizontal_bandsaw',
  status: 'approved',
  checksum: 'c'.repeat(64),
  source: 'pack',
  author: null,
  approvedBy: null,
  approvedAt: null,
  createdAt: '2026-01-01T00:00:00.000Z',
  updatedAt: '2026-01-01T00:00:00.000Z',
});
const PROCEDURES = [procedure('blade-tension', 'Blade tensioning'), procedure('isolation-lockout', 'Isolation and lockout'), procedure('speed-change', 'Blade speed change')];

/** Answer the tablet's requests for each procedure version it keeps (not what these specs look at). */
async function answerKeptProcedures(http: HttpTestingController, count: number) {
  let answered = 0;
  for (let i = 0; i < 120 && answered < count; i++) {
    for (const r of http.match((q) => /^\/api\/procedures\/[^/]+\/versions\/\d+$/.test(q.url))) {
      r.flush({ type: '/problems/not-found', title: 'Not found', status: 404 }, { status: 404, statusText: 'Not Found' });
      answered++;
    }
    await new Promise((res) => setTimeout(res, 25));
  }
}

describe('MachinePage status', () => {
  async function open(machine: MachineDetail, roles: Role[] = ['trainee']) {
    TestBed.configureTestingModule({
      imports: [MachinePage],
      providers: [provideZonelessChangeDetection(), provideRouter([]), provideHttpClient(withInterceptors([problemInterceptor, tokenInterceptor])), provideHttpClientTesting()],
    });
    const http = TestBed.inject(HttpTestingController);
    const signingIn = TestBed.inject(Session).signIn({ email: 't@tests.example', password: 'p' });
    http.expectOne('/api/auth/login').flush({ accessToken: 't', expiresIn: 900, user: { id: 'u1', email: 't@tests.example', displayName: 'Ellis', roles } });
    await signingIn;
    const fixture = TestBed.createComponent(MachinePage);
    fixture.componentRef.setInput('id', 'm1');
    fixture.detectChanges();
    http.expectOne('/api/machines/m1').flush(machine);
    http.expectOne((r) => r.url === '/api/records' && r.params.get('machineId') === 'm1').flush([]);
    (await nextRequest(http, (r) => r.url === '/api/procedures' && r.params.get('machineKind') === 'horizontal_bandsaw')).flush(PROCEDURES);
    // People who run procedures keep each one on the tablet: the page's procedure list asks for every version.
    if (roles.includes('trainee') || roles.includes('competent_person')) await answerKeptProcedures(http, PROCEDURES.length);
    (await nextRequest(http, (r) => r.url === '/api/machines/m1/trends')).flush({ machineId: 'm1', rule: { readings: 5, ahead: 3 }, series: [] });
    await fixture.whenStable();
    return { fixture, http, loader: TestbedHarnessEnvironment.loader(fixture), text: () => (fixture.nativeElement as HTMLElement).textContent!.replace(/\s+/g, ' ') };
  }
  afterEach(() => TestBed.inject(HttpTestingController).verify());

  it('when the machine is tagged out, then it says so in red with the failed record, and only the procedures that may put it right can start', async () => {
    const machine = testMachine(
      {
        state: 'tagged_out',
        label: 'Tagged out',
        taggedOutBy: [{ recordId: 'r9', procedureKey: 'blade-tension', procedureTitle: 'Blade tensioning', doneAt: '2026-02-05T14:00:00.000Z', signedAt: '2026-02-05T15:00:00.000Z' }],
      },
      { startable: ['blade-tension', 'isolation-lockout'] },
    );
    const { fixture, loader, text } = await open(machine);
    const badge = (fixture.nativeElement as HTMLElement).querySelector('sw-machine-status')!;
    expect(badge.textContent).toContain('Tagged out');
    expect(badge.classList).toContain('tagged_out');
    expect(getComputedStyle(badge).backgroundColor).toBe('rgb(196, 22, 28)');
    expect(text()).toContain('“Blade tensioning” failed on 5 Feb 2026');
    expect(text()).toContain('Do not use this saw for cutting');
    const starts = await loader.getAllHarnesses(MatButtonHarness.with({ text: 'Start' }));
    expect(await Promise.all(starts.map(async (b) => (await b.host()).getAttribute('aria-label')))).toEqual(['Start Blade tensioning', 'Start Isolation and lockout']);
    expect(text()).toMatch(/Blade speed change v1 ?Not while tagged out/);
  });

  it('when checks are due, then the machine shows Check due with how many, and each check its due date and why', async () => {
    const machine = testMachine({ state: 'check_due', label: 'Check due', dueCount: 1, nextDueAt: '2026-02-19T10:00:00.000Z' }, { schedules: [testSchedule()] });
    const { fixture, loader, text } = await open(machine);
    const badge = (fixture.nativeElement as HTMLElement).querySelector('sw-machine-status')!;
    expect(badge.textContent).toContain('Check due');
    expect(badge.classList).toContain('check_due');
    expect(text()).toContain('1 check is due');
    expect(text()).toMatch(/Blade tensioning ?Overdue · since 19 Feb 2026/);
    expect(text()).toContain('Every 30 days and after a blade change · last passed 20 Jan 2026');
    expect(text()).toContain('Every 30 days: last passed 20 Jan 2026.');
    expect((await loader.getAllHarnesses(MatButtonHarness.with({ text: 'Start' }))).length).toBe(3);
  });

  it('when nothing is due or tagged out, then it shows Ready with the safe-condition tick; auditors see no Start buttons', async () => {
    const { fixture, loader, text } = await open(testMachine(), ['auditor']);
    const badge = (fixture.nativeElement as HTMLElement).querySelector('sw-machine-status')!;
    expect(badge.textContent).toContain('check_circle');
    expect(badge.textContent).toContain('Ready');
    expect(text()).toContain('No checks are due and nothing is tagged out.');
    expect(text()).toContain('No blade is recorded for this saw yet.');
    expect(await loader.getAllHarnesses(MatButtonHarness.with({ text: 'Start' }))).toEqual([]);
    expect(await loader.getAllHarnesses(MatButtonHarness.with({ text: /Edit machine/ }))).toEqual([]);
  });
});
