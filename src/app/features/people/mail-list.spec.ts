import { provideHttpClient, withInterceptors } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { provideZonelessChangeDetection } from '@angular/core';
import { TestBed } from '@angular/core/testing';
import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';
import { MatExpansionPanelHarness } from '@angular/material/expansion/testing';
import { MatTabNavBarHarness } from '@angular/material/tabs/testing';
import { provideRouter } from '@angular/router';
import type { StandInMessage } from '@setwright/contracts/people';
import { problemInterceptor, tokenInterceptor } from '../../core/interceptors';
import { MailList } from './mail-list';

const invitation: StandInMessage = {
  id: '2026-05-11T07-02-11-120Z-000004-a1b2c3d4',
  receivedAt: '2026-05-11T07:02:11.000Z',
  from: 'Setwright at Brackenford <setwright@brackenford-works.example>',
  to: ['Sam Oduya <sam.oduya@brackenford-works.example>'],
  subject: 'Your Setwright account at Brackenford Fabrication Training Works',
  text: 'Hello Sam Oduya,\n\nSet your password: http://127.0.0.1:4300/set-password?token=abc\n',
  links: ['http://127.0.0.1:4300/set-password?token=abc'],
};

describe('MailList', () => {
  async function setUp(answer: (http: HttpTestingController) => void) {
    TestBed.configureTestingModule({
      imports: [MailList],
      providers: [provideZonelessChangeDetection(), provideRouter([]), provideHttpClient(withInterceptors([problemInterceptor, tokenInterceptor])), provideHttpClientTesting()],
    });
    const fixture = TestBed.createComponent(MailList);
    fixture.detectChanges();
    answer(TestBed.inject(HttpTestingController));
    await fixture.whenStable();
    return { fixture, loader: TestbedHarnessEnvironment.loader(fixture) };
  }
  afterEach(() => TestBed.inject(HttpTestingController).verify());

  it('when the stand-in has mail, then each message shows with its recipient, and its links open from the page', async () => {
    const { fixture, loader } = await setUp((http) => http.expectOne('/api/dev/mail').flush([invitation]));
    const [panel] = await loader.getAllHarnesses(MatExpansionPanelHarness);
    expect(await panel!.getTitle()).toBe('Your Setwright account at Brackenford Fabrication Training Works');
    expect(await panel!.getDescription()).toContain('Sam Oduya <sam.oduya@brackenford-works.example>');
    await panel!.expand();
    expect(await panel!.getTextContent()).toContain('Hello Sam Oduya');
    const link = (fixture.nativeElement as HTMLElement).querySelector<HTMLAnchorElement>('.links a')!;
    expect(link.getAttribute('href')).toBe('http://127.0.0.1:4300/set-password?token=abc');
    const tabs = await (await loader.getHarness(MatTabNavBarHarness)).getLinks();
    expect(await Promise.all(tabs.map((t) => t.getLabel()))).toEqual(['People', 'Mail']);
  });

  it('when the server has no stand-in mailbox, then the page says mail goes to a real relay', async () => {
    const { fixture } = await setUp((http) =>
      http.expectOne('/api/dev/mail').flush(
        { type: '/problems/not-found', title: 'Not found', status: 404, detail: 'There is no GET /api/dev/mail in this API.' },
        { status: 404, statusText: 'Not Found', headers: { 'content-type': 'application/problem+json' } },
      ),
    );
    expect((fixture.nativeElement as HTMLElement).querySelector('[role=alert]')!.textContent).toContain('sends e-mail to a real mail relay');
  });
});
