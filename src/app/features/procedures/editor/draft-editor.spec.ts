import { provideHttpClient, withInterceptors } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting, type TestRequest } from '@angular/common/http/testing';
import { provideZonelessChangeDetection } from '@angular/core';
import { TestBed } from '@angular/core/testing';
import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';
import { MatButtonHarness } from '@angular/material/button/testing';
import { MatExpansionPanelHarness } from '@angular/material/expansion/testing';
import { MatFormFieldHarness } from '@angular/material/form-field/testing';
import { MatInputHarness } from '@angular/material/input/testing';
import { provideRouter } from '@angular/router';
import type { ProcedureVersionDetail } from '@setwright/contracts/procedures';
import { procedureSchema, type Procedure } from '@setwright/procedures/schema';
import { problemInterceptor, tokenInterceptor } from '../../../core/interceptors';
import { DraftEditor } from './draft-editor';

const body = procedureSchema.parse({
  key: 'guide-check',
  version: 2,
  title: 'Checking the guides',
  intendedUse: 'Editor tests.',
  scope: 'Tests only.',
  machineKind: 'horizontal_bandsaw',
  hazards: ['Sharp blade'],
  ppe: [{ level: 'mandatory', code: 'M004', text: 'Eye protection.' }],
  steps: [
    { id: 'isolate', title: 'Isolate the saw', kind: 'isolation', instruction: 'Isolate it.', inputs: [{ id: 'lock', type: 'text', label: 'Lock number' }] },
    {
      id: 'gap',
      title: 'Measure the guide gap',
      kind: 'reading',
      instruction: 'Slide a feeler between roller and blade.',
      inputs: [{ id: 'fixed', type: 'number', label: 'Fixed guide gap', unit: 'mm', limits: { min: 0.08, max: 0.12 } }],
    },
  ],
});

function detail(b: Procedure = body): ProcedureVersionDetail {
  return {
    id: 'v2',
    key: b.key,
    version: b.version,
    title: b.title,
    machineKind: b.machineKind,
    status: 'draft',
    checksum: 'c'.repeat(64),
    source: 'editor',
    author: { id: 'u1', displayName: 'Alex' },
    approvedBy: null,
    approvedAt: null,
    createdAt: new Date().toISOString(),
    updatedAt: new Date().toISOString(),
    body: b,
  };
}

describe('DraftEditor', () => {
  async function setUp() {
    TestBed.configureTestingModule({
      imports: [DraftEditor],
      providers: [
        provideZonelessChangeDetection(),
        provideRouter([]),
        provideHttpClient(withInterceptors([problemInterceptor, tokenInterceptor])),
        provideHttpClientTesting(),
      ],
    });
    const fixture = TestBed.createComponent(DraftEditor);
    fixture.componentRef.setInput('draft', detail());
    const saved: ProcedureVersionDetail[] = [];
    const changed: (Procedure | null)[] = [];
    fixture.componentInstance.saved.subscribe((d) => saved.push(d));
    fixture.componentInstance.changed.subscribe((p) => changed.push(p));
    await fixture.whenStable();
    const loader = TestbedHarnessEnvironment.loader(fixture);
    const http = TestBed.inject(HttpTestingController);
    /** Press Save and answer the PUT it sends (the click waits for the app, which waits for the request). */
    const saveAndAnswer = async (answer: (req: TestRequest) => void) => {
      const clicking = (await loader.getHarness(MatButtonHarness.with({ text: 'Save draft' }))).click();
      let found: TestRequest[] = [];
      for (let i = 0; i < 40 && found.length === 0; i++) {
        await new Promise((r) => setTimeout(r, 25));
        found = http.match({ method: 'PUT', url: '/api/procedures/guide-check/versions/2' });
      }
      expect(found.length).withContext('one save request').toBe(1);
      answer(found[0]!);
      await clicking;
      await new Promise((r) => setTimeout(r, 50));
      await fixture.whenStable();
    };
    return { fixture, loader, http, saved, changed, saveAndAnswer };
  }
  afterEach(() => TestBed.inject(HttpTestingController).verify());

  it('when a step and a field are added and the draft saved, then the whole body goes to the server with them', async () => {
    const { loader, saved, saveAndAnswer } = await setUp();
    await (await loader.getHarness(MatButtonHarness.with({ text: /Add a step/ }))).click();
    const panel = await loader.getHarness(MatExpansionPanelHarness.with({ title: /Step 3/ }));
    expect(await panel.isExpanded()).toBeTrue();
    const title = await (await panel.getHarness(MatFormFieldHarness.with({ floatingLabelText: 'Step title' }))).getControl(MatInputHarness);
    await title!.setValue('Photograph the guides');
    const instruction = await (await panel.getHarness(MatFormFieldHarness.with({ floatingLabelText: 'Instruction' }))).getControl(MatInputHarness);
    await instruction!.setValue('Take one photo of each guide arm.');
    await (await panel.getHarness(MatButtonHarness.with({ text: /Add a field/ }))).click();
    const asks = await (await panel.getHarness(MatFormFieldHarness.with({ floatingLabelText: 'What it asks' }))).getControl(MatInputHarness);
    await asks!.setValue('Gap after setting');
    const unit = await (await panel.getHarness(MatFormFieldHarness.with({ floatingLabelText: 'Unit' }))).getControl(MatInputHarness);
    await unit!.setValue('mm');

    let sent: Procedure | undefined;
    await saveAndAnswer((req) => {
      sent = req.request.body as Procedure;
      req.flush(detail(procedureSchema.parse(sent)));
    });
    expect(sent!.steps.length).toBe(3);
    const added = sent!.steps[2]!;
    expect(added.id).toBe('step-3');
    expect(added.title).toBe('Photograph the guides');
    expect(added.instruction).toBe('Take one photo of each guide arm.');
    expect(added.inputs).toEqual([jasmine.objectContaining({ id: 'field-1', type: 'number', label: 'Gap after setting', unit: 'mm' })]);
    expect(sent!.steps[1]).toEqual(body.steps[1]!);
    expect(saved.length).toBe(1);
    expect(document.querySelector('.message')!.textContent).toContain('Saved.');
  });

  it('when the server points at a step’s title, then its message shows on that title field', async () => {
    const { loader, saveAndAnswer } = await setUp();
    await saveAndAnswer((req) =>
      req.flush(
        {
          type: '/problems/validation',
          title: 'Your request has mistakes in it',
          status: 400,
          detail: 'The procedure has mistakes in it. Nothing was saved.',
          errors: [{ pointer: '#/steps/1/title', detail: 'Another procedure already uses this wording.' }],
        },
        { status: 400, statusText: 'Bad Request', headers: { 'content-type': 'application/problem+json' } },
      ),
    );
    const panel = await loader.getHarness(MatExpansionPanelHarness.with({ title: /Step 2/ }));
    expect(await panel.isExpanded()).withContext('the step with the problem opens').toBeTrue();
    const field = await panel.getHarness(MatFormFieldHarness.with({ floatingLabelText: 'Step title' }));
    expect(await field.getTextErrors()).toEqual(['Another procedure already uses this wording.']);
    const first = await loader.getHarness(MatExpansionPanelHarness.with({ title: /Step 1/ }));
    expect(await first.isExpanded()).toBeFalse();
    expect(document.querySelector('.message')!.textContent).toContain('Nothing was saved');
  });

  it('when a step title is emptied, then the same schema as the server flags it and nothing is sent', async () => {
    const { loader, http, changed } = await setUp();
    const panel = await loader.getHarness(MatExpansionPanelHarness.with({ title: /Step 1/ }));
    await panel.expand();
    const field = await panel.getHarness(MatFormFieldHarness.with({ floatingLabelText: 'Step title' }));
    await (await field.getControl(MatInputHarness))!.setValue('');
    await (await field.getControl(MatInputHarness))!.blur();
    expect(await field.getTextErrors()).toEqual(['Write something here.']);
    expect(changed[changed.length - 1]).toBeNull();
    await (await loader.getHarness(MatButtonHarness.with({ text: 'Save draft' }))).click();
    http.expectNone({ method: 'PUT' });
    expect(document.querySelector('.message')!.textContent).toContain('One thing needs correcting');
  });

  it('when a worked-out value’s arguments are not JSON, then that box says so', async () => {
    const { loader } = await setUp();
    const panel = await loader.getHarness(MatExpansionPanelHarness.with({ title: /Step 2/ }));
    await panel.expand();
    await (await panel.getHarness(MatButtonHarness.with({ text: /Add a worked-out value/ }))).click();
    const args = await panel.getHarness(MatFormFieldHarness.with({ floatingLabelText: 'Arguments (JSON)' }));
    await (await args.getControl(MatInputHarness))!.setValue('{ "gap": ');
    await (await args.getControl(MatInputHarness))!.blur();
    const errors = await args.getTextErrors();
    expect(errors.join(' ')).toContain('not valid JSON');
  });
});
