import { provideHttpClient, withInterceptors } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting } from '@angular/common/http/testing';
import { Component, provideZonelessChangeDetection } from '@angular/core';
import { TestBed } from '@angular/core/testing';
import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';
import { MatButtonHarness } from '@angular/material/button/testing';
import { MatFormFieldHarness } from '@angular/material/form-field/testing';
import { MatInputHarness } from '@angular/material/input/testing';
import { provideRouter, Router } from '@angular/router';
import type { SessionResponse } from '@setwright/contracts/auth';
import { problemInterceptor, tokenInterceptor } from '../../core/interceptors';
import { Session } from '../../core/session';
import { SignIn } from './sign-in';

@Component({ template: 'today' })
class TodayStandIn {}

describe('SignIn', () => {
  async function setUp() {
    TestBed.configureTestingModule({
      imports: [SignIn],
      providers: [
        provideZonelessChangeDetection(),
        provideRouter([{ path: 'today', component: TodayStandIn }, { path: 'machines', component: TodayStandIn }]),
        provideHttpClient(withInterceptors([problemInterceptor, tokenInterceptor])),
        provideHttpClientTesting(),
      ],
    });
    const fixture = TestBed.createComponent(SignIn);
    const loader = TestbedHarnessEnvironment.loader(fixture);
    const http = TestBed.inject(HttpTestingController);
    const email = await loader.getHarness(MatInputHarness.with({ selector: '[formControlName=email]' }));
    const password = await loader.getHarness(MatInputHarness.with({ selector: '[formControlName=password]' }));
    const submit = await loader.getHarness(MatButtonHarness.with({ text: 'Sign in' }));
    const field = (label: string) => loader.getHarness(MatFormFieldHarness.with({ floatingLabelText: label }));
    /**
     * Click Sign in and answer the request it sends. The click's own wait for stability holds
     * until the request is answered (HttpClient counts as pending work), so answer it meanwhile.
     */
    const submitAndAnswer = async (answer: (req: ReturnType<HttpTestingController['expectOne']>) => void) => {
      const clicking = submit.click();
      await new Promise((resolve) => setTimeout(resolve));
      answer(http.expectOne('/api/auth/login'));
      await clicking;
      // The response resolves a promise chain (session, then navigation); give it a few turns.
      await new Promise((resolve) => setTimeout(resolve, 50));
      await fixture.whenStable();
    };
    return { fixture, http, email, password, submit, field, submitAndAnswer };
  }

  afterEach(() => TestBed.inject(HttpTestingController).verify());

  it('when the fields are empty, then it says what is missing and sends nothing', async () => {
    const { http, submit, field } = await setUp();
    await submit.click();
    expect(await (await field('Email')).getTextErrors()).toEqual(['Enter your email address.']);
    expect(await (await field('Password')).getTextErrors()).toEqual(['Enter your password.']);
    http.expectNone('/api/auth/login');
  });

  it('when the email is not an address, then it says so on the email field', async () => {
    const { http, email, password, submit, field } = await setUp();
    await email.setValue('ellis');
    await password.setValue('something');
    await submit.click();
    expect(await (await field('Email')).getTextErrors()).toEqual(['Enter a valid email address.']);
    http.expectNone('/api/auth/login');
  });

  it('when the server refuses the password, then its message shows on the password field', async () => {
    const { email, password, field, submitAndAnswer } = await setUp();
    await email.setValue('ellis@tests.example');
    await password.setValue('wrong');
    await submitAndAnswer((req) => {
      expect(req.request.body).toEqual({ email: 'ellis@tests.example', password: 'wrong' });
      req.flush(
      {
        type: '/problems/sign-in-failed',
        title: 'Sign-in failed',
        status: 401,
        detail: 'That email and password do not match an active account.',
        errors: [{ pointer: '#/password', detail: 'That email and password do not match an active account.' }],
      },
      { status: 401, statusText: 'Unauthorized', headers: { 'content-type': 'application/problem+json' } },
      );
    });
    expect(await (await field('Password')).getTextErrors()).toEqual(['That email and password do not match an active account.']);
    expect(TestBed.inject(Session).signedIn()).toBeFalse();
  });

  it('when sign-in succeeds, then the session holds the person and the page moves to the requested place', async () => {
    const { email, password, fixture, submitAndAnswer } = await setUp();
    fixture.componentRef.setInput('next', '/machines');
    await email.setValue('ellis@tests.example');
    await password.setValue('right');
    const body: SessionResponse = {
      accessToken: 'token',
      expiresIn: 900,
      user: { id: 'u1', email: 'ellis@tests.example', displayName: 'Ellis', roles: ['trainee'] },
    };
    await submitAndAnswer((req) => req.flush(body));
    const session = TestBed.inject(Session);
    expect(session.user()?.displayName).toBe('Ellis');
    expect(session.roles()).toEqual(['trainee']);
    expect(TestBed.inject(Router).url).toBe('/machines');
  });

  it('when the next place is another site, then it goes to Today instead', async () => {
    const { email, password, fixture, submitAndAnswer } = await setUp();
    fixture.componentRef.setInput('next', '//elsewhere.example/');
    await email.setValue('ellis@tests.example');
    await password.setValue('right');
    await submitAndAnswer((req) =>
      req.flush({
        accessToken: 't',
        expiresIn: 900,
        user: { id: 'u1', email: 'ellis@tests.example', displayName: 'Ellis', roles: ['trainee'] },
      }),
    );
    expect(TestBed.inject(Router).url).toBe('/today');
  });
});
