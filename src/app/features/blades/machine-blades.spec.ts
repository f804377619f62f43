import { provideHttpClient, withInterceptors } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting, type TestRequest } from '@angular/common/http/testing';
import { provideZonelessChangeDetection } from '@angular/core';
import { TestBed } from '@angular/core/testing';
import type { HarnessLoader } from '@angular/cdk/testing';
import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';
import { MatButtonHarness } from '@angular/material/button/testing';
import { MatButtonToggleHarness } from '@angular/material/button-toggle/testing';
import { MatDialogHarness } from '@angular/material/dialog/testing';
import { MatFormFieldHarness } from '@angular/material/form-field/testing';
import { MatInputHarness } from '@angular/material/input/testing';
import { MatRadioButtonHarness } from '@angular/material/radio/testing';
import { MatSelectHarness } from '@angular/material/select/testing';
import { MatTableHarness } from '@angular/material/table/testing';
import { provideRouter } from '@angular/router';
import type { FittingView, MachineBlades as MachineBladesView } from '@setwright/contracts/blades';
import type { Role } from '@setwright/contracts/roles';
import { problemInterceptor, tokenInterceptor } from '../../core/interceptors';
import { Session } from '../../core/session';
import { unitChoiceKey } from '../workshop-maths/unit-choice';
import { MachineBlades } from './machine-blades';

const area = (cm2: number) => ({ m2: cm2 / 1e4, cm2, in2: cm2 / 6.4516 });
const type = { id: 't1', widthMm: 27, thicknessMm: 0.9, lengthMm: 2742, pitch: '6/10', material: 'bi-metal' as const, stock: 2, listed: true, note: null, label: '27 × 0.9 × 2742 mm · 6/10 TPI · Bi-metal', onSaws: 1 };
const fitting = (id: string, over: Partial<FittingView> = {}): FittingView => ({
  id,
  machineId: 'm1',
  bladeType: type,
  fittedAt: '2026-11-02T09:30:00Z',
  fittedBy: { id: 'u1', displayName: 'Ellis Marwood' },
  recordId: `r-${id}`,
  fromStock: true,
  removedAt: null,
  removedBy: null,
  removalReason: null,
  removalReasonLabel: null,
  removalNote: null,
  removalRecordId: null,
  cutEntries: 2,
  breakIn: { breakInArea: area(645.16), areaCut: area(267.29), remaining: area(377.87), percentDone: 41.4, complete: false, feedFraction: 0.5 },
  ...over,
});
const view: MachineBladesView = {
  machine: { id: 'm1', name: 'Bay 2 bandsaw', assetTag: 'BFW-SAW-01' },
  current: fitting('f2'),
  fittings: [
    fitting('f2'),
    fitting('f1', {
      fittedAt: '2026-09-01T08:00:00Z',
      removedAt: '2026-11-02T09:30:00Z',
      removalReason: 'stripped_teeth',
      removalReasonLabel: 'Stripped teeth',
      removalNote: 'Teeth missing or stripped. Six teeth gone.',
      breakIn: { breakInArea: area(645.16), areaCut: area(5200), remaining: area(0), percentDone: 100, complete: true, feedFraction: 1 },
    }),
  ],
};
const cuts = [
  { id: 'c1', shape: 'round', unit: 'mm', sizes: { diameter: 50 }, count: 10, area: area(196.35), note: null, loggedBy: { id: 'u1', displayName: 'Ellis Marwood' }, loggedAt: '2026-11-03T10:00:00Z' },
];

/** Type into the field the person sees by its label. */
async function field(loader: HarnessLoader, label: string, value: string) {
  const f = await loader.getHarness(MatFormFieldHarness.with({ floatingLabelText: label }));
  await ((await f.getControl(MatInputHarness)) as MatInputHarness).setValue(value);
}

async function until(http: HttpTestingController, url: string): Promise<TestRequest> {
  for (let i = 0; i < 80; i++) {
    const found = http.match(url);
    if (found.length) return found[0]!;
    await new Promise((r) => setTimeout(r, 25));
  }
  throw new Error(`no request to ${url}`);
}

describe('MachineBlades', () => {
  async function setUp(roles: Role[]) {
    localStorage.removeItem(unitChoiceKey('me'));
    TestBed.configureTestingModule({
      imports: [MachineBlades],
      providers: [provideZonelessChangeDetection(), provideRouter([]), provideHttpClient(withInterceptors([problemInterceptor, tokenInterceptor])), provideHttpClientTesting()],
    });
    const http = TestBed.inject(HttpTestingController);
    const signingIn = TestBed.inject(Session).signIn({ email: 'a@tests.example', password: 'p' });
    http.expectOne('/api/auth/login').flush({ accessToken: 't', expiresIn: 900, user: { id: 'me', email: 'a@tests.example', displayName: 'Dougal', roles } });
    await signingIn;
    const fixture = TestBed.createComponent(MachineBlades);
    fixture.componentRef.setInput('id', 'm1');
    fixture.detectChanges();
    http.expectOne('/api/blades/machines/m1').flush(view);
    (await until(http, '/api/blades/fittings/f2')).flush({ ...view.current, cuts });
    await fixture.whenStable();
    return { fixture, http, loader: TestbedHarnessEnvironment.loader(fixture), root: TestbedHarnessEnvironment.documentRootLoader(fixture) };
  }
  afterEach(() => {
    TestBed.inject(HttpTestingController).verify();
    localStorage.removeItem(unitChoiceKey('me'));
  });

  it('when a machine’s blades are shown, then the break-in left reads in cm² or in² and the history lists each blade with why it came off', async () => {
    const { fixture, loader } = await setUp(['trainee']);
    const text = () => (fixture.nativeElement as HTMLElement).textContent!.replace(/\s+/g, ' ');
    expect(text()).toContain('378 cm² still to cut at about 50 % of normal feed');
    expect(text()).toContain('645 cm²');
    await (await loader.getHarness(MatButtonToggleHarness.with({ text: 'in²' }))).check();
    expect(text()).toContain('58.6 in² still to cut');
    expect(text()).toContain('100 in²');

    const history = await loader.getHarness(MatTableHarness.with({ selector: '[aria-label="Blade history, newest first"]' }));
    const cols = await history.getCellTextByColumnName();
    expect(cols['removed']!.text).toEqual(['On the saw', '2 Nov 2026']);
    expect(cols['reason']!.text[1]).toBe('Stripped teeth — Teeth missing or stripped. Six teeth gone.');
    expect(cols['cut']!.text[1]).toBe('806 in²');
    expect(await loader.getAllHarnesses(MatButtonHarness.with({ text: 'Take this blade off' }))).toEqual([]);
  });

  it('when cuts are logged, then the area they add shows before sending and the section, sizes and count are sent', async () => {
    const { fixture, loader, http } = await setUp(['trainee']);
    await field(loader, 'Diameter', '50');
    await field(loader, 'Number of cuts', '10');
    expect((fixture.nativeElement as HTMLElement).textContent).toContain('Adds 196 cm² of cut area');
    const clicking = (await loader.getHarness(MatButtonHarness.with({ text: 'Log cuts' }))).click();
    const req = await until(http, '/api/blades/fittings/f2/cuts');
    expect(req.request.body).toEqual({ shape: 'round', unit: 'mm', diameter: 50, count: 10 });
    req.flush(cuts[0]);
    await clicking;
    (await until(http, '/api/blades/machines/m1')).flush(view);
    (await until(http, '/api/blades/fittings/f2')).flush({ ...view.current, cuts });
    await fixture.whenStable();
  });

  it('when a tube’s wall is too thick, then the wall field says so and nothing is sent', async () => {
    const { loader, http } = await setUp(['trainee']);
    await (await loader.getHarness(MatSelectHarness.with({ selector: '[formControlName=shape]' }))).clickOptions({ text: 'Round tube' });
    await field(loader, 'Outside diameter', '40');
    await field(loader, 'Wall thickness', '25');
    await (await loader.getHarness(MatButtonHarness.with({ text: 'Log cuts' }))).click();
    const wall = await loader.getHarness(MatFormFieldHarness.with({ floatingLabelText: 'Wall thickness' }));
    expect(await wall.getTextErrors()).toEqual(['The wall must be less than half the outside diameter.']);
    http.expectNone('/api/blades/fittings/f2/cuts');
  });

  it('when a competent person takes the blade off, then "other" asks for a note first and the reason is sent', async () => {
    const { loader, root, http } = await setUp(['competent_person']);
    await (await loader.getHarness(MatButtonHarness.with({ text: 'Take this blade off' }))).click();
    await (await root.getHarness(MatRadioButtonHarness.with({ label: 'Other' }))).check();
    await (await root.getHarness(MatButtonHarness.with({ text: 'Take it off' }))).click();
    const note = await (await root.getHarness(MatDialogHarness)).getHarness(MatFormFieldHarness.with({ selector: '.wide' }));
    expect(await note.getTextErrors()).toEqual(['Say why the blade came off.']);
    http.expectNone('/api/blades/fittings/f2/removal');

    await (await root.getHarness(MatRadioButtonHarness.with({ label: 'Wrong pitch for the job' }))).check();
    // The page behind has a note field of its own: look inside the dialog.
    const dialog = await root.getHarness(MatDialogHarness);
    await (await dialog.getHarness(MatInputHarness.with({ selector: '[formControlName=note]' }))).setValue('Job is thin-wall tube.');
    const clicking = (await root.getHarness(MatButtonHarness.with({ text: 'Take it off' }))).click();
    const req = await until(http, '/api/blades/fittings/f2/removal');
    expect(req.request.body).toEqual({ reason: 'wrong_pitch', note: 'Job is thin-wall tube.' });
    req.flush({ ...view.current, removedAt: '2026-12-01T10:00:00Z', removalReason: 'wrong_pitch', cuts: [] });
    await clicking;
    (await until(http, '/api/blades/machines/m1')).flush({ ...view, current: null });
  });
});
