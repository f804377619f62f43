import assert from 'node:assert/strict';
import { randomUUID } from 'node:crypto';
import { readFile } from 'node:fs/promises';
import { before, describe, test } from 'node:test';
import type { Page } from 'playwright-core';
import type { Person } from '../../api/modules/people/repository';
import { db, makePerson, PASSWORD, testApp } from '../support/api';
import { launchBrowser, screenshot, signInThroughPage, startServer } from '../support/browser';
import { approve, fixture } from '../support/procedures';
import { freshMachine, RecordMaker } from '../support/records';

describe('an auditor works in the Records archive', () => {
  let base: string;
  let auditor: Person;
  let recordId: string;
  let title: string;
  let machineName: string;

  before(async () => {
    db();
    base = await startServer();
    // The signed record is made through the API, as the tablet and the sign-off screen would make it.
    const api = testApp();
    const key = `e2e-archive-${randomUUID().slice(0, 6)}`;
    title = `Archive walk-through ${key.slice(-6)}`;
    await approve(fixture(key, 1, title));
    const trainee = await makePerson(['trainee'], 'Wren Hollis');
    const competent = await makePerson(['competent_person'], 'Idris Calloway');
    auditor = await makePerson(['auditor'], 'Maud Ferrier');
    const machine = await freshMachine('Archive bay saw');
    machineName = machine.name;
    recordId = await new RecordMaker(api, key).signed({ performer: trainee, witness: competent, approver: competent, machineId: machine.id, firstReading: 650, reading: 820 });
  });

  async function findRecord(page: Page) {
    await page.getByRole('link', { name: 'Records' }).first().click();
    await page.waitForURL(/\/records$/);
    await page.getByRole('table', { name: 'Set-up records' }).waitFor();
    // Narrow the list to this test's procedure through its select, as an auditor would.
    const answer = page.waitForResponse((r) => r.url().includes('/api/archive/records') && r.url().includes('procedure='));
    await page.locator('mat-select[formcontrolname=procedure]').click();
    await page.getByRole('option', { name: title }).click();
    assert.equal((await answer).status(), 200);
    const row = page.getByRole('row').filter({ hasText: title });
    await row.waitFor();
    return row;
  }

  test('when an auditor finds a signed record, then its PDF downloads and starts with %PDF', async () => {
    const browser = await launchBrowser();
    const context = await browser.newContext({ viewport: { width: 1024, height: 768 }, acceptDownloads: true });
    const page = await context.newPage();
    await signInThroughPage(page, base, auditor.email, PASSWORD);
    const row = await findRecord(page);
    assert.match(await row.innerText(), new RegExp(machineName));
    assert.match(await row.innerText(), /Passed/);
    assert.match(await row.innerText(), /Wren Hollis/);
    await screenshot(page, 'archive-records-1024x768');

    const downloading = page.waitForEvent('download');
    await row.getByRole('button', { name: /^PDF of / }).click();
    const download = await downloading;
    assert.match(download.suggestedFilename(), /\.pdf$/);
    const bytes = await readFile((await download.path())!);
    assert.equal(bytes.subarray(0, 5).toString('latin1'), '%PDF-');

    const packing = page.waitForEvent('download');
    await page.getByRole('button', { name: 'Download evidence pack' }).click();
    const pack = await packing;
    assert.match(pack.suggestedFilename(), /^evidence-pack-.*\.zip$/);
    const zip = await readFile((await pack.path())!);
    assert.equal(zip.subarray(0, 2).toString('latin1'), 'PK');
    await page.getByText(/Saved evidence-pack-.*: 1 record/).waitFor();
    await screenshot(page, 'archive-evidence-pack-saved-1024x768');
    await context.close();
  });

  test('when the auditor opens the Record check of that record, then it says plainly that the record is intact', async () => {
    const browser = await launchBrowser();
    const context = await browser.newContext({ viewport: { width: 1024, height: 768 } });
    const page = await context.newPage();
    await signInThroughPage(page, base, auditor.email, PASSWORD);
    const row = await findRecord(page);
    await row.getByRole('link', { name: /^Record check of / }).click();
    await page.waitForURL(new RegExp(`/records/${recordId}/check$`));
    const verdict = page.getByRole('status', { name: 'Verdict' });
    await verdict.waitFor();
    assert.match(await verdict.innerText(), /Intact/);
    assert.match(await page.locator('.checks').innerText(), /Content matches its hash/);
    await screenshot(page, 'record-check-intact-1024x768');
    await context.close();
  });

  test('when the Record check address from the PDF is opened on a phone, then the page works there too', async () => {
    const browser = await launchBrowser();
    const context = await browser.newContext({ viewport: { width: 390, height: 844 }, isMobile: true, hasTouch: true });
    const page = await context.newPage();
    await signInThroughPage(page, base, auditor.email, PASSWORD);
    await page.goto(`${base}/records/${recordId}/check`);
    await page.getByRole('status', { name: 'Verdict' }).waitFor();
    assert.match(await page.getByRole('status', { name: 'Verdict' }).innerText(), /Intact/);
    await screenshot(page, 'record-check-intact-phone');
    await page.goto(`${base}/records`);
    await page.getByRole('table', { name: 'Set-up records' }).waitFor();
    await screenshot(page, 'archive-records-phone');
    await context.close();
  });
});
