import assert from 'node:assert/strict';
import { before, describe, test } from 'node:test';
import type { Locator, Page } from 'playwright-core';
import sharp from 'sharp';
import { DEMO_PASSWORD, DEMO_PEOPLE } from '../../api/db/seed';
import { Photo } from '../../api/modules/photos/model';
import { User } from '../../api/modules/people/model';
import { SetupRecord, StepEntry } from '../../api/modules/records/model';
import { db } from '../support/api';
import { dialogSettled, launchBrowser, screenshot, signInThroughPage, startServer } from '../support/browser';
import { saveStep, stepAt, yes } from '../support/runner';

const trainee = DEMO_PEOPLE.find((p) => p.roles.includes('trainee'))!;
const witness = DEMO_PEOPLE.find((p) => p.roles.length === 1 && p.roles[0] === 'competent_person')!;

/** The n-th step's form, once the stepper has opened it. */
describe('a trainee runs the blade change at the saw, and a competent person signs it off', () => {
  let base: string;
  let finishedRecordId: string | undefined;
  before(async () => {
    db();
    base = await startServer();
  });

  test('when a trainee fits a new blade and a competent person witnesses the first run, then the record is ready for sign-off with every step stored once', async () => {
    const browser = await launchBrowser();
    const context = await browser.newContext({ viewport: { width: 1024, height: 768 } });
    const page = await context.newPage();
    await signInThroughPage(page, base, trainee.email, DEMO_PASSWORD);

    await page.getByRole('link', { name: 'Machines' }).first().click();
    await page.getByRole('link', { name: 'Bay 2 bandsaw', exact: true }).click();
    await page.getByRole('button', { name: 'Start Removing and fitting a blade' }).click();
    await page.waitForURL(/\/records\//);
    const recordId = page.url().split('/records/')[1]!;

    let step = await stepAt(page, 0);
    await step.getByLabel('Isolator switch locked in the off position').check();
    await step.getByLabel('Lock or tag number').fill('Lock 4, tag T-0412');
    await yes(step, 'Pressed start and nothing moved');
    await screenshot(page, 'runner-isolation-1024x768');
    await saveStep(page, step);

    for (const n of [1, 2]) await saveStep(page, await stepAt(page, n)); // open up, take the old blade off

    step = await stepAt(page, 3);
    await step.getByLabel('Even wear, tips a little rounded (normal end of life)').check();
    const jpeg = await sharp({ create: { width: 800, height: 600, channels: 3, background: '#8a8f93' } }).jpeg().toBuffer();
    const uploaded = page.waitForResponse((r) => r.url().endsWith('/api/photos') && r.request().method() === 'POST');
    await step.locator('sw-photo-capture input[type=file]:not([capture])').setInputFiles({ name: 'old-blade.jpg', mimeType: 'image/jpeg', buffer: jpeg });
    assert.equal((await uploaded).status(), 201);
    await saveStep(page, step);

    step = await stepAt(page, 4);
    await yes(step, 'Wheels, flanges and guide rollers clean and undamaged');
    await saveStep(page, step);

    step = await stepAt(page, 5);
    await step.getByLabel('Blade width').fill('27');
    await step.getByLabel('Blade thickness').fill('0.9');
    await step.getByLabel('Blade length, as marked').fill('2742');
    await step.getByLabel('Tooth pitch as marked (teeth per inch)').fill('6/10');
    await step.getByLabel('Bi-metal').check();
    assert.equal(await step.locator('sw-reading-field[data-outcome="pass"]').count(), 3);
    await saveStep(page, step);

    step = await stepAt(page, 6);
    await yes(step, 'Teeth point the way the blade travels through the work (toward the fixed jaw)');
    await yes(step, 'Blade back seated against both wheel flanges, and inside both guides');
    await saveStep(page, step);

    step = await stepAt(page, 7);
    await yes(step, 'Two full turns by hand: the blade stayed on the wheels and passed the guides cleanly');
    await saveStep(page, step);

    step = await stepAt(page, 8);
    assert.match(await step.textContent() ?? '', /Power on — witness needed/);
    await yes(step, 'The blade ran just clear of the flange for a minute, without rubbing or wandering');
    await yes(step, 'No ticking, scraping or knocking while it ran');
    await screenshot(page, 'runner-powered-step-1024x768');
    await step.getByRole('button', { name: 'Call a witness and save' }).click();
    const dialog = page.getByRole('dialog');
    await dialogSettled(dialog);
    await dialog.getByLabel('Witness email').fill(witness.email);
    await dialog.getByLabel('Witness password').fill(DEMO_PASSWORD);
    const witnessed = page.waitForResponse((r) => r.url().endsWith('/entries') && r.request().method() === 'POST');
    await dialog.getByRole('button', { name: 'Witness and save' }).click();
    assert.equal((await witnessed).status(), 201);

    await page.getByRole('button', { name: 'Finish and send for sign-off' }).click();
    const sign = page.getByRole('dialog');
    await sign.getByText('Performed by').waitFor();
    await sign.getByLabel('Your password').fill(DEMO_PASSWORD);
    await sign.getByRole('button', { name: 'Sign' }).click();
    await page.getByText('This record is ready for sign-off').waitFor();
    await screenshot(page, 'runner-ready-for-sign-off-1024x768');

    const record = await SetupRecord.findByPk(recordId);
    assert.equal(record!.status, 'ready_for_signoff');
    assert.equal(record!.result, 'passed');
    const entries = await StepEntry.findAll({ where: { recordId } });
    assert.equal(entries.length, 9, 'one entry per step, none twice');
    const firstRun = entries.find((e) => e.stepId === 'first-run')!;
    const dougal = await User.findOne({ where: { email: witness.email } });
    assert.equal(firstRun.witnessedById, dougal!.id);
    const inspected = entries.find((e) => e.stepId === 'inspect-old')!;
    const photoIds = inspected.values['wear-photo'] as string[];
    assert.equal(photoIds.length, 1);
    assert.equal((await Photo.findByPk(photoIds[0]))!.attachedRecordId, recordId);
    await context.close();
    finishedRecordId = recordId;
  });

  test('when the competent person reviews the finished record and signs it off, then it is locked with its hash and checks intact', async () => {
    assert.ok(finishedRecordId, 'the trainee’s record from the test before');
    const browser = await launchBrowser();
    const context = await browser.newContext({ viewport: { width: 1024, height: 768 } });
    const page = await context.newPage();
    await signInThroughPage(page, base, witness.email, DEMO_PASSWORD);
    await page.getByRole('link', { name: /record.* to sign/ }).click();
    await page.waitForURL(/\/to-sign$/);
    await page.locator(`a[href="/to-sign/${finishedRecordId}"]`).click();
    await page.getByRole('heading', { name: /Removing and fitting a blade/ }).waitFor();
    await page.getByText('Witnessed by Dougal Pryce').first().waitFor();
    await screenshot(page, 'review-1024x768');
    await page.getByRole('button', { name: 'Sign off' }).click();
    const sign = page.getByRole('dialog');
    await sign.getByText('Approved by').waitFor();
    await sign.getByLabel('Your password').fill(DEMO_PASSWORD);
    await sign.getByRole('button', { name: 'Sign' }).click();
    await page.getByText('Record hash').waitFor();
    await screenshot(page, 'signed-off-1024x768');
    const record = await SetupRecord.findByPk(finishedRecordId);
    assert.equal(record!.status, 'signed_off');
    assert.match(record!.recordHash ?? '', /^[0-9a-f]{64}$/);
    assert.ok(await page.getByText(record!.recordHash!).isVisible());
    await context.close();
  });
});
