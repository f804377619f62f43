import { provideHttpClient, withInterceptors } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { provideZonelessChangeDetection } from '@angular/core';
import { TestBed } from '@angular/core/testing';
import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';
import { MatButtonHarness } from '@angular/material/button/testing';
import { MatCardHarness } from '@angular/material/card/testing';
import { MatChipHarness } from '@angular/material/chips/testing';
import { provideRouter, Router } from '@angular/router';
import type { ProcedureVersionSummary } from '@setwright/contracts/procedures';
import type { Role } from '@setwright/contracts/roles';
import { problemInterceptor, tokenInterceptor } from '../../core/interceptors';
import { Session } from '../../core/session';
import { groupByProcedure, ProcedureLibrary } from './procedure-library';

const when = '2026-11-20T09:30:00.000Z';
function summary(key: string, title: string, version: number, status: ProcedureVersionSummary['status'], extra: Partial<ProcedureVersionSummary> = {}): ProcedureVersionSummary {
  return {
    id: `${key}-${version}`,
    key,
    version,
    title,
    machineKind: 'horizontal_bandsaw',
    status,
    checksum: 'a'.repeat(64),
    source: 'pack',
    author: null,
    approvedBy: null,
    approvedAt: status === 'draft' ? null : when,
    createdAt: when,
    updatedAt: when,
    ...extra,
  };
}

// As the API lists them: by title, then newest version first.
const rows: ProcedureVersionSummary[] = [
  summary('blade-tension', 'Tensioning the blade', 3, 'draft', { source: 'editor', author: { id: 'u9', displayName: 'Rowan' } }),
  summary('blade-tension', 'Tensioning the blade', 2, 'approved', { source: 'editor', author: { id: 'u9', displayName: 'Rowan' }, approvedBy: { id: 'u3', displayName: 'Morgan' } }),
  summary('blade-tension', 'Tensioning the blade', 1, 'retired'),
  summary('guide-bearings', 'Setting the guide bearings', 1, 'approved'),
];

describe('ProcedureLibrary', () => {
  async function setUp(roles: Role[]) {
    TestBed.configureTestingModule({
      imports: [ProcedureLibrary],
      providers: [
        provideZonelessChangeDetection(),
        provideRouter([]),
        provideHttpClient(withInterceptors([problemInterceptor, tokenInterceptor])),
        provideHttpClientTesting(),
      ],
    });
    const http = TestBed.inject(HttpTestingController);
    const session = TestBed.inject(Session);
    const signingIn = session.signIn({ email: 'a@tests.example', password: 'p' });
    http.expectOne('/api/auth/login').flush({ accessToken: 't', expiresIn: 900, user: { id: 'u1', email: 'a@tests.example', displayName: 'Alex', roles } });
    await signingIn;
    const fixture = TestBed.createComponent(ProcedureLibrary);
    fixture.detectChanges();
    http.expectOne('/api/procedures?all=1').flush(rows);
    await fixture.whenStable();
    return { fixture, http, loader: TestbedHarnessEnvironment.loader(fixture) };
  }
  afterEach(() => TestBed.inject(HttpTestingController).verify());

  it('when the library opens, then each procedure lists its versions with their states', async () => {
    const { loader } = await setUp(['workshop_admin']);
    const cards = await loader.getAllHarnesses(MatCardHarness);
    expect(await Promise.all(cards.map((c) => c.getTitleText()))).toEqual(['Setting the guide bearings', 'Tensioning the blade']);
    const tension = cards[1]!;
    const chips = await tension.getAllHarnesses(MatChipHarness);
    expect(await Promise.all(chips.map((c) => c.getText()))).toEqual(['Draft', 'Approved', 'Retired']);
    const text = await (await tension.host()).text();
    expect(text).toContain('Version 3');
    expect(text).toContain('Draft by Rowan');
    expect(text).toContain('Approved by Morgan');
    expect(await (await cards[0]!.getHarness(MatChipHarness)).getText()).toBe('Approved');
  });

  it('when an admin starts a draft, then the copy is asked for and its page opens', async () => {
    const { loader, http, fixture } = await setUp(['workshop_admin']);
    const router = TestBed.inject(Router);
    const navigate = spyOn(router, 'navigate').and.resolveTo(true);
    const cards = await loader.getAllHarnesses(MatCardHarness);
    expect(await cards[1]!.getAllHarnesses(MatButtonHarness.with({ text: /Start a draft/ }))).withContext('a draft is already open').toEqual([]);
    const start = await cards[0]!.getHarness(MatButtonHarness.with({ text: /Start a draft/ }));
    const clicking = start.click();
    await new Promise((r) => setTimeout(r, 25));
    const req = http.expectOne({ method: 'POST', url: '/api/procedures/guide-bearings/drafts' });
    expect(req.request.body).toEqual({});
    req.flush({ ...summary('guide-bearings', 'Setting the guide bearings', 2, 'draft'), body: {} }, { status: 201, statusText: 'Created' });
    await clicking;
    await fixture.whenStable();
    expect(navigate).toHaveBeenCalledWith(['/procedures', 'guide-bearings', 'versions', 2]);
  });

  it('when a competent person opens the library, then no draft can be started from it', async () => {
    const { loader } = await setUp(['competent_person']);
    expect(await loader.getAllHarnesses(MatButtonHarness.with({ text: /Start a draft/ }))).toEqual([]);
    expect((await loader.getAllHarnesses(MatChipHarness)).length).toBe(4);
  });
});

describe('groupByProcedure', () => {
  it('when versions are grouped, then each procedure takes its approved version’s title and keeps its open draft', () => {
    const renamed = [summary('k', 'New wording', 2, 'draft'), summary('k', 'Old wording', 1, 'approved')];
    const [entry] = groupByProcedure(renamed);
    expect(entry!.title).toBe('Old wording');
    expect(entry!.draft?.version).toBe(2);
    expect(entry!.versions.map((v) => v.version)).toEqual([2, 1]);
  });
});
