import { provideHttpClient, withInterceptors } from '@angular/common/http';
import { HttpTestingController, provideHttpClientTesting, type TestRequest } from '@angular/common/http/testing';
import { provideZonelessChangeDetection } from '@angular/core';
import { TestBed } from '@angular/core/testing';
import { TestbedHarnessEnvironment } from '@angular/cdk/testing/testbed';
import { MatButtonHarness } from '@angular/material/button/testing';
import { MatChipListboxHarness, MatChipSetHarness } from '@angular/material/chips/testing';
import { MatDialogHarness } from '@angular/material/dialog/testing';
import { MatFormFieldHarness } from '@angular/material/form-field/testing';
import { MatInputHarness } from '@angular/material/input/testing';
import { MatSnackBarHarness } from '@angular/material/snack-bar/testing';
import { provideRouter } from '@angular/router';
import type { PersonSummary } from '@setwright/contracts/people';
import { problemInterceptor, tokenInterceptor } from '../../core/interceptors';
import { Session } from '../../core/session';
import { PeopleList } from './people-list';

const person = (over: Partial<PersonSummary>): PersonSummary => ({
  id: 'p',
  email: 'p@brackenford-works.example',
  displayName: 'P',
  roles: ['trainee'],
  active: true,
  state: 'active',
  invitationExpiresAt: null,
  createdAt: '2026-04-01T08:00:00.000Z',
  ...over,
});

const rowan = person({ id: 'admin', email: 'rowan@brackenford-works.example', displayName: 'Rowan Tilsley', roles: ['competent_person', 'workshop_admin'] });
const ellis = person({ id: 'ellis', email: 'ellis@brackenford-works.example', displayName: 'Ellis Marwood' });
const nia = person({
  id: 'nia',
  email: 'nia@brackenford-works.example',
  displayName: 'Nia Castellan',
  active: false,
  state: 'invited',
  invitationExpiresAt: new Date(Date.now() + 48 * 3600_000).toISOString(),
});
const harriet = person({ id: 'harriet', email: 'harriet@brackenford-works.example', displayName: 'Harriet Quill', roles: ['auditor'], active: false, state: 'deactivated' });

describe('PeopleList', () => {
  async function setUp() {
    TestBed.configureTestingModule({
      imports: [PeopleList],
      providers: [provideZonelessChangeDetection(), provideRouter([]), provideHttpClient(withInterceptors([problemInterceptor, tokenInterceptor])), provideHttpClientTesting()],
    });
    const http = TestBed.inject(HttpTestingController);
    const signingIn = TestBed.inject(Session).signIn({ email: rowan.email, password: 'p' });
    http.expectOne('/api/auth/login').flush({ accessToken: 't', expiresIn: 900, user: { id: rowan.id, email: rowan.email, displayName: rowan.displayName, roles: rowan.roles } });
    await signingIn;
    const fixture = TestBed.createComponent(PeopleList);
    fixture.detectChanges();
    http.expectOne('/api/people').flush([ellis, harriet, nia, rowan]);
    await fixture.whenStable();
    const loader = TestbedHarnessEnvironment.loader(fixture);
    const root = TestbedHarnessEnvironment.documentRootLoader(fixture);
    const text = () => (fixture.nativeElement as HTMLElement).textContent!.replace(/\s+/g, ' ');
    /** Click, and answer the request the click sends while the click waits for the page to settle. */
    const clickAndAnswer = async (button: MatButtonHarness, url: string, answer: (req: TestRequest) => void) => {
      const clicking = button.click();
      let found: TestRequest[] = [];
      for (let i = 0; i < 80 && !found.length; i++) {
        await new Promise((r) => setTimeout(r, 25));
        found = http.match(url);
      }
      expect(found.length).withContext(`a request to ${url}`).toBe(1);
      answer(found[0]!);
      await clicking;
      await new Promise((r) => setTimeout(r, 50));
      await fixture.whenStable();
    };
    /** Wait for any dialog to finish closing (its animation) and the page to take in what it closed with. */
    const dialogsClosed = async () => {
      for (let i = 0; i < 80 && (await root.getAllHarnesses(MatDialogHarness)).length; i++) await new Promise((r) => setTimeout(r, 25));
      await fixture.whenStable();
    };
    return { fixture, http, loader, root, text, clickAndAnswer, dialogsClosed };
  }
  afterEach(() => TestBed.inject(HttpTestingController).verify());

  it('when the page opens, then each person shows with role chips and state, and nobody may deactivate themselves', async () => {
    const { loader, text } = await setUp();
    const sets = await loader.getAllHarnesses(MatChipSetHarness);
    const chips = await Promise.all(sets.map(async (s) => Promise.all((await s.getChips()).map((c) => c.getText()))));
    expect(chips).toEqual([['Trainee'], ['Auditor'], ['Trainee'], ['Competent person', 'Workshop admin']]);
    expect(text()).toContain('Nia Castellan');
    expect(text()).toMatch(/Invited\s*Link works until/);
    expect(text()).toContain('Deactivated');
    expect(await loader.getAllHarnesses(MatButtonHarness.with({ selector: '[aria-label="Deactivate Rowan Tilsley"]' }))).toEqual([]);
    expect(await loader.getAllHarnesses(MatButtonHarness.with({ selector: '[aria-label="Deactivate Ellis Marwood"]' })).then((b) => b.length)).toBe(1);
    expect(await loader.getAllHarnesses(MatButtonHarness.with({ selector: '[aria-label="Reactivate Harriet Quill"]' })).then((b) => b.length)).toBe(1);
    expect(await loader.getAllHarnesses(MatButtonHarness.with({ selector: '[aria-label="Send a new link to Nia Castellan"]' })).then((b) => b.length)).toBe(1);
  });

  it('when an admin deactivates someone and confirms, then the server is asked and the row shows Deactivated', async () => {
    const { loader, root, text, clickAndAnswer, dialogsClosed } = await setUp();
    await (await loader.getHarness(MatButtonHarness.with({ selector: '[aria-label="Deactivate Ellis Marwood"]' }))).click();
    const dialog = await root.getHarness(MatDialogHarness);
    expect(await dialog.getTitleText()).toBe('Deactivate Ellis Marwood?');
    expect(await dialog.getContentText()).toContain('signed out everywhere at once');
    await clickAndAnswer(await dialog.getHarness(MatButtonHarness.with({ text: 'Deactivate' })), '/api/people/ellis/deactivate', (req) => {
      expect(req.request.method).toBe('POST');
      req.flush({ ...ellis, active: false, state: 'deactivated' });
    });
    await dialogsClosed();
    expect(await loader.getAllHarnesses(MatButtonHarness.with({ selector: '[aria-label="Reactivate Ellis Marwood"]' })).then((b) => b.length)).toBe(1);
    expect(text()).toMatch(/Ellis Marwood.*Deactivated/);
  });

  it('when an admin sends an invited person a new link, then the server is asked and the page says earlier links stop working', async () => {
    const { loader, root, text, clickAndAnswer } = await setUp();
    const later = new Date(Date.now() + 72 * 3600_000).toISOString();
    await clickAndAnswer(await loader.getHarness(MatButtonHarness.with({ selector: '[aria-label="Send a new link to Nia Castellan"]' })), '/api/people/nia/invitation', (req) => {
      expect(req.request.method).toBe('POST');
      req.flush({ ...nia, invitationExpiresAt: later }, { status: 201, statusText: 'Created' });
    });
    const snack = await root.getHarness(MatSnackBarHarness);
    expect(await snack.getMessage()).toBe('A new link is on its way to nia@brackenford-works.example. Earlier links no longer work.');
    expect(text()).toMatch(/Nia Castellan.*Invited\s*Link works until/);
  });

  it('when the confirmation is cancelled, then nothing is sent', async () => {
    const { loader, root, http, dialogsClosed } = await setUp();
    await (await loader.getHarness(MatButtonHarness.with({ selector: '[aria-label="Reactivate Harriet Quill"]' }))).click();
    await (await (await root.getHarness(MatDialogHarness)).getHarness(MatButtonHarness.with({ text: 'Cancel' }))).click();
    await dialogsClosed();
    expect(await root.getAllHarnesses(MatDialogHarness)).toEqual([]);
    http.expectNone('/api/people/harriet/reactivate');
  });

  it('when an invitation is refused because the email is taken, then the server’s words sit on the email field; corrected, the person is added', async () => {
    const { loader, root, text, clickAndAnswer, dialogsClosed } = await setUp();
    await (await loader.getHarness(MatButtonHarness.with({ text: /Invite someone/ }))).click();
    await (await root.getHarness(MatInputHarness.with({ selector: '[formControlName=email]' }))).setValue('ellis@brackenford-works.example');
    await (await root.getHarness(MatInputHarness.with({ selector: '[formControlName=displayName]' }))).setValue('Sam Oduya');
    await (await root.getHarness(MatChipListboxHarness)).selectChips({ text: 'Trainee' });
    const send = await root.getHarness(MatButtonHarness.with({ text: 'Send invitation' }));
    await clickAndAnswer(send, '/api/people', (req) => {
      expect(req.request.body).toEqual({ email: 'ellis@brackenford-works.example', displayName: 'Sam Oduya', roles: ['trainee'] });
      req.flush(
        { type: '/problems/email-taken', title: 'Already in Setwright', status: 409, detail: 'Someone with this email address is already in Setwright.', errors: [{ pointer: '#/email', detail: 'Someone already has this email address.' }] },
        { status: 409, statusText: 'Conflict', headers: { 'content-type': 'application/problem+json' } },
      );
    });
    const email = await root.getHarness(MatFormFieldHarness.with({ floatingLabelText: 'Email' }));
    expect(await email.getTextErrors()).toEqual(['Someone already has this email address.']);

    await (await root.getHarness(MatInputHarness.with({ selector: '[formControlName=email]' }))).setValue('sam.oduya@brackenford-works.example');
    const sam = person({ id: 'sam', email: 'sam.oduya@brackenford-works.example', displayName: 'Sam Oduya', active: false, state: 'invited', invitationExpiresAt: new Date(Date.now() + 72 * 3600_000).toISOString() });
    await clickAndAnswer(send, '/api/people', (req) => req.flush(sam, { status: 201, statusText: 'Created' }));
    await dialogsClosed();
    expect(await root.getAllHarnesses(MatDialogHarness)).toEqual([]);
    expect(text()).toContain('Sam Oduya');
  });

  it('when the invite form is sent empty, then it says what is missing and sends nothing', async () => {
    const { loader, root, http } = await setUp();
    await (await loader.getHarness(MatButtonHarness.with({ text: /Invite someone/ }))).click();
    await (await root.getHarness(MatButtonHarness.with({ text: 'Send invitation' }))).click();
    expect(await (await root.getHarness(MatFormFieldHarness.with({ floatingLabelText: 'Email' }))).getTextErrors()).toEqual(['Enter their email address.']);
    expect(await (await root.getHarness(MatFormFieldHarness.with({ floatingLabelText: 'Name as it prints on records' }))).getTextErrors()).toEqual([
      'Enter their name as it should print on records.',
    ]);
    const dialog = await root.getHarness(MatDialogHarness);
    expect(await dialog.getContentText()).toContain('Give at least one role.');
    http.expectNone('/api/people');
  });

  it('when an admin edits their own roles, then Workshop admin cannot be unticked and the rest are saved', async () => {
    const { loader, root, clickAndAnswer, dialogsClosed } = await setUp();
    await (await loader.getHarness(MatButtonHarness.with({ selector: '[aria-label="Change the roles of Rowan Tilsley"]' }))).click();
    const listbox = await root.getHarness(MatChipListboxHarness);
    const [admin] = await listbox.getChips({ text: 'Workshop admin' });
    expect(await admin!.isDisabled()).toBeTrue();
    expect(await admin!.isSelected()).toBeTrue();
    await listbox.selectChips({ text: 'Auditor' });
    await clickAndAnswer(await root.getHarness(MatButtonHarness.with({ text: 'Save roles' })), '/api/people/admin/roles', (req) => {
      expect(req.request.method).toBe('PUT');
      expect([...req.request.body.roles].sort()).toEqual(['auditor', 'competent_person', 'workshop_admin']);
      req.flush({ ...rowan, roles: ['auditor', 'competent_person', 'workshop_admin'] });
    });
    await dialogsClosed();
    const sets = await loader.getAllHarnesses(MatChipSetHarness);
    const last = await Promise.all((await sets[3]!.getChips()).map((c) => c.getText()));
    expect(last).toEqual(['Auditor', 'Competent person', 'Workshop admin']);
  });

  it('when the server refuses a role change, then its words show under the roles', async () => {
    const { loader, root, clickAndAnswer } = await setUp();
    await (await loader.getHarness(MatButtonHarness.with({ selector: '[aria-label="Change the roles of Ellis Marwood"]' }))).click();
    await (await root.getHarness(MatChipListboxHarness)).selectChips({ text: 'Competent person' });
    await clickAndAnswer(await root.getHarness(MatButtonHarness.with({ text: 'Save roles' })), '/api/people/ellis/roles', (req) =>
      req.flush(
        { type: '/problems/validation', title: 'Your request has mistakes in it', status: 400, detail: 'Some fields need correcting.', errors: [{ pointer: '#/roles', detail: 'Give each role once.' }] },
        { status: 400, statusText: 'Bad Request', headers: { 'content-type': 'application/problem+json' } },
      ),
    );
    expect(await (await root.getHarness(MatDialogHarness)).getContentText()).toContain('Give each role once.');
  });
});
