import { provideHttpClient, withInterceptors } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { provideZonelessChangeDetection } from '@angular/core';
import { TestBed } from '@angular/core/testing';
import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';
import { MatButtonHarness } from '@angular/material/button/testing';
import { provideRouter } from '@angular/router';
import type { RecordCheck } from '@setwright/contracts/signoff';
import { problemInterceptor, tokenInterceptor } from '../../core/interceptors';
import { RecordCheckPage } from './record-check';

const intact: RecordCheck = {
  recordId: 'r1',
  intact: true,
  checks: [
    { name: 'Content matches its hash', ok: true, detail: 'The record, its entries, photos and signatures are exactly as they were signed.' },
    { name: 'Linked to the machine’s previous record', ok: true, detail: 'It points at the hash of the record signed before it on this machine.' },
  ],
  storedHash: 'a'.repeat(64),
  computedHash: 'a'.repeat(64),
  previousHash: 'b'.repeat(64),
  expectedPreviousHash: 'b'.repeat(64),
  checkedAt: '2026-05-01T10:00:00.000Z',
};
const broken: RecordCheck = {
  ...intact,
  intact: false,
  checks: [{ name: 'Content matches its hash', ok: false, detail: 'What is stored now does not match the hash made at sign-off: something was changed after signing.' }, intact.checks[1]!],
  computedHash: 'c'.repeat(64),
};

describe('RecordCheckPage', () => {
  async function open(answer: RecordCheck) {
    TestBed.configureTestingModule({
      imports: [RecordCheckPage],
      providers: [provideZonelessChangeDetection(), provideRouter([]), provideHttpClient(withInterceptors([problemInterceptor, tokenInterceptor])), provideHttpClientTesting()],
    });
    const http = TestBed.inject(HttpTestingController);
    const fixture = TestBed.createComponent(RecordCheckPage);
    fixture.componentRef.setInput('id', 'r1');
    fixture.detectChanges();
    http.expectOne('/api/records/r1/check').flush(answer);
    await fixture.whenStable();
    return { fixture, http, el: fixture.nativeElement as HTMLElement, loader: TestbedHarnessEnvironment.loader(fixture) };
  }
  afterEach(() => TestBed.inject(HttpTestingController).verify());

  it('when the record is intact, then a green panel says so and every check and both hashes are listed', async () => {
    const { el, loader } = await open(intact);
    const verdict = el.querySelector('.verdict')!;
    expect(verdict.classList).toContain('intact');
    expect(verdict.textContent).toContain('Intact');
    const checks = [...el.querySelectorAll('.checks li')].map((li) => li.textContent!.replace(/\s+/g, ' ').trim());
    expect(checks.length).toBe(2);
    expect(checks[0]).toContain('Content matches its hash: passed');
    expect(el.textContent).toContain('a'.repeat(64));
    expect(el.textContent).toContain('b'.repeat(64));
    expect(await loader.getHarness(MatButtonHarness.with({ text: /Download the PDF/ }))).toBeTruthy();
  });

  it('when the record has been changed, then a red panel says it is broken and names the failed check', async () => {
    const { el } = await open(broken);
    const verdict = el.querySelector('.verdict')!;
    expect(verdict.classList).toContain('broken');
    expect(verdict.textContent).toContain('Broken');
    expect(verdict.getAttribute('role')).toBe('alert');
    const bad = el.querySelector('.checks li.bad')!;
    expect(bad.textContent).toContain('Content matches its hash');
    expect(bad.textContent).toContain('Content matches its hash: failed');
    expect(el.textContent).toContain('c'.repeat(64));
  });

  it('when Check again is pressed, then the check runs again and the page shows the new answer', async () => {
    const { loader, http, el, fixture } = await open(intact);
    const clicking = (await loader.getHarness(MatButtonHarness.with({ text: /Check again/ }))).click();
    for (let i = 0; i < 80; i++) {
      const found = http.match('/api/records/r1/check');
      if (found.length) {
        found[0]!.flush(broken);
        break;
      }
      await new Promise((r) => setTimeout(r, 25));
    }
    await clicking;
    await fixture.whenStable();
    expect(el.querySelector('.verdict')!.classList).toContain('broken');
  });
});
