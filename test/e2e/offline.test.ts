import assert from 'node:assert/strict';
import { before, describe, test } from 'node:test';
import type { BrowserContext, Locator, Page } from 'playwright-core';
import { Op } from 'sequelize';
import sharp from 'sharp';
import { RefreshToken } from '../../api/modules/auth/model';
import { Photo } from '../../api/modules/photos/model';
import { SetupRecord, StepEntry } from '../../api/modules/records/model';
import { db, makePerson, PASSWORD } from '../support/api';
import { launchBrowser, screenshot, signInThroughPage, startServer } from '../support/browser';
import { stepAt } from '../support/runner';

/** Ask the page until it answers true (each answer awaited), or fail after `ms`. */
async function until(page: Page, what: string, ask: () => Promise<boolean>, ms = 60_000) {
  const end = Date.now() + ms;
  while (!(await page.evaluate(ask))) {
    if (Date.now() > end) throw new Error(`timed out waiting until ${what}`);
    await new Promise((r) => setTimeout(r, 250));
  }
}

/** The app's service worker controls the page and holds every file it prefetches (the shell, fonts, icons). */
async function serviceWorkerReady(page: Page) {
  await until(page, 'the service worker holds the app', async () => {
    if (!navigator.serviceWorker.controller) return false;
    const manifest = (await (await fetch('/ngsw.json', { cache: 'no-store' })).json()) as { assetGroups: { installMode: string; urls: string[] }[] };
    const urls = manifest.assetGroups.filter((g) => g.installMode === 'prefetch').flatMap((g) => g.urls);
    const cached = await Promise.all(urls.map((u) => caches.match(u)));
    return urls.length > 0 && cached.every(Boolean);
  });
}

/** The shell's indicator (a live region). */
const indicator = (page: Page) => page.locator('sw-connection-status [role=status]');

/** Save a step with no connection: it is kept on the tablet, and its label says so. */
async function keepStep(page: Page, n: number) {
  const step = await stepAt(page, n);
  await step.getByRole('button', { name: /^Save (step|again)$/ }).click();
  await page.locator('.mat-step-header').nth(n).getByText('Waiting on this device').waitFor();
}

async function goOffline(context: BrowserContext, page: Page) {
  await context.setOffline(true);
  await indicator(page).getByText('Offline').waitFor();
}

describe('a trainee carries on at the saw while the workshop Wi-Fi is down', () => {
  let base: string;
  before(async () => {
    db();
    base = await startServer();
  });

  test('when the connection drops after a record is started, then readings and a photo are kept on the tablet, survive a reload, and reach the server exactly once when it is back', async () => {
    const browser = await launchBrowser();
    const context = await browser.newContext({ viewport: { width: 1024, height: 768 } });
    const page = await context.newPage();
    // A trainee of this test's own, so the records left underway here show on nobody else's Today.
    const person = await makePerson(['trainee'], 'Offline trainee');
    await signInThroughPage(page, base, person.email, PASSWORD);
    await serviceWorkerReady(page);

    await page.getByRole('link', { name: 'Machines' }).first().click();
    await page.getByRole('link', { name: 'Bay 2 bandsaw', exact: true }).click();
    await page.getByRole('button', { name: 'Start Removing and fitting a blade' }).click();
    await page.waitForURL(/\/records\//);
    const recordId = page.url().split('/records/')[1]!;
    await stepAt(page, 0);
    const startedAt = new Date();

    await goOffline(context, page);
    let step = await stepAt(page, 0);
    await step.getByLabel('Isolator switch locked in the off position').check();
    await step.getByLabel('Lock or tag number').fill('Lock 4, tag T-0412');
    await step.locator('mat-button-toggle-group[aria-label="Pressed start and nothing moved"]').getByText('Yes', { exact: true }).click();
    await keepStep(page, 0);
    await keepStep(page, 1); // open up
    await keepStep(page, 2); // take the old blade off

    step = await stepAt(page, 3);
    await step.getByLabel('Even wear, tips a little rounded (normal end of life)').check();
    const jpeg = await sharp({ create: { width: 800, height: 600, channels: 3, background: '#8a8f93' } }).jpeg().toBuffer();
    await step.locator('sw-photo-capture input[type=file]:not([capture])').setInputFiles({ name: 'old-blade.jpg', mimeType: 'image/jpeg', buffer: jpeg });
    await step.getByText('Kept on this tablet. It uploads by itself').waitFor();
    await keepStep(page, 3);
    await indicator(page).getByText('5 waiting on this device').waitFor();
    await screenshot(page, 'offline-steps-waiting-1024x768');

    // The step run with power on needs the server: the runner says so and does not take it.
    await page.locator('.mat-step-header').nth(8).click();
    step = await stepAt(page, 8);
    await step.getByText('this step waits for the Wi-Fi').waitFor();
    assert.equal(await step.getByRole('button', { name: 'Call a witness and save' }).isDisabled(), true);

    // A reload with no connection: the app, the record and what was entered all come from the tablet.
    const refreshTokensBefore = await RefreshToken.count({ where: { userId: person.id } });
    await page.reload();
    await page.getByText('this is the copy kept on this tablet').waitFor();
    const headers = page.locator('.mat-step-header');
    for (const n of [0, 1, 2, 3]) await headers.nth(n).getByText('Waiting on this device').waitFor();
    assert.equal(await headers.nth(4).getByText('Waiting on this device').count(), 0);
    await page.getByText('0 of 9 steps saved on the server').waitFor();
    assert.equal(await (await stepAt(page, 0)).getByLabel('Lock or tag number').inputValue(), 'Lock 4, tag T-0412');
    await headers.nth(3).click();
    await (await stepAt(page, 3)).locator('sw-photo-capture li[data-state="on-device"] img').waitFor();
    await screenshot(page, 'offline-after-reload-1024x768');
    assert.equal(await StepEntry.count({ where: { recordId } }), 0, 'nothing reached the server while offline');
    assert.equal(await RefreshToken.count({ where: { userId: person.id } }), refreshTokensBefore, 'the offline reload did not reach the server');

    // The connection is back: the queue drains by itself, photo first.
    await context.setOffline(false);
    await page.getByText('4 of 9 steps saved on the server').waitFor({ timeout: 30_000 });
    await indicator(page).getByText('Online').waitFor();
    assert.equal(await indicator(page).getByText('waiting on this device').count(), 0);
    for (const n of [0, 1, 2, 3]) await headers.nth(n).getByText('Saved on the server').waitFor();
    await screenshot(page, 'offline-drained-1024x768');

    const entries = await StepEntry.findAll({ where: { recordId }, order: [['createdAt', 'ASC']] });
    assert.deepEqual(
      entries.map((e) => e.stepId),
      ['isolate', 'open-up', 'remove', 'inspect-old'],
      'every kept step arrived once, in the order it was saved',
    );
    assert.ok(entries.every((e) => e.attempt === 1 && e.enteredById === person.id));
    assert.equal(new Set(entries.map((e) => e.idempotencyKey)).size, 4);
    assert.equal(entries[0]!.values['lock-id'], 'Lock 4, tag T-0412');
    const photos = await Photo.findAll({ where: { ownerId: person.id, createdAt: { [Op.gte]: startedAt } } });
    assert.equal(photos.length, 1, 'the photo was uploaded once');
    assert.equal(photos[0]!.attachedRecordId, recordId);
    assert.deepEqual(entries[3]!.values['wear-photo'], [photos[0]!.id]);
    assert.equal((await SetupRecord.findByPk(recordId))!.status, 'underway');
    await context.close();
  });

  test('when a record is started with no connection, then it starts on the tablet with its own id, and the server takes that record and its steps once the connection is back', async () => {
    const browser = await launchBrowser();
    const context = await browser.newContext({ viewport: { width: 1024, height: 768 } });
    const page = await context.newPage();
    // A trainee of this test's own, so the records left underway here show on nobody else's Today.
    const person = await makePerson(['trainee'], 'Offline trainee');
    await signInThroughPage(page, base, person.email, PASSWORD);
    await serviceWorkerReady(page);

    // Opened once with a connection: the machine is in the service worker's copy, its procedures on the tablet.
    await page.getByRole('link', { name: 'Machines' }).first().click();
    await page.getByRole('link', { name: 'Bay 2 bandsaw', exact: true }).click();
    await page.getByRole('button', { name: 'Start Removing and fitting a blade' }).waitFor();
    await until(page, 'the blade change is kept on the tablet', async () => {
      const dbs = await indexedDB.databases();
      if (!dbs.some((d) => d.name === 'setwright-offline')) return false; // never create it here: the app does
      return new Promise<boolean>((ok) => {
        const open = indexedDB.open('setwright-offline');
        open.onerror = () => ok(false);
        open.onsuccess = () => {
          const all = open.result.transaction('procedures').objectStore('procedures').getAll();
          all.onsuccess = () => {
            open.result.close();
            ok((all.result as { procedureKey: string }[]).some((p) => p.procedureKey === 'blade-change'));
          };
        };
      });
    });

    await goOffline(context, page);
    await page.getByRole('button', { name: 'Start Removing and fitting a blade' }).click();
    await page.waitForURL(/\/records\//);
    const recordId = page.url().split('/records/')[1]!;
    await page.getByText('Started on this tablet without a connection').waitFor();
    assert.equal(await SetupRecord.count({ where: { id: recordId } }), 0, 'the record is only on the tablet so far');

    const step = await stepAt(page, 0);
    await step.getByLabel('Isolator switch locked in the off position').check();
    await step.getByLabel('Lock or tag number').fill('Lock 7');
    await step.locator('mat-button-toggle-group[aria-label="Pressed start and nothing moved"]').getByText('Yes', { exact: true }).click();
    await keepStep(page, 0);
    await indicator(page).getByText('2 waiting on this device').waitFor();
    await screenshot(page, 'offline-started-on-tablet-1024x768');

    await context.setOffline(false);
    await page.getByText('1 of 9 steps saved on the server').waitFor({ timeout: 30_000 });
    assert.equal(await page.getByText('Started on this tablet without a connection').count(), 0);
    const record = await SetupRecord.findByPk(recordId);
    assert.ok(record, 'the server took the record under the tablet’s own id');
    assert.equal(record.startedById, person.id);
    assert.equal(record.status, 'underway');
    const entries = await StepEntry.findAll({ where: { recordId } });
    assert.deepEqual(entries.map((e) => [e.stepId, e.attempt, e.values['lock-id']]), [['isolate', 1, 'Lock 7']]);
    await context.close();
  });
});
