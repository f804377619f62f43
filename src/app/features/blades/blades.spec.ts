import { provideHttpClient, withInterceptors } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting, type TestRequest } from '@angular/common/http/testing';
import { provideZonelessChangeDetection } from '@angular/core';
import { TestBed } from '@angular/core/testing';
import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';
import { MatButtonHarness } from '@angular/material/button/testing';
import { MatFormFieldHarness } from '@angular/material/form-field/testing';
import { MatInputHarness } from '@angular/material/input/testing';
import { MatSelectHarness } from '@angular/material/select/testing';
import { MatTableHarness } from '@angular/material/table/testing';
import { provideRouter } from '@angular/router';
import type { BladeTypeView, MachineCurrentBlade } from '@setwright/contracts/blades';
import type { Role } from '@setwright/contracts/roles';
import { problemInterceptor, tokenInterceptor } from '../../core/interceptors';
import { Session } from '../../core/session';
import { Blades } from './blades';

const area = (cm2: number) => ({ m2: cm2 / 1e4, cm2, in2: cm2 / 6.4516 });
const types: BladeTypeView[] = [
  { id: 't1', widthMm: 27, thicknessMm: 0.9, lengthMm: 2742, pitch: '6/10', material: 'bi-metal', stock: 3, listed: true, note: 'Shelf B2', label: '27 × 0.9 × 2742 mm · 6/10 TPI · Bi-metal', onSaws: 1 },
  { id: 't2', widthMm: 27, thicknessMm: 0.9, lengthMm: 3400, pitch: '4', material: 'carbon', stock: 0, listed: false, note: null, label: '27 × 0.9 × 3400 mm · 4 TPI · Carbon steel', onSaws: 0 },
];
const saws: MachineCurrentBlade[] = [
  {
    machine: { id: 'm1', name: 'Bay 2 bandsaw', assetTag: 'BFW-SAW-01', location: 'Bay 2' },
    current: {
      id: 'f1',
      machineId: 'm1',
      bladeType: types[0]!,
      fittedAt: '2026-11-02T09:30:00Z',
      fittedBy: { id: 'u1', displayName: 'Ellis Marwood' },
      recordId: 'r1',
      fromStock: true,
      removedAt: null,
      removedBy: null,
      removalReason: null,
      removalReasonLabel: null,
      removalNote: null,
      removalRecordId: null,
      cutEntries: 1,
      breakIn: { breakInArea: area(645.16), areaCut: area(196.35), remaining: area(448.81), percentDone: 30.4, complete: false, feedFraction: 0.5 },
    },
  },
  { machine: { id: 'm2', name: 'Stores bandsaw', assetTag: 'BFW-SAW-02', location: 'Stores' }, current: null },
];

async function until(http: HttpTestingController, url: string): Promise<TestRequest> {
  for (let i = 0; i < 80; i++) {
    const found = http.match(url);
    if (found.length) return found[0]!;
    await new Promise((r) => setTimeout(r, 25));
  }
  throw new Error(`no request to ${url}`);
}

describe('Blades', () => {
  async function setUp(roles: Role[]) {
    TestBed.configureTestingModule({
      imports: [Blades],
      providers: [provideZonelessChangeDetection(), provideRouter([]), provideHttpClient(withInterceptors([problemInterceptor, tokenInterceptor])), provideHttpClientTesting()],
    });
    const http = TestBed.inject(HttpTestingController);
    const signingIn = TestBed.inject(Session).signIn({ email: 'a@tests.example', password: 'p' });
    http.expectOne('/api/auth/login').flush({ accessToken: 't', expiresIn: 900, user: { id: 'me', email: 'a@tests.example', displayName: 'Rowan', roles } });
    await signingIn;
    const fixture = TestBed.createComponent(Blades);
    fixture.detectChanges();
    http.expectOne('/api/blades/types').flush(types);
    http.expectOne('/api/blades/machines').flush(saws);
    await fixture.whenStable();
    return { fixture, http, loader: TestbedHarnessEnvironment.loader(fixture), root: TestbedHarnessEnvironment.documentRootLoader(fixture) };
  }
  afterEach(() => TestBed.inject(HttpTestingController).verify());

  it('when the blades are listed, then each type shows its size, pitch, material and stock, and each saw its blade and break-in left', async () => {
    const { loader } = await setUp(['trainee']);
    const stock = await loader.getHarness(MatTableHarness.with({ selector: '[aria-label="Blade types and stock"]' }));
    const rows = await stock.getCellTextByColumnName();
    expect(rows['size']!.text[0]).toContain('27 × 0.9 × 2742 mm');
    expect(rows['size']!.text[0]).toContain('Shelf B2');
    expect(rows['size']!.text[1]).toContain('Not on the stock list');
    expect(rows['pitch']!.text).toEqual(['6/10 TPI', '4 TPI']);
    expect(rows['material']!.text).toEqual(['Bi-metal', 'Carbon steel']);
    expect(rows['stock']!.text).toEqual(['3', '0']);
    expect(rows['onSaws']!.text).toEqual(['1', '0']);
    expect(rows['actions']).toBeUndefined();

    const onSaws = await loader.getHarness(MatTableHarness.with({ selector: '[aria-label="Blades on the saws now"]' }));
    const saw = await onSaws.getCellTextByColumnName();
    expect(saw['machine']!.text[0]).toContain('Bay 2 bandsaw');
    expect(saw['blade']!.text).toEqual(['27 × 0.9 × 2742 mm · 6/10 TPI · Bi-metal', 'None recorded yet']);
    expect(saw['breakIn']!.text[0]).toBe('449 cm² left at half feed');
    expect(await loader.getAllHarnesses(MatButtonHarness.with({ text: /Add a blade type/ }))).toEqual([]);
  });

  it('when an admin adds a blade type with a missing size, then the field says so and nothing is sent', async () => {
    const { loader, root, http } = await setUp(['workshop_admin']);
    await (await loader.getHarness(MatButtonHarness.with({ text: /Add a blade type/ }))).click();
    await (await root.getHarness(MatInputHarness.with({ selector: '[formControlName=thicknessMm]' }))).setValue('0.9');
    await (await root.getHarness(MatButtonHarness.with({ text: 'Add' }))).click();
    const width = await root.getHarness(MatFormFieldHarness.with({ floatingLabelText: 'Width' }));
    expect(await width.getTextErrors()).toEqual(['Enter the width in mm.']);
    const material = await root.getHarness(MatFormFieldHarness.with({ floatingLabelText: 'Material' }));
    expect(await material.getTextErrors()).toEqual(['Choose bi-metal or carbon steel.']);
    http.expectNone('/api/blades/types');
  });

  it('when an admin adds a blade type, then the figures are sent and a clash from the server shows on the pitch field', async () => {
    const { loader, root, http } = await setUp(['workshop_admin']);
    await (await loader.getHarness(MatButtonHarness.with({ text: /Add a blade type/ }))).click();
    const fill = async (name: string, value: string) => (await root.getHarness(MatInputHarness.with({ selector: `[formControlName=${name}]` }))).setValue(value);
    await fill('widthMm', '27');
    await fill('thicknessMm', '0,9');
    await fill('lengthMm', '2742');
    await fill('pitch', '6/10');
    await fill('stock', '4');
    await (await root.getHarness(MatSelectHarness.with({ selector: '[formControlName=material]' }))).clickOptions({ text: 'Bi-metal' });
    const clicking = (await root.getHarness(MatButtonHarness.with({ text: 'Add' }))).click();
    const req = await until(http, '/api/blades/types');
    expect(req.request.method).toBe('POST');
    expect(req.request.body).toEqual({ widthMm: 27, thicknessMm: 0.9, lengthMm: 2742, pitch: '6/10', material: 'bi-metal', stock: 4, note: null });
    req.flush(
      { type: '/problems/blade-type-exists', title: 'This blade type is already on the list', status: 409, errors: [{ pointer: '#/pitch', detail: 'The same size, pitch and material is already on the list.' }] },
      { status: 409, statusText: 'Conflict' },
    );
    await clicking;
    const pitch = await root.getHarness(MatFormFieldHarness.with({ floatingLabelText: 'Tooth pitch' }));
    expect(await pitch.getTextErrors()).toEqual(['The same size, pitch and material is already on the list.']);
  });

  it('when an admin changes a type’s stock, then only that type is sent and the list reloads', async () => {
    const { loader, root, http } = await setUp(['workshop_admin']);
    await (await loader.getHarness(MatButtonHarness.with({ selector: '[aria-label^="Change 27 × 0.9 × 2742"]' }))).click();
    await (await root.getHarness(MatInputHarness.with({ selector: '[formControlName=stock]' }))).setValue('9');
    const clicking = (await root.getHarness(MatButtonHarness.with({ text: 'Save' }))).click();
    const req = await until(http, '/api/blades/types/t1');
    expect(req.request.method).toBe('PATCH');
    expect(req.request.body).toEqual(jasmine.objectContaining({ stock: 9, pitch: '6/10', listed: true }));
    req.flush({ ...types[0], stock: 9 });
    await clicking;
    const reload = await until(http, '/api/blades/types');
    reload.flush([{ ...types[0], stock: 9 }, types[1]]);
    const stock = await loader.getHarness(MatTableHarness.with({ selector: '[aria-label="Blade types and stock"]' }));
    expect((await stock.getCellTextByColumnName())['stock']!.text).toEqual(['9', '0']);
  });
});
