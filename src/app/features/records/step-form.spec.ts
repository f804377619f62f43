import { provideHttpClient, withInterceptors } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting, type TestRequest } from '@angular/common/http/testing';
import { provideZonelessChangeDetection } from '@angular/core';
import { TestBed } from '@angular/core/testing';
import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';
import { MatButtonHarness } from '@angular/material/button/testing';
import { MatButtonToggleHarness } from '@angular/material/button-toggle/testing';
import { MatInputHarness } from '@angular/material/input/testing';
import { provideRouter } from '@angular/router';
import { bladeStress, quantity, valueIn } from '@setwright/maths';
import type { StepEntryView } from '@setwright/contracts/records';
import { procedureSchema, type Step } from '@setwright/procedures/schema';
import { deleteDB } from 'idb';
import fc from 'fast-check';
import { problemInterceptor, tokenInterceptor } from '../../core/interceptors';
import { OFFLINE_DB_NAME, OfflineDb } from '../../core/offline/offline-db';
import { Outbox } from '../../core/offline/outbox';
import type { EntryItem } from '../../core/offline/outbox-items';
import { Session } from '../../core/session';
import { ReadingFieldHarness } from '../../shared/ui/reading-field/reading-field-harness';
import { StepForm } from './step-form';

const procedure = procedureSchema.parse({
  key: 'spec-fixture',
  version: 1,
  title: 'Spec fixture',
  intendedUse: 'Component tests.',
  scope: 'Tests.',
  machineKind: 'horizontal_bandsaw',
  hazards: ['Sharp blade'],
  steps: [
    {
      id: 'tension',
      title: 'Read the tension gauge',
      kind: 'reading',
      instruction: 'Read the gauge.',
      cautions: [{ level: 'mandatory', code: 'M009', text: 'Gloves while the saw is isolated.' }],
      inputs: [
        {
          id: 'reading',
          type: 'number',
          label: 'Gauge reading',
          unit: 'kgf',
          decimals: 0,
          limits: { min: { $spec: 'tensionRangeKgf.min', unit: 'kgf' }, max: { $spec: 'tensionRangeKgf.max', unit: 'kgf' } },
        },
      ],
      computed: [
        {
          id: 'stress',
          label: 'Stress in one strand',
          fn: 'bladeStress',
          args: { force: { $input: 'reading' }, reads: { $spec: 'tensionReads' }, width: { $spec: 'bladeWidthMm', unit: 'mm' }, thickness: { $spec: 'bladeThicknessMm', unit: 'mm' } },
          output: 'stress',
          unit: 'MPa',
          decimals: 1,
        },
      ],
    },
    { id: 'track', title: 'Track under power', kind: 'check', powered: true, instruction: 'Run it.', inputs: [{ id: 'clear', type: 'yesno', label: 'Runs clear of the flange', expected: true }] },
  ],
});
const spec = { tensionRangeKgf: { min: 700, max: 900 }, tensionReads: 'wheel-load', bladeWidthMm: 27, bladeThicknessMm: 0.9 };

function entryFrom(req: TestRequest, outcome: 'done' | 'out_of_limits' = 'done'): StepEntryView {
  const body = req.request.body;
  return {
    id: 'e1',
    stepId: body.stepId,
    attempt: 1,
    values: body.values,
    evaluation: { inputs: [], computed: [], complete: true, outOfLimits: outcome !== 'done', missing: [] },
    outcome,
    correctiveNote: body.correctiveNote ?? null,
    enteredBy: { id: 'u1', displayName: 'Ellis' },
    witnessedBy: null,
    witnessedAt: null,
    idempotencyKey: body.idempotencyKey,
    createdAt: new Date().toISOString(),
  };
}

describe('StepForm', () => {
  let dbName: string;

  /** With `signedIn`, someone is signed in and the tablet can keep steps. */
  async function setUp(step: Step, signedIn = false) {
    dbName = `setwright-step-form-spec-${crypto.randomUUID()}`;
    TestBed.configureTestingModule({
      imports: [StepForm],
      providers: [
        provideZonelessChangeDetection(),
        provideRouter([]),
        provideHttpClient(withInterceptors([problemInterceptor, tokenInterceptor])),
        provideHttpClientTesting(),
        { provide: OFFLINE_DB_NAME, useValue: dbName },
      ],
    });
    if (signedIn) {
      const signingIn = TestBed.inject(Session).signIn({ email: 'e@tests.example', password: 'p' });
      TestBed.inject(HttpTestingController)
        .expectOne('/api/auth/login')
        .flush({ accessToken: 't', expiresIn: 900, user: { id: 'u1', email: 'e@tests.example', displayName: 'Ellis', roles: ['trainee'] } });
      await signingIn;
    }
    const fixture = TestBed.createComponent(StepForm);
    fixture.componentRef.setInput('recordId', 'r1');
    fixture.componentRef.setInput('step', step);
    fixture.componentRef.setInput('spec', spec);
    const saved: StepEntryView[] = [];
    fixture.componentInstance.saved.subscribe((e) => saved.push(e));
    const kept: EntryItem[] = [];
    fixture.componentInstance.kept.subscribe((e) => kept.push(e));
    await fixture.whenStable();
    const loader = TestbedHarnessEnvironment.loader(fixture);
    const root = TestbedHarnessEnvironment.documentRootLoader(fixture);
    const http = TestBed.inject(HttpTestingController);
    /** Click a button and answer the request it sends (the click waits for the app, which waits for the request). */
    const clickAndAnswer = async (button: MatButtonHarness, answer: (req: TestRequest) => void) => {
      const clicking = button.click();
      // The request may wait for a dialog to finish closing: look for it for up to a second.
      let found: TestRequest[] = [];
      for (let i = 0; i < 40 && found.length === 0; i++) {
        await new Promise((r) => setTimeout(r, 25));
        found = http.match('/api/records/r1/entries');
      }
      expect(found.length).withContext('one entry request').toBe(1);
      answer(found[0]!);
      await clicking;
      await new Promise((r) => setTimeout(r, 50));
      await fixture.whenStable();
    };
    return { fixture, loader, root, http, saved, kept, clickAndAnswer };
  }
  afterEach(async () => {
    TestBed.inject(HttpTestingController).verify();
    await TestBed.inject(OfflineDb).close();
    TestBed.resetTestingModule();
    await deleteDB(dbName);
  });

  it('when a reading is inside the machine’s range, then it says so and shows the library’s stress', async () => {
    const { loader, fixture } = await setUp(procedure.steps[0]!);
    const reading = await loader.getHarness(ReadingFieldHarness);
    expect(await reading.getLimits()).toContain('Limits 700–900 kgf');
    await reading.setValue('800');
    expect(await reading.getVerdict()).toBe('Within limits');
    const expected = valueIn(bladeStress({ force: quantity(800, 'kgf'), reads: 'wheel-load', width: quantity(27, 'mm'), thickness: quantity(0.9, 'mm') }).stress, 'MPa');
    const figure = (fixture.nativeElement as HTMLElement).querySelector('.figure-value')!.textContent!.trim();
    expect(figure).toBe(`${expected.toFixed(1)} MPa`);
  });

  it('when a reading is out of limits, then it needs a corrective note before it is sent', async () => {
    const { loader, http } = await setUp(procedure.steps[0]!);
    const reading = await loader.getHarness(ReadingFieldHarness);
    await reading.setValue('650');
    expect(await reading.getVerdict()).toBe('Out of limits');
    const save = await loader.getHarness(MatButtonHarness.with({ text: 'Save step' }));
    await save.click();
    http.expectNone('/api/records/r1/entries');
    const note = await loader.getHarness(MatInputHarness.with({ selector: 'textarea' }));
    expect(note).toBeTruthy();
    expect(document.querySelector('.message')!.textContent).toContain('out of limits');
  });

  it('when "1,200" or "0x4B0" is typed as a reading, then the field says why by name and nothing is judged or sent', async () => {
    const { loader, http, fixture } = await setUp(procedure.steps[0]!);
    const reading = await loader.getHarness(ReadingFieldHarness);
    await reading.setValue('1,200');
    expect(await reading.getError()).toMatch(/^Gauge reading: "1,200" has a thousands separator/);
    expect(await reading.getVerdict()).toBe('');
    expect((fixture.nativeElement as HTMLElement).querySelector('.figure-value')?.textContent ?? '').not.toMatch(/\d/);
    await reading.setValue('0x4B0');
    expect(await reading.getError()).toMatch(/^Gauge reading: "0x4B0" is not a decimal number/);
    await (await loader.getHarness(MatButtonHarness.with({ text: 'Save step' }))).click();
    http.expectNone('/api/records/r1/entries');
    expect(document.querySelector('.message')!.textContent).toContain('Put right the readings marked in red');
  });

  it('when a reading is past any workshop size (99999999 kgf), then it is refused on the field rather than judged', async () => {
    const { loader } = await setUp(procedure.steps[0]!);
    const reading = await loader.getHarness(ReadingFieldHarness);
    await reading.setValue('99999999');
    expect(await reading.getError()).toContain('beyond any workshop reading');
    expect(await reading.getVerdict()).toBe('');
    await reading.setValue('800');
    expect(await reading.getError()).toBe('');
    expect(await reading.getVerdict()).toBe('Within limits');
  });

  it('when random text is typed as a reading, then it is either its plain decimal, judged on the raw figure, or refused with a reason — never a silent number', async () => {
    const { loader, fixture } = await setUp(procedure.steps[0]!);
    const reading = await loader.getHarness(ReadingFieldHarness);
    const control = () => (fixture.componentInstance as unknown as { form: () => { controls: Record<string, { value: unknown }> } }).form().controls['reading']!;
    const plain = /^\s*[+-]?(\d+\.?\d*|\.\d+)\s*$/;
    const texts = fc.oneof(
      fc.string({ maxLength: 12 }),
      fc.double({ noNaN: true }).map(String),
      fc.integer({ min: 600, max: 1000 }).map(String),
      fc.constantFrom('1,200', '0x4B0', '1e3', '800.5', '.5', '-0.05', '899.9999', '900.0001', 'Infinity', ' 800 '),
    );
    await fc.assert(
      fc.asyncProperty(texts, async (text) => {
        await reading.setValue(text);
        const value = control().value;
        const error = await reading.getError();
        const verdict = await reading.getVerdict();
        if (text.trim() === '') return value === null && error === '' && verdict === '';
        if (!plain.test(text) || Math.abs(Number(text)) * 9.80665 > 1e7 || (Number(text) !== 0 && Math.abs(Number(text)) * 9.80665 < 1e-4)) {
          // Refused: a reason on the field, no number behind it, no verdict.
          return value === null && error.length > 0 && verdict === '';
        }
        // Read as typed, and judged on the raw figure against 700–900 kgf (from the machine's range).
        const n = Number(text);
        return value === n && error === '' && verdict === (n >= 700 && n <= 900 ? 'Within limits' : 'Out of limits');
      }),
      { numRuns: 40 },
    );
  });

  it('when a noted out-of-limits reading is saved, then the values, the note and a UUID key go to the server', async () => {
    const { loader, saved, clickAndAnswer } = await setUp(procedure.steps[0]!);
    await (await loader.getHarness(ReadingFieldHarness)).setValue('650');
    await (await loader.getHarness(MatInputHarness.with({ selector: 'textarea' }))).setValue('Gauge read low; wound the tension up.');
    let sent: { idempotencyKey: string; values: object; correctiveNote: string } | undefined;
    await clickAndAnswer(await loader.getHarness(MatButtonHarness.with({ text: 'Save step' })), (req) => {
      sent = req.request.body;
      req.flush(entryFrom(req, 'out_of_limits'), { status: 201, statusText: 'Created' });
    });
    expect(sent!.values).toEqual({ reading: 650 });
    expect(sent!.correctiveNote).toBe('Gauge read low; wound the tension up.');
    expect(sent!.idempotencyKey).toMatch(/^[0-9a-f-]{36}$/);
    expect(saved.length).toBe(1);
  });

  it('when the tablet cannot keep the step (nobody signed in) and the connection drops, then the entries stay and the retry sends the same key', async () => {
    const { loader, clickAndAnswer } = await setUp(procedure.steps[0]!);
    await (await loader.getHarness(ReadingFieldHarness)).setValue('800');
    const save = await loader.getHarness(MatButtonHarness.with({ text: 'Save step' }));
    const keys: string[] = [];
    await clickAndAnswer(save, (req) => {
      keys.push(req.request.body.idempotencyKey);
      req.error(new ProgressEvent('error'), { status: 0, statusText: 'Unknown Error' });
    });
    expect(document.querySelector('.message')!.textContent).toContain('save again when the connection is back');
    expect(await (await loader.getHarness(ReadingFieldHarness)).getValue()).toBe('800');
    await clickAndAnswer(save, (req) => {
      keys.push(req.request.body.idempotencyKey);
      req.flush(entryFrom(req), { status: 201, statusText: 'Created' });
    });
    expect(keys[0]).toBe(keys[1]!);
  });

  it('when the server points at a value, then its message shows on that field', async () => {
    const { loader, clickAndAnswer } = await setUp(procedure.steps[0]!);
    await (await loader.getHarness(ReadingFieldHarness)).setValue('800');
    await clickAndAnswer(await loader.getHarness(MatButtonHarness.with({ text: 'Save step' })), (req) =>
      req.flush(
        { type: '/problems/validation', title: 'Your request has mistakes in it', status: 400, detail: 'Some values do not fit this step.', errors: [{ pointer: '#/values/reading', detail: 'Gauge reading: enter a number in kgf.' }] },
        { status: 400, statusText: 'Bad Request', headers: { 'content-type': 'application/problem+json' } },
      ),
    );
    expect(document.querySelector('sw-reading-field mat-error')!.textContent).toContain('enter a number in kgf');
  });

  it('when a powered step is saved by a trainee, then a witness enters their own sign-in and it goes with the entry', async () => {
    const { loader, root, clickAndAnswer, saved } = await setUp(procedure.steps[1]!);
    expect(document.querySelector('.powered')!.textContent).toContain('Power on — witness needed');
    await (await loader.getHarness(MatButtonToggleHarness.with({ text: 'Yes' }))).check();
    await (await loader.getHarness(MatButtonHarness.with({ text: 'Call a witness and save' }))).click();
    await (await root.getHarness(MatInputHarness.with({ selector: '[formControlName=email]' }))).setValue('dougal@tests.example');
    await (await root.getHarness(MatInputHarness.with({ selector: '[formControlName=password]' }))).setValue('secret');
    let witness: unknown;
    await clickAndAnswer(await root.getHarness(MatButtonHarness.with({ text: 'Witness and save' })), (req) => {
      witness = req.request.body.witness;
      expect(req.request.body.values).toEqual({ clear: true });
      req.flush(entryFrom(req), { status: 201, statusText: 'Created' });
    });
    expect(witness).toEqual({ email: 'dougal@tests.example', password: 'secret' });
    expect(saved.length).toBe(1);
  });

  it('when the connection drops while a signed-in trainee saves, then the step is kept on this tablet with the same key, and the form says it waits there', async () => {
    const { loader, fixture, saved, kept, clickAndAnswer } = await setUp(procedure.steps[0]!, true);
    await (await loader.getHarness(ReadingFieldHarness)).setValue('800');
    let key = '';
    await clickAndAnswer(await loader.getHarness(MatButtonHarness.with({ text: 'Save step' })), (req) => {
      key = req.request.body.idempotencyKey;
      req.error(new ProgressEvent('error'), { status: 0, statusText: 'Unknown Error' });
    });
    for (let i = 0; i < 100 && !kept.length; i++) await new Promise((r) => setTimeout(r, 10));
    expect(saved.length).toBe(0);
    expect(kept.length).toBe(1);
    expect(kept[0]!.request).toEqual({ idempotencyKey: key, stepId: 'tension', values: { reading: 800 }, correctiveNote: undefined });
    expect(kept[0]!.preview.outcome).toBe('done');
    const onDevice = await TestBed.inject(OfflineDb).items('u1');
    expect(onDevice.map((i) => (i.kind === 'entry' ? i.request.idempotencyKey : ''))).toEqual([key]);
    expect(TestBed.inject(Outbox).waiting()).toBe(1);
    expect(document.querySelector('.message')).toBeNull();

    // The runner shows it as the step's entry, waiting on this device.
    fixture.componentRef.setInput('onDevice', true);
    await fixture.whenStable();
    expect((fixture.nativeElement as HTMLElement).querySelector('.on-device')!.textContent).toContain('Saved on this tablet, waiting to go to the server');
  });

  it('when there is no connection, then a step with power on says it needs one and cannot be saved, and nothing is kept', async () => {
    const { loader, fixture, kept } = await setUp(procedure.steps[1]!, true);
    window.dispatchEvent(new Event('offline'));
    await fixture.whenStable();
    await (await loader.getHarness(MatButtonToggleHarness.with({ text: 'Yes' }))).check();
    expect((fixture.nativeElement as HTMLElement).querySelector('.needs-connection')!.textContent).toContain('this step waits for the Wi-Fi');
    const save = await loader.getHarness(MatButtonHarness.with({ text: 'Call a witness and save' }));
    expect(await save.isDisabled()).toBeTrue();
    expect(kept.length).toBe(0);
    expect(await TestBed.inject(OfflineDb).items('u1')).toEqual([]);
    window.dispatchEvent(new Event('online'));
    await fixture.whenStable();
    expect(await save.isDisabled()).toBeFalse();
  });
});
