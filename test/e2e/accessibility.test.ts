import assert from 'node:assert/strict';
import { randomUUID } from 'node:crypto';
import { before, describe, test } from 'node:test';
import type { Browser, BrowserContext, Locator, Page } from 'playwright-core';
import request from 'supertest';
import type { Person } from '../../api/modules/people/repository';
import { DEMO_MACHINES } from '../../api/db/seed';
import { Machine } from '../../api/modules/machines/model';
import { SetupRecord } from '../../api/modules/records/model';
import { db, makePerson, PASSWORD, testApp } from '../support/api';
import { axe, launchBrowser, screenshot, signInThroughPage, startServer } from '../support/browser';
import { approve, fixture } from '../support/procedures';
import { freshMachine, photoBytes, RecordMaker } from '../support/records';

const TABLET = { width: 1024, height: 768 };
/** WCAG 2.5.5 (AAA) and our STYLE: 48 px for every control, gloves included. */
const TOUCH = 48;

type Who = 'trainee' | 'competent' | 'auditor' | 'admin';

/** Controls a keyboard must reach: links, buttons, fields, toggles, radios (one stop per radio group). */
const INTERACTIVE =
  'a[href], button:not([disabled]), input:not([type=hidden]):not([disabled]), textarea:not([disabled]), select:not([disabled]), [role=combobox]:not([aria-disabled=true]), [role=switch], [role=checkbox]:not(mat-checkbox), [tabindex]:not([tabindex="-1"])';

/**
 * Tabs through the page from where focus is, and says which interactive controls inside `scope`
 * focus never reached, and whether focus went on past the scope (no trap) or stayed in it.
 */
async function tabThrough(page: Page, scope: string, opts: { expectTrapped?: boolean } = {}) {
  const total = await page.evaluate(
    ({ scope, sel }) => {
      for (const old of Array.from(document.querySelectorAll<HTMLElement>('[data-kb]'))) delete old.dataset['kb']; // from an earlier walk
      const root = document.querySelector(scope)!;
      const seen = new Set<string>();
      let n = 0;
      for (const el of Array.from(root.querySelectorAll<HTMLElement>(sel))) {
        if (!el.getClientRects().length || el.closest('[aria-hidden=true], [inert]')) continue;
        if (el instanceof HTMLInputElement && el.type === 'file' && getComputedStyle(el).display === 'none') continue;
        // A radio group (native radios or a single-choice toggle group) is one Tab stop; arrows move inside it.
        const group = el.matches('input[type=radio]') ? `radio:${(el as HTMLInputElement).name}` : el.closest('mat-button-toggle-group:not([multiple])') ? `toggles:${[...root.querySelectorAll('mat-button-toggle-group')].indexOf(el.closest('mat-button-toggle-group')!)}` : null;
        const key = group ?? `c${n++}`;
        el.dataset['kb'] = key;
        if (!group) continue;
        seen.add(group);
      }
      return root.querySelectorAll('[data-kb]').length;
    },
    { scope, sel: INTERACTIVE },
  );
  assert.ok(total > 0, `there are controls in ${scope}`);
  const wanted = await page.evaluate(() => [...new Set([...document.querySelectorAll<HTMLElement>('[data-kb]')].map((e) => e.dataset['kb']!))]);
  const reached = new Set<string>();
  let left = false;
  for (let i = 0; i < wanted.length * 3 + 30; i++) {
    await page.keyboard.press('Tab');
    const where = await page.evaluate((scope) => {
      const a = document.activeElement as HTMLElement | null;
      const inScope = !!a && !!a.closest(scope);
      return { kb: a?.closest<HTMLElement>('[data-kb]')?.dataset['kb'] ?? null, inScope };
    }, scope);
    if (where.kb) reached.add(where.kb);
    if (!where.inScope && reached.size > 0) left = true;
    if (reached.size === wanted.length && (left || opts.expectTrapped)) break;
  }
  const missing = await page.evaluate(
    (keys) =>
      keys.map((k) => {
        const el = document.querySelector<HTMLElement>(`[data-kb="${k}"]`)!;
        return `${el.tagName.toLowerCase()} “${(el.getAttribute('aria-label') ?? el.textContent ?? '').trim().slice(0, 60)}”`;
      }),
    wanted.filter((k) => !reached.has(k)),
  );
  return { missing, left, count: wanted.length };
}

/** Presses Tab until the focused element's accessible text matches, as a keyboard user would. */
async function tabTo(page: Page, name: RegExp, max = 60): Promise<void> {
  for (let i = 0; i < max; i++) {
    await page.keyboard.press('Tab');
    const text = await page.evaluate(() => {
      const a = document.activeElement as HTMLElement | null;
      if (!a) return '';
      const labels = a instanceof HTMLInputElement || a instanceof HTMLTextAreaElement ? [...(a.labels ?? [])].map((l) => l.textContent).join(' ') : '';
      const labelled = (a.getAttribute('aria-labelledby') ?? '').split(' ').map((id) => document.getElementById(id)?.textContent ?? '').join(' ');
      return `${a.getAttribute('aria-label') ?? ''} ${labels} ${labelled} ${a.textContent ?? ''}`.replace(/\s+/g, ' ');
    });
    if (name.test(text)) return;
  }
  assert.fail(`Tab never reached a control named ${name}`);
}

/** Bounding boxes of the controls a finger aims at, with Material's own touch-target layer counted. */
async function smallTargets(page: Page, scope = 'body') {
  return page.evaluate(
    ({ scope, min }) => {
      const root = document.querySelector(scope)!;
      const sel = [
        'button',
        'a[href]',
        'mat-radio-button',
        'mat-checkbox',
        'mat-slide-toggle',
        'mat-button-toggle',
        '.mat-mdc-text-field-wrapper',
        '.mat-mdc-select-trigger',
        'input:not(.mat-mdc-input-element):not([type=hidden]):not([type=radio]):not([type=checkbox]):not([type=file])',
        'textarea:not(.mat-mdc-input-element)',
        'select',
        '[role=tab]',
      ].join(', ');
      const small: { what: string; width: number; height: number; prose: boolean }[] = [];
      for (const el of Array.from(root.querySelectorAll<HTMLElement>(sel))) {
        if (!el.getClientRects().length || el.closest('[aria-hidden=true], .sw-visually-hidden, .cdk-visually-hidden')) continue;
        // A button inside a toggle is measured as the toggle; a select trigger as its form field.
        if (el.matches('mat-button-toggle button, .mat-mdc-text-field-wrapper .mat-mdc-select-trigger')) continue;
        const boxes = [el.getBoundingClientRect()];
        for (const t of Array.from(el.querySelectorAll<HTMLElement>('.mat-mdc-button-touch-target, .mat-mdc-checkbox-touch-target, .mat-mdc-radio-touch-target, .mat-mdc-focus-indicator + .mat-mdc-button-touch-target'))) boxes.push(t.getBoundingClientRect());
        const width = Math.max(...boxes.map((b) => b.width));
        const height = Math.max(...boxes.map((b) => b.height));
        if (width >= min - 0.5 && height >= min - 0.5) continue;
        if (width <= 1 || height <= 1) continue; // a skip link or file input waiting off screen
        // An inline link in running text (a paragraph or description, not a list, card action or nav) is exempt (WCAG 2.5.8 "inline").
        const prose = el.matches('a') && !el.matches('.mat-mdc-button-base') && !!el.closest('p, dd, .hint') && !el.closest('li, nav, td, mat-card-actions');
        const name = (el.getAttribute('aria-label') ?? el.textContent ?? '').trim().replace(/\s+/g, ' ').slice(0, 50);
        small.push({ what: `${el.tagName.toLowerCase()}${el.className ? '.' + String(el.className).split(' ')[0] : ''} “${name}”`, width: Math.round(width), height: Math.round(height), prose });
      }
      return small;
    },
    { scope, min: TOUCH },
  );
}

async function expectTargets(page: Page, where: string, scope = 'body') {
  // A dialog grows in as it opens: measure once its box has stopped changing.
  let last = '';
  for (let i = 0; i < 40; i++) {
    const box = JSON.stringify(await page.evaluate((scope) => document.querySelector(scope)?.getBoundingClientRect(), scope));
    if (box === last) break;
    last = box;
    await page.waitForTimeout(100);
  }
  // Measure again for a moment if something looks small: the last frames of an opening animation
  // can still be scaling; a control that is really too small stays too small.
  let small = await smallTargets(page, scope);
  for (let i = 0; i < 10 && small.some((x) => !x.prose); i++) {
    await page.waitForTimeout(200);
    small = await smallTargets(page, scope);
  }
  for (const s of small.filter((x) => x.prose)) console.log(`  [info] ${where}: inline text link ${s.what} is ${s.width}×${s.height} px (exempt)`);
  const failing = small.filter((x) => !x.prose);
  assert.deepEqual(
    failing.map((s) => `${s.what} ${s.width}×${s.height}`),
    [],
    `controls on ${where} smaller than ${TOUCH}×${TOUCH} px`,
  );
}

describe('accessibility: axe-core on every main page, keyboard and touch targets on the key pages', () => {
  let base: string;
  let browser: Browser;
  const people = {} as Record<Who, Person>;
  const contexts = new Map<Who | 'nobody', BrowserContext>();
  let key: string;
  let machineId: string;
  let demoMachineId: string;
  let signedId: string;
  let readyId: string;
  let witnessRecordId: string;
  let signRecordId: string;

  before(async () => {
    db();
    base = await startServer();
    browser = await launchBrowser();
    const api = testApp();
    key = `e2e-a11y-${randomUUID().slice(0, 6)}`;
    await approve(fixture(key, 1, `Tension spot check ${key.slice(-6)}`));
    people.trainee = await makePerson(['trainee'], 'Orla Penhale');
    people.competent = await makePerson(['competent_person'], 'Silas Dunmore');
    people.auditor = await makePerson(['auditor'], 'Greta Vannor');
    people.admin = await makePerson(['workshop_admin'], 'Keir Ashdown');
    const maker = new RecordMaker(api, key);
    const o = { performer: people.trainee, witness: people.competent };
    signedId = await maker.signed({ ...o, approver: people.competent });
    readyId = await maker.ready(o);
    machineId = (await SetupRecord.findByPk(signedId))!.machineId;
    demoMachineId = (await Machine.findOne({ where: { assetTag: DEMO_MACHINES[1]!.assetTag } }))!.id;

    // Two records left underway: one at its powered step (the witness dialog), one with every step done (the sign dialog).
    const as = await maker.auth(people.trainee);
    const underway = async (steps: number) => {
      const machine = await freshMachine('Keyboard saw');
      const id = (await request(api).post('/api/records').set(as).send({ machineId: machine.id, procedureKey: key }).expect(201)).body.id as string;
      const post = (stepId: string, values: object, extra: object = {}) =>
        request(api).post(`/api/records/${id}/entries`).set(as).send({ idempotencyKey: randomUUID(), stepId, values, ...extra }).expect(201);
      await post('isolate', { lock: 'Lock 3' });
      await post('tension', { reading: 800 });
      if (steps > 2) {
        await post('track', { clear: true }, { witness: { email: people.competent.email, password: PASSWORD } });
        const shot = (await request(api).post('/api/photos').set(as).attach('photo', await photoBytes('#567'), 'gauge.jpg').expect(201)).body.id as string;
        await post('evidence', { shot: [shot] });
      }
      return id;
    };
    witnessRecordId = await underway(2);
    signRecordId = await underway(4);
    // A draft of the fixture procedure, written by the admin: its version page shows the editor.
    await request(api).post(`/api/procedures/${key}/drafts`).set(await maker.auth(people.admin)).send({}).expect(201);
  });

  async function pageAs(who: Who | 'nobody'): Promise<Page> {
    let context = contexts.get(who);
    if (!context) {
      context = await browser.newContext({ viewport: TABLET, bypassCSP: true });
      contexts.set(who, context);
      if (who !== 'nobody') await signInThroughPage(await context.newPage(), base, people[who].email, PASSWORD);
    }
    return context.pages()[0] ?? (await context.newPage());
  }

  /** Opens a page and waits until its content (not a loading bar) is there. */
  async function open(page: Page, path: string, ready?: (p: Page) => Locator) {
    await page.goto(`${base}${path}`);
    await (ready ? ready(page) : page.locator('h1').first()).waitFor();
    await page.waitForLoadState('networkidle');
    await page.locator('mat-progress-bar[mode=indeterminate]').first().waitFor({ state: 'detached', timeout: 10_000 }).catch(() => undefined);
  }

  async function expectNoSeriousAxe(page: Page, where: string) {
    const found = await axe(page);
    for (const f of found.filter((v) => v.impact !== 'serious' && v.impact !== 'critical')) console.log(`  [info] ${where}: ${f.impact} ${f.id} (${f.help}) at ${f.targets.slice(0, 3).join(', ')}`);
    const serious = found.filter((v) => v.impact === 'serious' || v.impact === 'critical');
    assert.deepEqual(
      serious.map((v) => `${v.impact} ${v.id}: ${v.help} — ${v.targets.slice(0, 4).join(' | ')}`),
      [],
      `serious or critical axe findings on ${where}`,
    );
  }

  const pages: { who: Who | 'nobody'; name: string; path: () => string; ready?: (p: Page) => Locator }[] = [
    { who: 'nobody', name: 'Sign in', path: () => '/sign-in' },
    { who: 'trainee', name: 'Today', path: () => '/today' },
    { who: 'trainee', name: 'Machines', path: () => '/machines' },
    { who: 'trainee', name: 'a machine page', path: () => `/machines/${machineId}` },
    // The demo's stores saw has six months of readings: its page draws every trend chart.
    { who: 'competent', name: 'a demo machine page with its reading trends', path: () => `/machines/${demoMachineId}`, ready: (p) => p.locator('sw-trend-chart').first() },
    { who: 'trainee', name: 'the runner', path: () => `/records/${witnessRecordId}`, ready: (p) => p.locator('sw-step-form').first() },
    { who: 'trainee', name: 'Workshop maths', path: () => '/workshop-maths' },
    { who: 'trainee', name: 'Blades', path: () => '/blades' },
    { who: 'competent', name: 'To sign', path: () => '/to-sign' },
    { who: 'competent', name: 'the review page', path: () => `/to-sign/${readyId}`, ready: (p) => p.getByRole('button', { name: 'Sign off' }) },
    { who: 'competent', name: 'Procedures', path: () => '/procedures' },
    { who: 'competent', name: 'a procedure version page', path: () => `/procedures/${key}/versions/1` },
    { who: 'admin', name: 'the draft editor', path: () => `/procedures/${key}/versions/2`, ready: (p) => p.getByRole('form', { name: 'Draft editor' }) },
    { who: 'admin', name: 'Register a machine', path: () => '/machines/new' },
    { who: 'admin', name: 'People', path: () => '/people' },
    { who: 'admin', name: 'Competencies', path: () => '/people/competencies' },
    { who: 'auditor', name: 'Records', path: () => '/records', ready: (p) => p.getByRole('table', { name: 'Set-up records' }) },
    { who: 'auditor', name: 'Record check', path: () => `/records/${signedId}/check`, ready: (p) => p.getByRole('status', { name: 'Verdict' }) },
  ];

  for (const p of pages) {
    test(`when axe-core checks ${p.name} (as ${p.who === 'nobody' ? 'someone signed out' : `a ${p.who}`}), then it finds nothing serious or critical`, async () => {
      const page = await pageAs(p.who);
      await open(page, p.path(), p.ready);
      await screenshot(page, `a11y-${p.name.replace(/\W+/g, '-').toLowerCase()}`);
      await expectNoSeriousAxe(page, p.name);
    });
  }

  test('when someone signs in with the keyboard alone, then Tab reaches every control, nothing traps focus, Enter signs in, and every target is 48 px', async () => {
    const context = await browser.newContext({ viewport: TABLET, bypassCSP: true });
    const page = await context.newPage();
    await open(page, '/sign-in');
    await expectTargets(page, 'Sign in');
    const walk = await tabThrough(page, 'main, body');
    assert.deepEqual(walk.missing, [], 'every control on the sign-in page takes focus');
    await page.goto(`${base}/sign-in`);
    await page.locator('h1').waitFor();
    await tabTo(page, /Email/);
    await page.keyboard.type(people.trainee.email);
    await tabTo(page, /Password/);
    await page.keyboard.type(PASSWORD);
    await tabTo(page, /^\s*Sign in\s*$/);
    await page.keyboard.press('Enter');
    await page.waitForURL(/\/today$/);
    await context.close();
  });

  test('when a trainee works the powered step and the witness dialog by keyboard, then every control is reached, Space answers, Escape leaves the dialog, Enter witnesses, and every target is 48 px', async () => {
    const context = await browser.newContext({ viewport: TABLET, bypassCSP: true });
    const page = await context.newPage();
    await signInThroughPage(page, base, people.trainee.email, PASSWORD);
    await open(page, `/records/${witnessRecordId}`, (p) => p.locator('mat-step-header', { hasText: 'Track under power' }));
    await page.locator('mat-step-header', { hasText: 'Track under power' }).click();
    await page.getByRole('button', { name: 'Call a witness and save' }).waitFor();
    const form = 'sw-step-form:has(mat-button-toggle-group)';
    await expectTargets(page, 'the runner step form', form);
    await page.locator('h1').click(); // start from the top of the record, as a keyboard user would after the page loads
    const walk = await tabThrough(page, form);
    assert.deepEqual(walk.missing, [], 'every control of the step form takes focus');
    assert.ok(walk.left, 'Tab moves on past the step form: no trap');

    await page.locator('h1').click();
    await tabTo(page, /Blade runs clear of the flange|Yes/);
    // In a single-choice toggle group, arrows move between answers and Space picks one.
    await page.keyboard.press('Space');
    const chosen = page.locator(`${form} mat-button-toggle-group[aria-label="Blade runs clear of the flange"] .mat-button-toggle-checked`);
    if ((await chosen.innerText()).trim() !== 'Yes') {
      await page.keyboard.press('ArrowLeft');
      await page.keyboard.press('Space');
    }
    assert.equal((await chosen.innerText()).trim(), 'Yes');
    await tabTo(page, /Call a witness and save/);
    await page.keyboard.press('Enter');
    const dialog = page.getByRole('dialog');
    await dialog.getByLabel('Witness email').waitFor();
    await expectTargets(page, 'the witness dialog', 'mat-dialog-container');
    await screenshot(page, 'a11y-witness-dialog');
    await expectNoSeriousAxe(page, 'the witness dialog');
    const inDialog = await tabThrough(page, 'mat-dialog-container', { expectTrapped: true });
    assert.deepEqual(inDialog.missing, [], 'every control of the witness dialog takes focus');
    await page.keyboard.press('Escape');
    await dialog.waitFor({ state: 'detached' });
    // Focus goes back to the button that opened the dialog, so Enter opens it again.
    assert.match(await page.evaluate(() => document.activeElement?.textContent ?? ''), /Call a witness and save/);
    await page.keyboard.press('Enter');
    await dialog.getByLabel('Witness email').waitFor();
    // Focus starts in the dialog; type the witness's own credentials.
    await page.locator('mat-dialog-container').focus();
    await tabTo(page, /Witness email/);
    await page.keyboard.type(people.competent.email);
    await tabTo(page, /Witness password/);
    await page.keyboard.type(PASSWORD);
    const saved = page.waitForResponse((r) => r.url().endsWith('/entries') && r.request().method() === 'POST');
    await tabTo(page, /Witness and save/);
    await page.keyboard.press('Enter');
    assert.equal((await saved).status(), 201);
    const record = await SetupRecord.findByPk(witnessRecordId);
    assert.equal(record!.status, 'underway');
    await context.close();
  });

  test('when a trainee finishes a record and signs it by keyboard, then the sign dialog is reached control by control and Enter signs', async () => {
    const context = await browser.newContext({ viewport: TABLET, bypassCSP: true });
    const page = await context.newPage();
    await signInThroughPage(page, base, people.trainee.email, PASSWORD);
    await open(page, `/records/${signRecordId}`, (p) => p.locator('mat-step-header', { hasText: 'Finish' }));
    await page.locator('h1').click();
    // The stepper's headers are one Tab stop (arrows, Home and End move between them): End, then Enter, opens Finish.
    await tabTo(page, /Isolate the saw/, 120);
    await page.keyboard.press('End');
    await page.keyboard.press('Enter');
    await page.getByRole('button', { name: 'Finish and send for sign-off' }).waitFor();
    await tabTo(page, /Finish and send for sign-off/, 120);
    await page.keyboard.press('Enter');
    const dialog = page.getByRole('dialog');
    await dialog.getByLabel('Your password').waitFor();
    await expectTargets(page, 'the sign dialog', 'mat-dialog-container');
    await screenshot(page, 'a11y-sign-dialog');
    await expectNoSeriousAxe(page, 'the sign dialog');
    const walk = await tabThrough(page, 'mat-dialog-container', { expectTrapped: true });
    assert.deepEqual(walk.missing, [], 'every control of the sign dialog takes focus');
    await page.locator('mat-dialog-container').focus();
    await tabTo(page, /Your password/);
    await page.keyboard.type(PASSWORD);
    await tabTo(page, /^\s*Sign\s*$/);
    await page.keyboard.press('Enter');
    await page.getByText('This record is ready for sign-off').waitFor();
    assert.equal((await SetupRecord.findByPk(signRecordId))!.status, 'ready_for_signoff');
    await context.close();
  });
});
