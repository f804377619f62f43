import { provideHttpClient, withInterceptors } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting, type TestRequest } from '@angular/common/http/testing';
import { provideZonelessChangeDetection } from '@angular/core';
import { TestBed, type ComponentFixture } from '@angular/core/testing';
import type { HarnessLoader } from '@angular/cdk/testing';
import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';
import { MatButtonHarness } from '@angular/material/button/testing';
import { MatDateRangeInputHarness } from '@angular/material/datepicker/testing';
import { MatInputHarness } from '@angular/material/input/testing';
import { MatPaginatorHarness } from '@angular/material/paginator/testing';
import { MatSelectHarness } from '@angular/material/select/testing';
import { MatSortHarness } from '@angular/material/sort/testing';
import { MatTableHarness } from '@angular/material/table/testing';
import { provideRouter } from '@angular/router';
import type { ArchiveItem, ArchivePage } from '@setwright/contracts/archive';
import type { MachineSummary } from '@setwright/contracts/machines';
import { problemInterceptor, tokenInterceptor } from '../../core/interceptors';
import { Downloads } from './downloads';
import { RecordsArchive } from './records-archive';

const machines = [
  { id: 'm1', name: 'Bay 2 bandsaw', assetTag: 'BFW-SAW-01', location: 'Bay 2', kind: 'horizontal_bandsaw', model: 'HB', spec: {} },
  { id: 'm2', name: 'Stores bandsaw', assetTag: 'BFW-SAW-02', location: 'Stores', kind: 'horizontal_bandsaw', model: 'HB', spec: {} },
] as MachineSummary[];
const procedures = [
  { key: 'blade-tension', version: 2, title: 'Tensioning the blade' },
  { key: 'blade-tension', version: 1, title: 'Tensioning the blade' },
  { key: 'blade-change', version: 1, title: 'Removing and fitting a blade' },
];

function item(n: number, over: Partial<ArchiveItem> = {}): ArchiveItem {
  return {
    id: `00000000-0000-4000-8000-00000000000${n}`,
    status: 'signed_off',
    result: 'passed',
    machine: { id: 'm1', name: 'Bay 2 bandsaw', assetTag: 'BFW-SAW-01' },
    procedure: { key: 'blade-tension', version: 2, title: 'Tensioning the blade' },
    performedBy: 'Ellis Marwood',
    approvedBy: 'Dougal Pryce',
    createdAt: '2026-05-01T08:00:00.000Z',
    signedAt: '2026-05-01T09:30:00.000Z',
    recordHash: 'a'.repeat(64),
    ...over,
  };
}
const firstPage: ArchivePage = {
  items: [item(1), item(2, { result: 'failed', machine: { id: 'm2', name: 'Stores bandsaw', assetTag: 'BFW-SAW-02' } }), item(3, { status: 'ready_for_signoff', result: 'passed', signedAt: null, approvedBy: null })],
  total: 60,
};

describe('RecordsArchive', () => {
  let fixture: ComponentFixture<RecordsArchive>;
  let http: HttpTestingController;
  let loader: HarnessLoader;
  let saved: { blob: Blob; name: string }[];

  /** The archive request a user action sends, answered while the action is still in flight. */
  async function nextPage(answer: ArchivePage = firstPage): Promise<TestRequest> {
    let found: TestRequest[] = [];
    for (let i = 0; i < 80 && !found.length; i++) {
      await new Promise((r) => setTimeout(r, 25));
      found = http.match((r) => r.url === '/api/archive/records');
    }
    expect(found.length).withContext('a request to /api/archive/records').toBe(1);
    found[0]!.flush(answer);
    return found[0]!;
  }
  const params = (req: TestRequest) => Object.fromEntries(req.request.params.keys().map((k) => [k, req.request.params.get(k)]));

  beforeEach(async () => {
    saved = [];
    TestBed.configureTestingModule({
      imports: [RecordsArchive],
      providers: [
        provideZonelessChangeDetection(),
        provideRouter([]),
        provideHttpClient(withInterceptors([problemInterceptor, tokenInterceptor])),
        provideHttpClientTesting(),
        { provide: Downloads, useValue: { save: (blob: Blob, name: string) => saved.push({ blob, name }) } },
      ],
    });
    http = TestBed.inject(HttpTestingController);
    fixture = TestBed.createComponent(RecordsArchive);
    fixture.detectChanges();
    http.expectOne('/api/machines').flush(machines);
    http.expectOne((r) => r.url === '/api/procedures' && r.params.get('all') === '1').flush(procedures);
    const first = http.expectOne((r) => r.url === '/api/archive/records');
    expect(params(first)).toEqual({ dateField: 'signedAt', page: '0', size: '25', sort: 'signedAt', dir: 'desc' });
    first.flush(firstPage);
    await fixture.whenStable();
    loader = TestbedHarnessEnvironment.loader(fixture);
  });
  afterEach(() => http.verify());

  it('when the list opens, then the server’s page shows in the table with results, states and a PDF button for signed records only', async () => {
    const table = await loader.getHarness(MatTableHarness);
    const rows = await table.getRows();
    expect(rows.length).toBe(3);
    const first = await rows[0]!.getCellTextByColumnName();
    expect(first['machine']).toContain('Bay 2 bandsaw');
    expect(first['procedure']).toContain('Tensioning the blade');
    expect(first['result']).toContain('Passed');
    expect(first['result']).toContain('Signed off');
    expect((await rows[1]!.getCellTextByColumnName())['result']).toContain('Failed');
    expect((await rows[2]!.getCellTextByColumnName())['result']).toContain('Ready for sign-off');
    expect((await loader.getAllHarnesses(MatButtonHarness.with({ text: /PDF/ }))).length).toBe(2);
    const paginator = await loader.getHarness(MatPaginatorHarness);
    expect(await paginator.getRangeLabel()).toBe('1 – 25 of 60');
  });

  it('when the next page or another page size is chosen, then the request asks the server for that page', async () => {
    const paginator = await loader.getHarness(MatPaginatorHarness);
    const going = paginator.goToNextPage();
    expect(params(await nextPage())).toEqual(jasmine.objectContaining({ page: '1', size: '25' }));
    await going;
    const sizing = paginator.setPageSize(50);
    expect(params(await nextPage())).toEqual(jasmine.objectContaining({ size: '50' }));
    await sizing;
  });

  it('when a machine, procedure, state and result are chosen, then each request carries them and starts again at page 0', async () => {
    const paginator = await loader.getHarness(MatPaginatorHarness);
    const going = paginator.goToNextPage();
    await nextPage();
    await going;

    const machine = await loader.getHarness(MatSelectHarness.with({ selector: '[formControlName=machineId]' }));
    await machine.open();
    const picking = machine.clickOptions({ text: 'Stores bandsaw · BFW-SAW-02' });
    expect(params(await nextPage())).toEqual(jasmine.objectContaining({ machineId: 'm2', page: '0' }));
    await picking;

    const procedure = await loader.getHarness(MatSelectHarness.with({ selector: '[formControlName=procedure]' }));
    await procedure.open();
    expect((await procedure.getOptions()).length).toBe(3, 'one option per procedure, not per version, and "Every procedure"');
    const choosing = procedure.clickOptions({ text: 'Tensioning the blade' });
    expect(params(await nextPage())).toEqual(jasmine.objectContaining({ machineId: 'm2', procedure: 'blade-tension' }));
    await choosing;

    const result = await loader.getHarness(MatSelectHarness.with({ selector: '[formControlName=result]' }));
    await result.open();
    const failing = result.clickOptions({ text: 'Failed' });
    expect(params(await nextPage())).toEqual(jasmine.objectContaining({ result: 'failed' }));
    await failing;

    const state = await loader.getHarness(MatSelectHarness.with({ selector: '[formControlName=status]' }));
    await state.open();
    const stating = state.clickOptions({ text: 'Returned' });
    expect(params(await nextPage())).toEqual(jasmine.objectContaining({ status: 'returned' }));
    await stating;
    // Only signed-off records go into an evidence pack.
    const pack = await loader.getHarness(MatButtonHarness.with({ text: /Download evidence pack/ }));
    expect(await pack.isDisabled()).toBeTrue();
  });

  it('when a person’s name is typed, then one request goes after a pause in typing, with the name', async () => {
    const person = await loader.getHarness(MatInputHarness.with({ selector: '[formControlName=person]' }));
    const typing = person.setValue('dougal');
    const req = await nextPage();
    expect(params(req)).toEqual(jasmine.objectContaining({ person: 'dougal', page: '0' }));
    await typing;
  });

  it('when a date range is picked, then it goes as the start of the first day and the end of the last, in this tablet’s time zone', async () => {
    const range = await loader.getHarness(MatDateRangeInputHarness);
    const starting = (await range.getStartInput()).setValue('5/1/2026');
    expect(params(await nextPage())).toEqual(jasmine.objectContaining({ from: new Date(2026, 4, 1).toISOString() }));
    await starting;
    const ending = (await range.getEndInput()).setValue('5/2/2026');
    const req = await nextPage();
    expect(params(req)).toEqual(
      jasmine.objectContaining({ from: new Date(2026, 4, 1).toISOString(), to: new Date(2026, 4, 3).toISOString(), dateField: 'signedAt' }),
    );
    await ending;
  });

  it('when a column header is clicked, then the server sorts by it', async () => {
    const sort = await loader.getHarness(MatSortHarness);
    const [machine] = await sort.getSortHeaders({ label: 'Machine' });
    const sorting = machine!.click();
    expect(params(await nextPage())).toEqual(jasmine.objectContaining({ sort: 'machine', dir: 'asc', page: '0' }));
    await sorting;
  });

  it('when PDF is pressed on a row, then that record’s PDF is fetched and saved under the server’s file name', async () => {
    const [button] = await loader.getAllHarnesses(MatButtonHarness.with({ text: /PDF/ }));
    const clicking = button!.click();
    let found: TestRequest[] = [];
    for (let i = 0; i < 80 && !found.length; i++) {
      await new Promise((r) => setTimeout(r, 25));
      found = http.match(`/api/records/${item(1).id}/pdf`);
    }
    found[0]!.flush(new Blob(['%PDF-1.7'], { type: 'application/pdf' }), { headers: { 'Content-Disposition': 'attachment; filename="BFW-SAW-01-blade-tension-v2.pdf"' } });
    await clicking;
    await fixture.whenStable();
    expect(saved.map((s) => s.name)).toEqual(['BFW-SAW-01-blade-tension-v2.pdf']);
  });
});
