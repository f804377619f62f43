import { HttpEventType, HttpHeaderResponse, HttpHeaders, provideHttpClient, withInterceptors } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting, type TestRequest } from '@angular/common/http/testing';
import { provideZonelessChangeDetection } from '@angular/core';
import { TestBed, type ComponentFixture } from '@angular/core/testing';
import type { HarnessLoader } from '@angular/cdk/testing';
import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';
import { MatButtonHarness } from '@angular/material/button/testing';
import { MatProgressBarHarness } from '@angular/material/progress-bar/testing';
import { problemInterceptor, tokenInterceptor } from '../../core/interceptors';
import { Downloads } from './downloads';
import { EvidencePack, sizeText } from './evidence-pack';

describe('EvidencePack', () => {
  let fixture: ComponentFixture<EvidencePack>;
  let http: HttpTestingController;
  let loader: HarnessLoader;
  let saved: string[];

  const text = () => (fixture.nativeElement as HTMLElement).textContent ?? '';

  /** Press a button and catch the pack request it sends (a pending request holds the harness until answered). */
  async function press(label: RegExp): Promise<{ req: TestRequest; clicking: Promise<void> }> {
    const clicking = (await loader.getHarness(MatButtonHarness.with({ text: label }))).click();
    let found: TestRequest[] = [];
    for (let i = 0; i < 80 && !found.length; i++) {
      await new Promise((r) => setTimeout(r, 25));
      found = http.match((r) => r.url === '/api/archive/evidence-pack');
    }
    expect(found.length).toBe(1);
    return { req: found[0]!, clicking };
  }
  async function settle() {
    fixture.detectChanges();
    await new Promise((r) => setTimeout(r, 0));
    fixture.detectChanges();
  }

  beforeEach(async () => {
    saved = [];
    TestBed.configureTestingModule({
      imports: [EvidencePack],
      providers: [
        provideZonelessChangeDetection(),
        provideHttpClient(withInterceptors([problemInterceptor, tokenInterceptor])),
        provideHttpClientTesting(),
        { provide: Downloads, useValue: { save: (_blob: Blob, name: string) => saved.push(name) } },
      ],
    });
    http = TestBed.inject(HttpTestingController);
    fixture = TestBed.createComponent(EvidencePack);
    fixture.componentRef.setInput('filter', { procedure: 'blade-tension', from: '2026-04-30T23:00:00.000Z', dateField: 'signedAt' });
    await fixture.whenStable();
    loader = TestbedHarnessEnvironment.loader(fixture);
  });
  afterEach(() => http.verify());

  it('when a pack downloads, then it shows the record count from the headers and the bytes received, then saves the zip', async () => {
    const { req, clicking } = await press(/Download evidence pack/);
    expect(req.request.params.get('procedure')).toBe('blade-tension');
    expect(req.request.params.get('from')).toBe('2026-04-30T23:00:00.000Z');
    expect(req.request.reportProgress).toBeTrue();
    req.event(new HttpHeaderResponse({ headers: new HttpHeaders({ 'X-Record-Count': '3' }), status: 200 }));
    req.event({ type: HttpEventType.DownloadProgress, loaded: 2048 });
    await settle();
    expect(text()).toContain('Packing 3 records · 2.0 KB received');
    expect(await (await loader.getHarness(MatProgressBarHarness)).getMode()).toBe('indeterminate');
    req.event({ type: HttpEventType.DownloadProgress, loaded: 3 * 1024 * 1024 });
    await settle();
    expect(text()).toContain('3.0 MB received');
    req.flush(new Blob(['PK'], { type: 'application/zip' }), { headers: { 'Content-Disposition': 'attachment; filename="evidence-pack-3-records.zip"', 'X-Record-Count': '3' } });
    await clicking;
    await settle();
    expect(saved).toEqual(['evidence-pack-3-records.zip']);
    expect(text()).toContain('Saved evidence-pack-3-records.zip: 3 records');
    expect(await (await loader.getHarness(MatProgressBarHarness)).getValue()).toBe(100);
  });

  it('when the download is cut off, then it says so plainly and Try again fetches the pack again', async () => {
    const first = await press(/Download evidence pack/);
    first.req.event(new HttpHeaderResponse({ headers: new HttpHeaders({ 'X-Record-Count': '12' }), status: 200 }));
    first.req.event({ type: HttpEventType.DownloadProgress, loaded: 5000 });
    first.req.error(new ProgressEvent('error'));
    await first.clicking;
    await settle();
    expect(text()).toContain('The download was cut off.');
    expect(text()).toContain('Nothing was saved; try again.');
    expect(saved).toEqual([]);
    const again = await press(/Try again/);
    again.req.flush(new Blob(['PK']), { headers: { 'X-Record-Count': '12' } });
    await again.clicking;
    await settle();
    expect(text()).toContain('Saved evidence-pack.zip: 12 records');
  });

  it('when the filter selects unsigned records, then the button is off and says why', async () => {
    fixture.componentRef.setInput('blockedBecause', 'Evidence packs hold signed-off records only.');
    await fixture.whenStable();
    expect(await (await loader.getHarness(MatButtonHarness.with({ text: /Download evidence pack/ }))).isDisabled()).toBeTrue();
    expect(text()).toContain('Evidence packs hold signed-off records only.');
  });

  it('when sizes are shown, then they read in bytes, KB or MB', () => {
    expect(sizeText(512)).toBe('512 bytes');
    expect(sizeText(2048)).toBe('2.0 KB');
    expect(sizeText(1.5 * 1024 * 1024)).toBe('1.5 MB');
  });
});
