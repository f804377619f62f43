import assert from 'node:assert/strict';
import { before, describe, test } from 'node:test';
import type { Locator, Page } from 'playwright-core';
import { DEMO_PASSWORD, DEMO_PEOPLE } from '../../api/db/seed';
import { StepEntry } from '../../api/modules/records/model';
import { db } from '../support/api';
import { launchBrowser, screenshot, signInThroughPage, startServer } from '../support/browser';
import { saveStep, stepAt } from '../support/runner';

const trainee = DEMO_PEOPLE.find((p) => p.roles.includes('trainee'))!;

describe('readings that can be trusted, in a real browser', () => {
  let base: string;
  before(async () => {
    db();
    base = await startServer();
  });

  test('when a trainee types "0,1047" then 0.1047 mm on a 100 mm square, then the comma is refused on the field and 0.105 mm per 100 mm is out of the 0.10 limit, on the tablet and in the stored record (CHECKS.md, Squareness: per-100-mm error = 100·g/h)', async () => {
    const browser = await launchBrowser();
    try {
      const page = await (await browser.newContext({ viewport: { width: 1024, height: 768 } })).newPage();
      await signInThroughPage(page, base, trainee.email, DEMO_PASSWORD);
      await page.getByRole('link', { name: 'Machines' }).first().click();
      await page.getByRole('link', { name: 'Bay 2 bandsaw', exact: true }).click();
      await page.getByRole('button', { name: 'Start Squaring the blade to the bed' }).click();
      await page.waitForURL(/\/records\//);
      const recordId = page.url().split('/records/')[1]!;

      let step = await stepAt(page, 0);
      await step.getByLabel('Isolator switch locked in the off position').check();
      await step.getByLabel('Lock or tag number').fill('Lock 2');
      await step.locator('mat-button-toggle-group[aria-label="Pressed start and nothing moved"]').getByText('Yes', { exact: true }).click();
      await saveStep(page, step);
      await saveStep(page, await stepAt(page, 1));

      step = await stepAt(page, 2);
      const gap = step.getByLabel('Largest feeler leaf that fits at the gap (0 if none)');
      await gap.fill('0,1047');
      await step.locator('sw-reading-field mat-error').first().waitFor();
      assert.match(await step.locator('sw-reading-field mat-error').first().innerText(), /"0,1047" has a comma; use a point for decimals/);
      await gap.fill('0.1047');
      await step.getByLabel('Height of the gap above the bed, on the square').fill('100');
      const figure = step.locator('.figure').filter({ hasText: 'Error per 100 mm of height' });
      assert.equal((await figure.locator('.figure-value').innerText()).trim(), '0.105 mm');
      assert.equal(await figure.getAttribute('data-outcome'), 'fail');
      await screenshot(page, 'runner-reading-past-limit-1024x768');

      await step.getByLabel('What did you find, and what did you do about it?').fill('0.1047 mm over 100 mm; will turn the guide blocks and measure again.');
      await saveStep(page, step);
      const stored = await StepEntry.findOne({ where: { recordId, stepId: 'measure' } });
      assert.equal(stored!.outcome, 'out_of_limits');
      const computed = (stored!.evaluation as { computed: { id: string; display: string; outcome: string }[] }).computed.find((c) => c.id === 'error-per-100')!;
      assert.deepEqual([computed.display, computed.outcome], ['0.105 mm', 'fail']);
    } finally {
      await browser.close();
    }
  });
});
