import { provideHttpClient, withInterceptors } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { provideZonelessChangeDetection } from '@angular/core';
import { TestBed } from '@angular/core/testing';
import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';
import { MatButtonHarness } from '@angular/material/button/testing';
import { MatChipHarness } from '@angular/material/chips/testing';
import { MatTabGroupHarness } from '@angular/material/tabs/testing';
import { provideRouter } from '@angular/router';
import type { ProcedureVersionDetail, ProcedureVersionSummary } from '@setwright/contracts/procedures';
import type { Role } from '@setwright/contracts/roles';
import { procedureSchema, type Procedure } from '@setwright/procedures/schema';
import { problemInterceptor, tokenInterceptor } from '../../core/interceptors';
import { Session } from '../../core/session';
import { VersionPage } from './version-page';

const approvedBody = procedureSchema.parse({
  key: 'guide-check',
  version: 1,
  title: 'Checking the guides',
  intendedUse: 'Version page tests.',
  scope: 'Tests only.',
  machineKind: 'horizontal_bandsaw',
  hazards: ['Sharp blade'],
  steps: [
    { id: 'isolate', title: 'Isolate the saw', kind: 'isolation', instruction: 'Isolate it.', cautions: [{ level: 'mandatory', code: 'M021', text: 'Lock off before you start.' }] },
    {
      id: 'gap',
      title: 'Measure the guide gap',
      kind: 'reading',
      instruction: 'Slide a feeler between roller and blade.',
      inputs: [{ id: 'fixed', type: 'number', label: 'Fixed guide gap', unit: 'mm', limits: { min: 0.08, max: 0.12 } }],
    },
  ],
});
const draftBody: Procedure = {
  ...structuredClone(approvedBody),
  version: 2,
  steps: approvedBody.steps.map((s) =>
    s.id === 'gap'
      ? { ...s, title: 'Measure both guide gaps', inputs: [{ ...s.inputs[0]!, limits: { min: 0.05, max: 0.1 } } as Procedure['steps'][number]['inputs'][number]] }
      : s,
  ),
};

const when = '2026-11-20T09:30:00.000Z';
function detail(body: Procedure, status: ProcedureVersionDetail['status'], author: { id: string; displayName: string } | null): ProcedureVersionDetail {
  return {
    id: `v${body.version}`,
    key: body.key,
    version: body.version,
    title: body.title,
    machineKind: body.machineKind,
    status,
    checksum: 'b'.repeat(64),
    source: author ? 'editor' : 'pack',
    author,
    approvedBy: status === 'draft' ? null : { id: 'u3', displayName: 'Morgan' },
    approvedAt: status === 'draft' ? null : when,
    createdAt: when,
    updatedAt: when,
    body,
  };
}
const summaryOf = ({ body: _body, ...s }: ProcedureVersionDetail): ProcedureVersionSummary => s;

const rowan = { id: 'u9', displayName: 'Rowan' };
const draft = detail(draftBody, 'draft', rowan);
const approved = detail(approvedBody, 'approved', null);

describe('VersionPage', () => {
  async function setUp(user: { id: string; roles: Role[] }) {
    TestBed.configureTestingModule({
      imports: [VersionPage],
      providers: [
        provideZonelessChangeDetection(),
        provideRouter([]),
        provideHttpClient(withInterceptors([problemInterceptor, tokenInterceptor])),
        provideHttpClientTesting(),
      ],
    });
    const http = TestBed.inject(HttpTestingController);
    const session = TestBed.inject(Session);
    const signingIn = session.signIn({ email: 'x@tests.example', password: 'p' });
    http.expectOne('/api/auth/login').flush({ accessToken: 't', expiresIn: 900, user: { id: user.id, email: 'x@tests.example', displayName: 'Someone', roles: user.roles } });
    await signingIn;
    const fixture = TestBed.createComponent(VersionPage);
    fixture.componentRef.setInput('key', 'guide-check');
    fixture.componentRef.setInput('version', '2');
    fixture.detectChanges();
    http.expectOne('/api/procedures/guide-check/versions/2').flush(draft);
    http.expectOne('/api/procedures/guide-check/versions').flush([summaryOf(draft), summaryOf(approved)]);
    // The approved version is asked for once the list names it (waiting for stability would wait for this request).
    let compare = http.match('/api/procedures/guide-check/versions/1');
    for (let i = 0; i < 40 && compare.length === 0; i++) {
      await new Promise((r) => setTimeout(r, 10));
      compare = http.match('/api/procedures/guide-check/versions/1');
    }
    expect(compare.length).withContext('the approved version is fetched to compare with').toBe(1);
    compare[0]!.flush(approved);
    await fixture.whenStable();
    return { fixture, http, loader: TestbedHarnessEnvironment.loader(fixture) };
  }
  afterEach(() => TestBed.inject(HttpTestingController).verify());

  it('when the draft’s author opens it, then they can edit it but are not offered Approve', async () => {
    const { loader, fixture } = await setUp({ id: rowan.id, roles: ['workshop_admin'] });
    expect(await loader.getAllHarnesses(MatButtonHarness.with({ text: /Approve/ }))).toEqual([]);
    const tabs = await loader.getHarness(MatTabGroupHarness);
    const labels = await Promise.all((await tabs.getTabs()).map((t) => t.getLabel()));
    expect(labels).toEqual(['Edit', 'Read through', 'Differences']);
    expect(await (await loader.getHarness(MatChipHarness)).getText()).toBe('Draft');
    expect((fixture.nativeElement as HTMLElement).textContent).toContain('someone else approves it');
    expect(await loader.getHarness(MatButtonHarness.with({ text: 'Save draft' }))).toBeTruthy();
  });

  it('when a competent person opens the draft, then the differences show the changed step, and they can approve it', async () => {
    const { loader, http, fixture } = await setUp({ id: 'u3', roles: ['competent_person'] });
    const tabs = await loader.getHarness(MatTabGroupHarness);
    expect(await Promise.all((await tabs.getTabs()).map((t) => t.getLabel()))).toEqual(['Steps', 'Differences']);
    await tabs.selectTab({ label: 'Differences' });
    const page = fixture.nativeElement as HTMLElement;
    const changed = page.querySelector('sw-diff-view li[data-change="changed"]') as HTMLElement;
    expect(changed).withContext('a changed step').not.toBeNull();
    expect(changed.textContent).toContain('Step 2');
    expect(changed.textContent).toContain('Measure both guide gaps');
    expect(changed.textContent).toContain('Changed: title');
    expect(changed.textContent).toContain('Field “Fixed guide gap”: limits changed');
    expect(page.querySelector('sw-diff-view li[data-change="unchanged"]')!.textContent).toContain('Isolate the saw');
    expect(page.querySelector('sw-diff-view .summary')!.textContent).toContain('Compared with version 1: 1 step changed');

    await (await loader.getHarness(MatButtonHarness.with({ text: 'Approve' }))).click();
    const confirm = await loader.getHarness(MatButtonHarness.with({ text: 'Yes, approve version 2' }));
    const clicking = confirm.click();
    await new Promise((r) => setTimeout(r, 25));
    http.expectOne({ method: 'POST', url: '/api/procedures/guide-check/versions/2/approve' }).flush({ ...draft, status: 'approved', approvedBy: { id: 'u3', displayName: 'Someone' }, approvedAt: when });
    await clicking;
    await new Promise((r) => setTimeout(r, 25));
    http.expectOne('/api/procedures/guide-check/versions').flush([{ ...summaryOf(draft), status: 'approved' }, { ...summaryOf(approved), status: 'retired' }]);
    await fixture.whenStable();
    expect(await (await loader.getHarness(MatChipHarness)).getText()).toBe('Approved');
    expect(await loader.getAllHarnesses(MatButtonHarness.with({ text: /Approve/ }))).toEqual([]);
  });

  it('when the server refuses an approval, then its reason is shown and the draft stays a draft', async () => {
    const { loader, http, fixture } = await setUp({ id: 'u4', roles: ['workshop_admin'] });
    await (await loader.getHarness(MatButtonHarness.with({ text: 'Approve' }))).click();
    const clicking = (await loader.getHarness(MatButtonHarness.with({ text: 'Yes, approve version 2' }))).click();
    await new Promise((r) => setTimeout(r, 25));
    http
      .expectOne({ method: 'POST', url: '/api/procedures/guide-check/versions/2/approve' })
      .flush(
        { type: '/problems/not-allowed', title: 'Not allowed', status: 403, detail: 'You wrote this draft, so someone else must approve it.' },
        { status: 403, statusText: 'Forbidden', headers: { 'content-type': 'application/problem+json' } },
      );
    await clicking;
    await new Promise((r) => setTimeout(r, 25));
    await fixture.whenStable();
    expect((fixture.nativeElement as HTMLElement).querySelector('.problem')!.textContent).toContain('someone else must approve it');
    expect(await (await loader.getHarness(MatChipHarness)).getText()).toBe('Draft');
  });
});
