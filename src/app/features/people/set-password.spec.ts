import { provideHttpClient, withInterceptors } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting, type TestRequest } from '@angular/common/http/testing';
import { Component, provideZonelessChangeDetection } from '@angular/core';
import { TestBed } from '@angular/core/testing';
import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';
import { MatButtonHarness } from '@angular/material/button/testing';
import { MatFormFieldHarness } from '@angular/material/form-field/testing';
import { MatInputHarness } from '@angular/material/input/testing';
import { provideRouter, Router } from '@angular/router';
import { problemInterceptor, tokenInterceptor } from '../../core/interceptors';
import { Session } from '../../core/session';
import { SetPassword } from './set-password';

@Component({ template: 'today' })
class TodayStandIn {}

const TOKEN = 'k3Jq9x_Lw2-TzYb7mQv1RsA8cD4eF6gH0iJ5nP2uV9w';
const PASSWORD = 'stores saw blade 27mm';

describe('SetPassword', () => {
  async function setUp(token: string | null = TOKEN) {
    TestBed.configureTestingModule({
      imports: [SetPassword],
      providers: [
        provideZonelessChangeDetection(),
        provideRouter([{ path: 'today', component: TodayStandIn }]),
        provideHttpClient(withInterceptors([problemInterceptor, tokenInterceptor])),
        provideHttpClientTesting(),
      ],
    });
    const fixture = TestBed.createComponent(SetPassword);
    if (token !== null) fixture.componentRef.setInput('token', token);
    await fixture.whenStable();
    const loader = TestbedHarnessEnvironment.loader(fixture);
    const http = TestBed.inject(HttpTestingController);
    const field = (label: string) => loader.getHarness(MatFormFieldHarness.with({ floatingLabelText: label }));
    const type = async (password: string, repeat = password) => {
      await (await loader.getHarness(MatInputHarness.with({ selector: '[formControlName=password]' }))).setValue(password);
      await (await loader.getHarness(MatInputHarness.with({ selector: '[formControlName=repeat]' }))).setValue(repeat);
    };
    /** Click and answer each request it sends, in order, while the click waits. */
    const submitAndAnswer = async (...answers: [string, (req: TestRequest) => void][]) => {
      const clicking = (await loader.getHarness(MatButtonHarness.with({ text: 'Set password and sign in' }))).click();
      for (const [url, answer] of answers) {
        let found: TestRequest[] = [];
        for (let i = 0; i < 80 && !found.length; i++) {
          await new Promise((r) => setTimeout(r, 25));
          found = http.match(url);
        }
        expect(found.length).withContext(`a request to ${url}`).toBe(1);
        answer(found[0]!);
      }
      await clicking;
      await new Promise((r) => setTimeout(r, 50));
      await fixture.whenStable();
    };
    return { fixture, loader, http, field, type, submitAndAnswer };
  }
  afterEach(() => TestBed.inject(HttpTestingController).verify());

  it('when the page is opened without a link token, then it says to use the invitation link and shows no form', async () => {
    const { fixture, loader } = await setUp(null);
    expect((fixture.nativeElement as HTMLElement).textContent).toContain('This page needs the link from your invitation e-mail');
    expect(await loader.getAllHarnesses(MatInputHarness)).toEqual([]);
  });

  it('when the password is short or the two differ, then it says so and sends nothing', async () => {
    const { http, field, type, loader } = await setUp();
    await type('short one', 'short one');
    await (await loader.getHarness(MatButtonHarness.with({ text: 'Set password and sign in' }))).click();
    expect(await (await field('New password')).getTextErrors()).toEqual(['Use at least 12 characters.']);
    await type(PASSWORD, PASSWORD + ' x');
    await (await loader.getHarness(MatButtonHarness.with({ text: 'Set password and sign in' }))).click();
    expect(await (await field('The same password again')).getTextErrors()).toEqual(['The two passwords are not the same.']);
    http.expectNone('/api/auth/set-password');
  });

  it('when the link has been used or has run out, then the server’s words show on the page', async () => {
    const { fixture, type, submitAndAnswer } = await setUp();
    await type(PASSWORD);
    await submitAndAnswer([
      '/api/auth/set-password',
      (req) =>
        req.flush(
          {
            type: '/problems/invitation-not-valid',
            title: 'This link does not work',
            status: 422,
            detail: 'This link has been used already, has run out, or is not a Setwright link. Ask a workshop admin to send you a new invitation.',
            errors: [{ pointer: '#/token', detail: 'This link has been used already, has run out, or is not a Setwright link.' }],
          },
          { status: 422, statusText: 'Unprocessable Content', headers: { 'content-type': 'application/problem+json' } },
        ),
    ]);
    expect((fixture.nativeElement as HTMLElement).querySelector('[role=alert]')!.textContent).toContain('used already, has run out');
    expect(TestBed.inject(Session).signedIn()).toBeFalse();
  });

  it('when the server refuses the password itself, then its words sit on the password field', async () => {
    const { field, type, submitAndAnswer } = await setUp();
    await type(PASSWORD);
    await submitAndAnswer([
      '/api/auth/set-password',
      (req) =>
        req.flush(
          { type: '/problems/validation', title: 'Your request has mistakes in it', status: 400, detail: 'Some fields need correcting.', errors: [{ pointer: '#/password', detail: 'Use at least 12 characters that are not spaces.' }] },
          { status: 400, statusText: 'Bad Request', headers: { 'content-type': 'application/problem+json' } },
        ),
    ]);
    expect(await (await field('New password')).getTextErrors()).toEqual(['Use at least 12 characters that are not spaces.']);
  });

  it('when the password is set, then the person is signed in with it and lands on Today', async () => {
    const { type, submitAndAnswer } = await setUp();
    await type(PASSWORD);
    await submitAndAnswer(
      [
        '/api/auth/set-password',
        (req) => {
          expect(req.request.body).toEqual({ token: TOKEN, password: PASSWORD });
          req.flush({ email: 'sam.oduya@brackenford-works.example', displayName: 'Sam Oduya' });
        },
      ],
      [
        '/api/auth/login',
        (req) => {
          expect(req.request.body).toEqual({ email: 'sam.oduya@brackenford-works.example', password: PASSWORD });
          req.flush({ accessToken: 't', expiresIn: 900, user: { id: 'sam', email: 'sam.oduya@brackenford-works.example', displayName: 'Sam Oduya', roles: ['trainee'] } });
        },
      ],
    );
    expect(TestBed.inject(Session).user()?.displayName).toBe('Sam Oduya');
    expect(TestBed.inject(Router).url).toBe('/today');
  });
});
