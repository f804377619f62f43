import { provideHttpClient, withInterceptors } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting, type TestRequest } from '@angular/common/http/testing';
import { provideZonelessChangeDetection } from '@angular/core';
import { TestBed } from '@angular/core/testing';
import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';
import { MatButtonHarness } from '@angular/material/button/testing';
import { MatFormFieldHarness } from '@angular/material/form-field/testing';
import { MatInputHarness } from '@angular/material/input/testing';
import { provideRouter } from '@angular/router';
import { problemInterceptor, tokenInterceptor } from '../../core/interceptors';
import { Session } from '../../core/session';
import { MachineEdit } from './machine-edit';
import { nextRequest, testMachine } from './machine-test-data';

describe('MachineEdit', () => {
  async function open() {
    TestBed.configureTestingModule({
      imports: [MachineEdit],
      providers: [provideZonelessChangeDetection(), provideRouter([]), provideHttpClient(withInterceptors([problemInterceptor, tokenInterceptor])), provideHttpClientTesting()],
    });
    const http = TestBed.inject(HttpTestingController);
    const signingIn = TestBed.inject(Session).signIn({ email: 'a@tests.example', password: 'p' });
    http.expectOne('/api/auth/login').flush({ accessToken: 't', expiresIn: 900, user: { id: 'u1', email: 'a@tests.example', displayName: 'Rowan', roles: ['workshop_admin'] } });
    await signingIn;
    const fixture = TestBed.createComponent(MachineEdit);
    fixture.componentRef.setInput('id', 'm1');
    fixture.detectChanges();
    http.expectOne('/api/machines/m1').flush(testMachine());
    (await nextRequest(http, (r) => r.url === '/api/procedures')).flush([]);
    await fixture.whenStable();
    const loader = TestbedHarnessEnvironment.loader(fixture);
    const field = (label: string) => loader.getHarness(MatFormFieldHarness.with({ floatingLabelText: label }));
    const input = async (label: string) => (await (await field(label)).getControl(MatInputHarness))!;
    return { fixture, http, loader, field, input };
  }
  afterEach(() => TestBed.inject(HttpTestingController).verify());

  it('when the machine loads, then its figures fill the grouped fields', async () => {
    const { input, loader } = await open();
    const drivers = await loader.getAllHarnesses(MatInputHarness.with({ selector: '[formControlName=driverMm]' }));
    expect(await Promise.all(drivers.map((d) => d.getValue()))).toEqual(['60', '80']);
    expect(await (await input('Name')).getValue()).toBe('Bay 2 bandsaw');
    expect(await (await input('Most tension')).getValue()).toBe('900');
    expect(await (await input('Least clearance')).getValue()).toBe('0.08');
    expect(await (await input('Gearbox ratio')).getValue()).toBe('30');
  });

  it('when the most tension is set below the least, then the shared schema points at that field and nothing is sent', async () => {
    const { field, input, loader, http } = await open();
    await (await input('Most tension')).setValue('650');
    await (await loader.getHarness(MatButtonHarness.with({ text: 'Save changes' }))).click();
    expect(await (await field('Most tension')).getTextErrors()).toEqual(['The most tension cannot be less than the least.']);
    expect(await (await field('Least tension')).getTextErrors()).toEqual([]);
    http.expectNone('/api/machines/m1');
  });

  it('when the server refuses a figure, then its message shows under that field, and other problems show above the button', async () => {
    const { field, input, loader, http, fixture } = await open();
    await (await input('Blade length')).setValue('2750');
    const clicking = (await loader.getHarness(MatButtonHarness.with({ text: 'Save changes' }))).click();
    let found: TestRequest[] = [];
    for (let i = 0; i < 40 && !found.length; i++) {
      await new Promise((r) => setTimeout(r, 25));
      found = http.match((r) => r.method === 'PUT' && r.url === '/api/machines/m1');
    }
    const sent = found[0]!.request.body as { spec: { bladeLengthMm: number; speedSteps: unknown[] }; kind: string };
    expect(sent.spec.bladeLengthMm).toBe(2750);
    expect(sent.kind).toBe('horizontal_bandsaw');
    expect(sent.spec.speedSteps.length).toBe(2);
    found[0]!.flush(
      {
        type: '/problems/validation',
        title: 'Your request has mistakes in it',
        status: 400,
        detail: 'Some fields need correcting.',
        errors: [
          { pointer: '#/spec/bladeLengthMm', detail: 'Enter the blade length in mm, a number more than 0.' },
          { pointer: '#/spec', detail: 'A horizontal bandsaw’s specification has no "bladeColour". Remove it.' },
        ],
      },
      { status: 400, statusText: 'Bad Request', headers: { 'content-type': 'application/problem+json' } },
    );
    await clicking;
    await fixture.whenStable();
    expect(await (await field('Blade length')).getTextErrors()).toEqual(['Enter the blade length in mm, a number more than 0.']);
    expect((fixture.nativeElement as HTMLElement).querySelector('.problems')!.textContent).toContain('has no "bladeColour"');
  });
});
