import { provideHttpClient, withInterceptors } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting, type TestRequest } from '@angular/common/http/testing';
import { provideZonelessChangeDetection } from '@angular/core';
import { TestBed } from '@angular/core/testing';
import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';
import { MatButtonHarness } from '@angular/material/button/testing';
import { MatDialogHarness } from '@angular/material/dialog/testing';
import { MatFormFieldHarness } from '@angular/material/form-field/testing';
import { MatInputHarness } from '@angular/material/input/testing';
import { MatTableHarness } from '@angular/material/table/testing';
import { provideRouter } from '@angular/router';
import type { AuthorisationView, CompetencyMatrix as Matrix } from '@setwright/contracts/competencies';
import type { Role } from '@setwright/contracts/roles';
import { problemInterceptor, tokenInterceptor } from '../../core/interceptors';
import { Session } from '../../core/session';
import { CompetencyMatrix } from './competency-matrix';

const NIA = '5d0c3f6e-8a1b-4c2d-9e3f-0a1b2c3d4e5f';

const authorisation = (over: Partial<AuthorisationView>): AuthorisationView => ({
  id: 'a1',
  person: { id: 'ellis', displayName: 'Ellis Marwood' },
  procedureKey: 'blade-change',
  procedureTitle: 'Removing and fitting a blade',
  grantedBy: { id: 'dougal', displayName: 'Dougal Pryce' },
  grantedAt: '2026-03-01T09:00:00Z',
  expiresOn: '2027-03-01',
  note: null,
  state: 'current',
  daysLeft: 89,
  endedAt: null,
  endedBy: null,
  endKind: null,
  endReason: null,
  ...over,
});

const matrix: Matrix = {
  today: '2026-12-02',
  expiringWithinDays: 30,
  procedures: [
    { key: 'isolation-lockout', title: 'Isolating and locking off the saw' },
    { key: 'blade-change', title: 'Removing and fitting a blade' },
  ],
  rows: [
    {
      person: { id: 'ellis', displayName: 'Ellis Marwood', email: 'ellis@tests.example', roles: ['trainee'] },
      cells: {
        'blade-change': { witnessedRuns: 3, signedRuns: 2, lastSignedAt: '2026-11-20T10:00:00Z', authorisation: authorisation({}) },
        'isolation-lockout': { witnessedRuns: 1, signedRuns: 1, lastSignedAt: '2026-10-01T10:00:00Z', authorisation: authorisation({ id: 'a2', procedureKey: 'isolation-lockout', expiresOn: '2026-12-14', state: 'expiring', daysLeft: 12 }) },
      },
    },
    {
      person: { id: NIA, displayName: 'Nia Castellan', email: 'nia@tests.example', roles: ['trainee'] },
      cells: {
        'isolation-lockout': { witnessedRuns: 2, signedRuns: 2, lastSignedAt: null, authorisation: authorisation({ id: 'a3', person: { id: NIA, displayName: 'Nia Castellan' }, procedureKey: 'isolation-lockout', expiresOn: '2026-11-30', state: 'expired', daysLeft: -2 }) },
      },
    },
    { person: { id: 'dougal', displayName: 'Dougal Pryce', email: 'dougal@tests.example', roles: ['competent_person'] }, cells: {} },
  ],
};

async function until(http: HttpTestingController, url: string): Promise<TestRequest> {
  for (let i = 0; i < 80; i++) {
    const found = http.match((r) => r.url === url);
    if (found.length) return found[0]!;
    await new Promise((r) => setTimeout(r, 25));
  }
  throw new Error(`no request to ${url}`);
}

describe('CompetencyMatrix', () => {
  async function setUp(roles: Role[], id = 'dougal') {
    TestBed.configureTestingModule({
      imports: [CompetencyMatrix],
      providers: [provideZonelessChangeDetection(), provideRouter([]), provideHttpClient(withInterceptors([problemInterceptor, tokenInterceptor])), provideHttpClientTesting()],
    });
    const http = TestBed.inject(HttpTestingController);
    const signingIn = TestBed.inject(Session).signIn({ email: 'd@tests.example', password: 'p' });
    http.expectOne('/api/auth/login').flush({ accessToken: 't', expiresIn: 900, user: { id, email: 'd@tests.example', displayName: 'Dougal Pryce', roles } });
    await signingIn;
    const fixture = TestBed.createComponent(CompetencyMatrix);
    fixture.detectChanges();
    http.expectOne('/api/competencies/matrix').flush(matrix);
    await fixture.whenStable();
    return { fixture, http, loader: TestbedHarnessEnvironment.loader(fixture), root: TestbedHarnessEnvironment.documentRootLoader(fixture) };
  }
  afterEach(() => TestBed.inject(HttpTestingController).verify());

  const openCell = async (fixture: { nativeElement: HTMLElement }, label: string) => {
    const button = fixture.nativeElement.querySelector<HTMLButtonElement>(`button[aria-label^="${label}"]`)!;
    button.click();
  };

  it('when the matrix is shown, then each person has counts per procedure and authorisations expiring or expired are marked', async () => {
    const { loader, fixture } = await setUp(['competent_person']);
    const table = await loader.getHarness(MatTableHarness);
    expect(await table.getHeaderRows().then((h) => h[0]!.getCellTextByIndex())).toEqual(['Person', 'Isolating and locking off the saw', 'Removing and fitting a blade']);
    const rows = await table.getCellTextByIndex();
    expect(rows[0]![0]).toContain('Ellis Marwood');
    // Each cell: the counts, then the authorisation (after an icon whose name is read as text by the harness).
    const cell = (r: number, c: number) => rows[r]![c]!.replace(/\s+/g, ' ');
    expect(cell(0, 1)).toMatch(/^1 witnessed · 1 signed\s?\w* Expires in 12 days$/);
    expect(cell(0, 2)).toMatch(/^3 witnessed · 2 signed\s?\w* Authorised to 1 Mar 2027$/);
    expect(cell(1, 1)).toMatch(/^2 witnessed · 2 signed\s?\w* Expired 30 Nov 2026$/);
    expect(cell(2, 2)).toBe('0 witnessed · 0 signed Not authorised');
    const el = fixture.nativeElement as HTMLElement;
    expect(el.querySelectorAll('button.cell.expiring').length).toBe(1);
    expect(el.querySelectorAll('button.cell.expired').length).toBe(1);
    expect(el.querySelector('button[aria-label^="Nia Castellan, Isolating"]')!.getAttribute('aria-label')).toBe(
      'Nia Castellan, Isolating and locking off the saw: 2 witnessed, 2 signed, Expired 30 Nov 2026',
    );
  });

  it('when a competent person authorises someone, then the date, note and password are sent and a wrong password shows on its field', async () => {
    const { fixture, root, http } = await setUp(['competent_person']);
    await openCell(fixture, 'Nia Castellan, Removing');
    (await until(http, '/api/competencies/authorisations')).flush([]);
    const dialog = await root.getHarness(MatDialogHarness);
    const input = (name: string) => dialog.getHarness(MatInputHarness.with({ selector: `[formControlName=${name}]` }));
    expect(await (await input('expiresOn')).getValue()).toBe('2027-12-02');
    await (await input('note')).setValue('Three clean runs.');
    await (await input('password')).setValue('wrong one');
    const clicking = (await dialog.getHarness(MatButtonHarness.with({ text: 'Sign and authorise' }))).click();
    const req = await until(http, '/api/competencies/authorisations');
    expect(req.request.method).toBe('POST');
    expect(req.request.body).toEqual({ personId: NIA, procedureKey: 'blade-change', expiresOn: '2027-12-02', note: 'Three clean runs.', password: 'wrong one' });
    req.flush(
      { type: '/problems/signature-not-accepted', title: 'Signature not accepted', status: 422, errors: [{ pointer: '#/password', detail: 'That password is not right.' }] },
      { status: 422, statusText: 'Unprocessable' },
    );
    await clicking;
    const password = await dialog.getHarness(MatFormFieldHarness.with({ floatingLabelText: 'Your password' }));
    expect(await password.getTextErrors()).toEqual(['That password is not right.']);
  });

  it('when a competent person opens their own cell, or an auditor any cell, then no authorise form is offered', async () => {
    const { fixture, root, http } = await setUp(['competent_person']);
    await openCell(fixture, 'Dougal Pryce, Removing');
    (await until(http, '/api/competencies/authorisations')).flush([]);
    const dialog = await root.getHarness(MatDialogHarness);
    expect(await dialog.getAllHarnesses(MatButtonHarness.with({ text: 'Sign and authorise' }))).toEqual([]);
    expect(await dialog.getText()).toContain('Not authorised');
  });

  it('when an auditor opens a cell, then they read the history but cannot authorise or withdraw', async () => {
    const { fixture, root, http } = await setUp(['auditor'], 'harriet');
    await openCell(fixture, 'Ellis Marwood, Removing');
    (await until(http, '/api/competencies/authorisations')).flush([
      authorisation({}),
      authorisation({ id: 'a0', grantedAt: '2025-03-01T09:00:00Z', expiresOn: '2026-03-01', endKind: 'renewed', endedAt: '2026-03-01T09:00:00Z', endedBy: { id: 'dougal', displayName: 'Dougal Pryce' } }),
    ]);
    const dialog = await root.getHarness(MatDialogHarness);
    const text = (await dialog.getText()).replace(/\s+/g, ' ');
    expect(text).toContain('granted by Dougal Pryce, to 1 Mar 2026 — renewed 1 Mar 2026 by Dougal Pryce');
    expect(await dialog.getAllHarnesses(MatButtonHarness.with({ text: 'Sign and authorise' }))).toEqual([]);
    expect(await dialog.getAllHarnesses(MatButtonHarness.with({ text: 'Withdraw' }))).toEqual([]);
  });

  it('when the matrix is downloaded, then the CSV comes from the API with the sign-in and is saved as a file', async () => {
    const { loader, http } = await setUp(['workshop_admin']);
    const saved: string[] = [];
    spyOn(HTMLAnchorElement.prototype, 'click').and.callFake(function (this: HTMLAnchorElement) {
      saved.push(this.download);
    });
    const clicking = (await loader.getHarness(MatButtonHarness.with({ text: /Download CSV/ }))).click();
    const req = await until(http, '/api/competencies/matrix.csv');
    expect(req.request.responseType).toBe('blob');
    expect(req.request.headers.get('Authorization')).toBe('Bearer t');
    req.flush(new Blob(['Person,Email\r\n'], { type: 'text/csv' }));
    await clicking;
    await new Promise((r) => setTimeout(r, 20));
    expect(saved).toEqual(['competency-matrix-2026-12-02.csv']);
  });
});
