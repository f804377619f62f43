// Driving the record runner in the browser tests: the nth step, a Yes answer, and a save the server took.
import assert from 'node:assert/strict';
import type { Locator, Page } from 'playwright-core';

/** The nth step of the runner, once it is on screen. */
export async function stepAt(page: Page, n: number): Promise<Locator> {
  const step = page.locator('sw-step-form').nth(n);
  await step.waitFor({ state: 'visible' });
  return step;
}

/** Save a step and check the server stored it (201). */
export async function saveStep(page: Page, step: Locator): Promise<void> {
  const saved = page.waitForResponse((r) => r.url().endsWith('/entries') && r.request().method() === 'POST');
  await step.getByRole('button', { name: /^Save step$/ }).click();
  assert.equal((await saved).status(), 201);
}

/** Answer Yes to a yes/no input of a step. */
export async function yes(step: Locator, label: string): Promise<void> {
  await step.locator(`mat-button-toggle-group[aria-label="${label}"]`).getByText('Yes', { exact: true }).click();
}
