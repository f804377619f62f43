import assert from 'node:assert/strict';
import { randomUUID } from 'node:crypto';
import { readFile } from 'node:fs/promises';
import { before, describe, test } from 'node:test';
import type { Browser, Locator, Page } from 'playwright-core';
import sharp from 'sharp';
import { DEMO_MACHINES, DEMO_PASSWORD, DEMO_PEOPLE } from '../../api/db/seed';
import { Machine } from '../../api/modules/machines/model';
import { User } from '../../api/modules/people/model';
import { Photo } from '../../api/modules/photos/model';
import { ProcedureVersion } from '../../api/modules/procedures/model';
import { SetupRecord, StepEntry } from '../../api/modules/records/model';
import { RecordReturn, Signature } from '../../api/modules/signoff/model';
import { db, makePerson, testApp } from '../support/api';
import { dialogSettled, launchBrowser, screenshot, signInThroughPage, startServer } from '../support/browser';
import { approve, fixture } from '../support/procedures';
import { RecordMaker } from '../support/records';
import { saveStep, stepAt, yes } from '../support/runner';

const person = (name: string) => DEMO_PEOPLE.find((p) => p.displayName === name)!;
const trainee = person('Ellis Marwood');
const competent = person('Dougal Pryce');
const auditor = person('Harriet Quill');
const admin = person('Rowan Tilsley');
const stores = DEMO_MACHINES.find((m) => m.name === 'Stores bandsaw')!;
const TABLET = { width: 1024, height: 768 };

async function userId(email: string): Promise<string> {
  return (await User.findOne({ where: { email } }))!.id;
}

describe('each role’s journey through Setwright in a real browser', () => {
  let base: string;
  let browser: Browser;
  /** The trainee's blade change, witnessed, finished, then signed off by the competent person. */
  let bladeChangeId: string | undefined;

  before(async () => {
    db();
    base = await startServer();
    browser = await launchBrowser();
  });

  async function tablet(email: string, downloads = false): Promise<Page> {
    const context = await browser.newContext({ viewport: TABLET, acceptDownloads: downloads });
    const page = await context.newPage();
    await signInThroughPage(page, base, email, DEMO_PASSWORD);
    return page;
  }

  test('when a trainee opens a saw from its QR address and changes the blade with a photo and a witnessed first run, then the record is finished, signed as performed and waits for sign-off', async () => {
    const machine = (await Machine.findOne({ where: { name: stores.name } }))!;
    const page = await tablet(trainee.email);
    await screenshot(page, 'journey-trainee-today');
    // The QR label on the saw carries /machines/<id>: open it directly.
    await page.goto(`${base}/machines/${machine.id}`);
    await page.getByRole('heading', { name: stores.name, level: 1 }).waitFor();
    await screenshot(page, 'journey-trainee-machine');
    await page.getByRole('button', { name: 'Start Removing and fitting a blade' }).click();
    await page.waitForURL(/\/records\/[0-9a-f-]{36}$/);
    const recordId = page.url().split('/records/')[1]!;

    let step = await stepAt(page, 0);
    await step.getByLabel('Isolator switch locked in the off position').check();
    await step.getByLabel('Lock or tag number').fill('Lock 9, tag T-0921');
    await yes(step, 'Pressed start and nothing moved');
    await saveStep(page, step);
    for (const n of [1, 2]) await saveStep(page, await stepAt(page, n));

    step = await stepAt(page, 3);
    await step.getByLabel('Even wear, tips a little rounded (normal end of life)').check();
    const jpeg = await sharp({ create: { width: 640, height: 480, channels: 3, background: '#7d8288' } }).jpeg().toBuffer();
    const uploaded = page.waitForResponse((r) => r.url().endsWith('/api/photos') && r.request().method() === 'POST');
    await step.locator('sw-photo-capture input[type=file]:not([capture])').setInputFiles({ name: 'worn-blade.jpg', mimeType: 'image/jpeg', buffer: jpeg });
    assert.equal((await uploaded).status(), 201);
    await screenshot(page, 'journey-trainee-photo');
    await saveStep(page, step);

    step = await stepAt(page, 4);
    await yes(step, 'Wheels, flanges and guide rollers clean and undamaged');
    await saveStep(page, step);

    // The new blade's marked sizes are the Stores bandsaw's own figures (demo seed), so all three are in limits.
    step = await stepAt(page, 5);
    await step.getByLabel('Blade width').fill(String(stores.spec.bladeWidthMm));
    await step.getByLabel('Blade thickness').fill(String(stores.spec.bladeThicknessMm));
    await step.getByLabel('Blade length, as marked').fill(String(stores.spec.bladeLengthMm));
    await step.getByLabel('Tooth pitch as marked (teeth per inch)').fill('5/8');
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

    // The powered first run: the competent person enters their own credentials on the trainee's tablet.
    step = await stepAt(page, 8);
    await yes(step, 'The blade ran just clear of the flange for a minute, without rubbing or wandering');
    await yes(step, 'No ticking, scraping or knocking while it ran');
    await step.getByRole('button', { name: 'Call a witness and save' }).click();
    const dialog = page.getByRole('dialog');
    await dialogSettled(dialog);
    await dialog.getByLabel('Witness email').fill(competent.email);
    await dialog.getByLabel('Witness password').fill(DEMO_PASSWORD);
    await screenshot(page, 'journey-competent-person-witnesses');
    const witnessed = page.waitForResponse((r) => r.url().endsWith('/entries') && r.request().method() === 'POST');
    await dialog.getByRole('button', { name: 'Witness and save' }).click();
    assert.equal((await witnessed).status(), 201);

    await page.getByRole('button', { name: 'Finish and send for sign-off' }).click();
    const sign = page.getByRole('dialog');
    await sign.getByText('Performed by').waitFor();
    await sign.getByLabel('Your password').fill(DEMO_PASSWORD);
    await screenshot(page, 'journey-trainee-signs');
    await sign.getByRole('button', { name: 'Sign' }).click();
    await page.getByText('This record is ready for sign-off').waitFor();
    await screenshot(page, 'journey-trainee-ready-for-sign-off');

    const record = (await SetupRecord.findByPk(recordId))!;
    assert.equal(record.machineId, machine.id);
    assert.equal(record.status, 'ready_for_signoff');
    assert.equal(record.result, 'passed');
    assert.equal(record.startedById, await userId(trainee.email));
    const entries = await StepEntry.findAll({ where: { recordId } });
    assert.equal(entries.length, 9, 'one entry per step of the blade change');
    assert.equal(entries.find((e) => e.stepId === 'first-run')!.witnessedById, await userId(competent.email));
    const photoIds = entries.find((e) => e.stepId === 'inspect-old')!.values['wear-photo'] as string[];
    assert.equal(photoIds.length, 1);
    assert.equal((await Photo.findByPk(photoIds[0]))!.attachedRecordId, recordId);
    const performed = await Signature.findAll({ where: { recordId, meaning: 'performed' } });
    assert.equal(performed.length, 1);
    assert.equal(performed[0]!.signerId, await userId(trainee.email));
    await page.context().close();
    bladeChangeId = recordId;
  });

  test('when the competent person reviews two finished records, then one goes back to its trainee with the reason and the other is signed off and locked', async () => {
    assert.ok(bladeChangeId, 'the trainee’s blade change from the test before');
    // A second finished record, made through the API as another trainee's tablet would make it.
    const key = `e2e-journey-${randomUUID().slice(0, 6)}`;
    const title = `Tension spot check ${key.slice(-6)}`;
    await approve(fixture(key, 1, title));
    const otherTrainee = await makePerson(['trainee'], 'Tamsin Ockley');
    const otherWitness = await makePerson(['competent_person'], 'Bram Whitlow');
    const secondId = await new RecordMaker(testApp(), key).ready({ performer: otherTrainee, witness: otherWitness });

    const page = await tablet(competent.email);
    await page.getByRole('link', { name: /record.* to sign/ }).click();
    await page.waitForURL(/\/to-sign$/);
    await page.locator(`a[href="/to-sign/${secondId}"]`).waitFor();
    await screenshot(page, 'journey-competent-person-to-sign');

    await page.locator(`a[href="/to-sign/${secondId}"]`).click();
    await page.getByRole('heading', { name: new RegExp(title) }).waitFor();
    await page.getByRole('button', { name: 'Send back' }).click();
    const back = page.getByRole('dialog');
    const reason = 'The gauge photo is blurred: take it again with the reading in focus.';
    await back.getByLabel('What needs correcting').fill(reason);
    await screenshot(page, 'journey-competent-person-send-back');
    const returned = page.waitForResponse((r) => r.url().includes(`/api/records/${secondId}/`) && r.request().method() === 'POST');
    await back.getByRole('button', { name: 'Send back' }).click();
    assert.equal((await returned).status(), 200);

    await page.goto(`${base}/to-sign/${bladeChangeId}`);
    await page.getByRole('heading', { name: /Removing and fitting a blade/ }).waitFor();
    await page.getByText(`Witnessed by ${competent.displayName}`).first().waitFor();
    await screenshot(page, 'journey-competent-person-review');
    await page.getByRole('button', { name: 'Sign off' }).click();
    const sign = page.getByRole('dialog');
    await sign.getByText('Approved by').waitFor();
    await sign.getByLabel('Your password').fill(DEMO_PASSWORD);
    await sign.getByRole('button', { name: 'Sign' }).click();
    await page.getByText('Record hash').waitFor();
    await screenshot(page, 'journey-competent-person-signed-off');

    const sentBack = (await SetupRecord.findByPk(secondId))!;
    assert.equal(sentBack.status, 'returned');
    const returns = await RecordReturn.findAll({ where: { recordId: secondId } });
    assert.equal(returns.length, 1);
    assert.equal(returns[0]!.reason, reason);
    assert.equal(returns[0]!.returnedById, await userId(competent.email));
    const signed = (await SetupRecord.findByPk(bladeChangeId))!;
    assert.equal(signed.status, 'signed_off');
    assert.match(signed.recordHash ?? '', /^[0-9a-f]{64}$/);
    const approvals = await Signature.findAll({ where: { recordId: bladeChangeId, meaning: 'approved' } });
    assert.deepEqual(
      approvals.map((s) => s.signerId),
      [await userId(competent.email)],
    );
    await page.context().close();
  });

  test('when an auditor narrows the Records archive to the signed blade change, then its PDF and an evidence pack download and its Record check says intact', async () => {
    assert.ok(bladeChangeId, 'the record signed off in the test before');
    const page = await tablet(auditor.email, true);
    await page.getByRole('link', { name: 'Records' }).first().click();
    await page.waitForURL(/\/records$/);
    await page.getByRole('table', { name: 'Set-up records' }).waitFor();
    let answer = page.waitForResponse((r) => r.url().includes('/api/archive/records') && r.url().includes('machineId='));
    await page.locator('mat-select[formcontrolname=machineId]').click();
    await page.getByRole('option', { name: new RegExp(stores.assetTag) }).click();
    assert.equal((await answer).status(), 200);
    answer = page.waitForResponse((r) => r.url().includes('/api/archive/records') && r.url().includes('procedure='));
    await page.locator('mat-select[formcontrolname=procedure]').click();
    await page.getByRole('option', { name: 'Removing and fitting a blade' }).click();
    assert.equal((await answer).status(), 200);
    const rows = page.getByRole('table', { name: 'Set-up records' }).getByRole('row').filter({ hasText: 'Removing and fitting a blade' });
    await rows.first().waitFor();
    // Every row shown is this saw's blade change; ours is among them.
    for (const text of await rows.allInnerTexts()) assert.match(text, new RegExp(stores.name));
    const row = rows.filter({ has: page.locator(`a[href="/records/${bladeChangeId}/check"]`) });
    assert.equal(await row.count(), 1);
    assert.match(await row.innerText(), /Ellis Marwood/);
    await screenshot(page, 'journey-auditor-records-filtered');

    const downloading = page.waitForEvent('download');
    await row.getByRole('button', { name: /^PDF of / }).click();
    const pdf = await downloading;
    assert.equal((await readFile((await pdf.path())!)).subarray(0, 5).toString('latin1'), '%PDF-');

    const packing = page.waitForEvent('download');
    await page.getByRole('button', { name: 'Download evidence pack' }).click();
    const pack = await packing;
    assert.match(pack.suggestedFilename(), /\.zip$/);
    assert.equal((await readFile((await pack.path())!)).subarray(0, 2).toString('latin1'), 'PK');
    await screenshot(page, 'journey-auditor-evidence-pack');

    await row.getByRole('link', { name: /^Record check of / }).click();
    await page.waitForURL(new RegExp(`/records/${bladeChangeId}/check$`));
    const verdict = page.getByRole('status', { name: 'Verdict' });
    await verdict.waitFor();
    assert.match(await verdict.innerText(), /Intact/);
    await screenshot(page, 'journey-auditor-record-check');

    // What the auditor checked is what is stored: the record is signed, and its PDF was kept with it.
    const stored = (await SetupRecord.findByPk(bladeChangeId))!;
    assert.equal(stored.status, 'signed_off');
    assert.ok(stored.pdfKey, 'the signed record’s PDF is stored');
    await page.context().close();
  });

  test('when a workshop admin registers a saw and changes a procedure, and a competent person approves it, then the next record started pins the new version', async () => {
    const page = await tablet(admin.email);
    const name = `Yard bandsaw ${randomUUID().slice(0, 4)}`;
    const tag = `BFW-SAW-${randomUUID().slice(0, 4)}`;
    await page.goto(`${base}/machines`);
    await page.goto(`${base}/machines/new`);
    await page.getByRole('heading', { name: 'Register a machine' }).waitFor();
    const field = (label: string) => page.getByLabel(label, { exact: true });
    await field('Name').fill(name);
    await field('Asset tag').fill(tag);
    await field('Location').fill('Yard, under the canopy');
    await field('Model').fill('Workshop-built, 2019');
    const s = stores.spec;
    const figures: [string, number][] = [
      ['Wheel diameter', s.wheelDiameterMm],
      ['Distance between wheel centres', s.centreDistanceMm],
      ['Blade length', s.bladeLengthMm],
      ['Blade width', s.bladeWidthMm],
      ['Blade thickness', s.bladeThicknessMm],
      ['Least tension', s.tensionRangeKgf.min],
      ['Most tension', s.tensionRangeKgf.max],
      ['Least clearance', s.guideClearanceMm.min],
      ['Most clearance', s.guideClearanceMm.max],
      ['Motor speed', s.motorRpm],
      ['Gearbox ratio', s.gearboxRatio],
      ['Distance between pulley centres', s.beltCentreDistanceMm],
      ['Belt deflection', s.beltDeflectionMm],
    ];
    for (const [label, value] of figures) await field(label).fill(String(value));
    await page.getByRole('combobox', { name: 'The tension gauge reads' }).click();
    await page.getByRole('option', { name: 'Load on the wheel (two strands share it)' }).click();
    await field('Step name').fill('1 (only)');
    await field('Driver pulley').fill('63');
    await field('Driven pulley').fill('140');
    await screenshot(page, 'journey-admin-register-machine');
    const created = page.waitForResponse((r) => r.url().endsWith('/api/machines') && r.request().method() === 'POST');
    await page.getByRole('button', { name: 'Register the machine' }).click();
    assert.equal((await created).status(), 201);
    await page.waitForURL(/\/machines\/[0-9a-f-]{36}$/);
    const machineId = page.url().split('/machines/')[1]!;
    const machine = (await Machine.findByPk(machineId))!;
    assert.equal(machine.name, name);
    assert.equal(machine.assetTag, tag);
    assert.equal((machine.spec as { bladeLengthMm: number }).bladeLengthMm, s.bladeLengthMm);
    await screenshot(page, 'journey-admin-new-machine');

    // A draft of the blade tracking procedure, with its powered step renamed.
    await page.goto(`${base}/procedures`);
    await page.getByRole('button', { name: 'Start a draft of Tracking the blade' }).click();
    await page.waitForURL(/\/procedures\/blade-tracking\/versions\/\d+$/);
    const draftVersion = Number(page.url().split('/versions/')[1]);
    await page.getByRole('tab', { name: 'Edit' }).click();
    const editor = page.getByRole('form', { name: 'Draft editor' });
    await editor.getByRole('button', { name: /Step 4: Check the tracking under power/ }).click();
    const newTitle = 'Watch the tracking under power from outside the guard';
    await editor.getByLabel('Step title').fill(newTitle);
    const saved = page.waitForResponse((r) => r.url().includes('/api/procedures/') && r.request().method() === 'PUT');
    await editor.getByRole('button', { name: 'Save draft' }).first().click();
    assert.equal((await saved).status(), 200);
    await screenshot(page, 'journey-admin-draft-saved');
    const draft = (await ProcedureVersion.findOne({ where: { key: 'blade-tracking', version: draftVersion } }))!;
    assert.equal(draft.status, 'draft');
    assert.equal(draft.body.steps[3]!.title, newTitle);
    assert.equal(draft.authorId, await userId(admin.email));
    await page.context().close();

    // The author may not approve their own draft: a competent person does, on the version page.
    const reviewer = await tablet(competent.email);
    await reviewer.goto(`${base}/procedures/blade-tracking/versions/${draftVersion}`);
    await reviewer.getByRole('button', { name: 'Approve' }).click();
    const approved = reviewer.waitForResponse((r) => r.url().includes('/approve') && r.request().method() === 'POST');
    await reviewer.getByRole('button', { name: `Yes, approve version ${draftVersion}` }).click();
    assert.equal((await approved).status(), 200);
    await screenshot(reviewer, 'journey-admin-draft-approved');
    await reviewer.context().close();
    const live = (await ProcedureVersion.findOne({ where: { key: 'blade-tracking', version: draftVersion } }))!;
    assert.equal(live.status, 'approved');
    assert.equal(live.approvedById, await userId(competent.email));

    // The admin (also a competent person) starts the tracking check on the new saw: it uses the new version.
    const back = await tablet(admin.email);
    await back.goto(`${base}/machines/${machineId}`);
    await back.getByRole('button', { name: 'Start Tracking the blade' }).click();
    await back.waitForURL(/\/records\/[0-9a-f-]{36}$/);
    const recordId = back.url().split('/records/')[1]!;
    await back.getByText(newTitle).first().waitFor();
    await screenshot(back, 'journey-admin-next-record-new-version');
    const record = (await SetupRecord.findByPk(recordId))!;
    assert.equal(record.machineId, machineId);
    assert.equal(record.procedureVersionId, live.id);
    await back.context().close();
  });
});
