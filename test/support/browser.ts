import { mkdirSync } from 'node:fs';
import type { Server } from 'node:http';
import type { AddressInfo } from 'node:net';
import { join, resolve } from 'node:path';
import { after } from 'node:test';
import { chromium, type Browser, type Locator, type Page } from 'playwright-core';
import { createApp } from '../../api/app';
import { createLogger } from '../../api/lib/logger';
import { db, ownThrottles, testConfig } from './api';

export const ARTEFACTS = resolve(import.meta.dirname, '..', '..', 'test-results');

/** Closed after the whole test file (a hook registered inside a test or hook would run too early). */
const cleanups: (() => Promise<void>)[] = [];
after(async () => {
  for (const clean of cleanups.reverse()) await clean();
});

/** The production build served by the real API on a free port, for the length of the test file. */
export async function startServer(): Promise<string> {
  const config = testConfig({ STATIC_DIR: resolve(import.meta.dirname, '..', '..', 'dist', 'setwright', 'browser'), COOKIE_SECURE: 'false' });
  const app = createApp({ config, sequelize: db(), logger: createLogger('silent'), throttleNamespace: ownThrottles() });
  const server: Server = await new Promise((ok) => {
    const s = app.listen(0, '127.0.0.1', () => ok(s));
  });
  cleanups.push(
    () =>
      new Promise<void>((ok) => {
        server.closeAllConnections();
        server.close(() => ok());
      }),
  );
  return `http://127.0.0.1:${(server.address() as AddressInfo).port}`;
}

/** Debian's Chromium, headless, never a downloaded browser. */
export async function launchBrowser(): Promise<Browser> {
  const browser = await chromium.launch({
    executablePath: process.env['CHROME_BIN'] ?? '/usr/bin/chromium',
    args: ['--headless', '--no-sandbox', '--disable-gpu', '--disable-background-networking', '--disable-component-update', '--disable-sync', '--no-first-run', '--disable-dev-shm-usage'],
  });
  cleanups.push(() => browser.close());
  return browser;
}

/**
 * Wait until an opening dialog has taken the focus (Material moves it to the first field once the
 * open animation ends). Filling fields before that can lose typing to that late focus move.
 */
export async function dialogSettled(dialog: Locator): Promise<void> {
  await dialog.waitFor();
  // The first field, not the dialog's own container (which may hold the focus on the way). No
  // named functions inside: the test runner's compiler would wrap them in a helper the page lacks.
  await dialog.page().waitForFunction(() => {
    const d = document.querySelector('[role="dialog"]');
    const a = document.activeElement;
    return !!d && !!a && a !== d && d.contains(a) && a.matches('input, textarea, select, button');
  });
}

/** Save a screenshot as a test artefact under test-results/. */
export async function screenshot(page: Page, name: string): Promise<string> {
  mkdirSync(ARTEFACTS, { recursive: true });
  const path = join(ARTEFACTS, `${name}.png`);
  await page.screenshot({ path, fullPage: false });
  return path;
}

export async function signInThroughPage(page: Page, base: string, email: string, password: string) {
  await page.goto(`${base}/sign-in`);
  await page.getByLabel('Email').fill(email);
  await page.getByLabel('Password').fill(password);
  await page.getByRole('button', { name: 'Sign in' }).click();
  await page.waitForURL(/\/today/);
}

/** One axe-core finding, cut down to what a report needs. */
export interface AxeFinding {
  id: string;
  impact: string | null;
  help: string;
  targets: string[];
}

/** Runs axe-core (the npm package, injected from node_modules) on the page as it stands: WCAG 2.x A and AA rules. */
export async function axe(page: Page): Promise<AxeFinding[]> {
  await page.addScriptTag({ path: resolve(import.meta.dirname, '..', '..', 'node_modules', 'axe-core', 'axe.min.js') });
  return page.evaluate(async () => {
    const w = window as unknown as { axe: { run(ctx: Document, o: object): Promise<{ violations: { id: string; impact: string | null; help: string; nodes: { target: string[] }[] }[] }> } };
    const result = await w.axe.run(document, { runOnly: { type: 'tag', values: ['wcag2a', 'wcag2aa', 'wcag21a', 'wcag21aa', 'wcag22aa', 'best-practice'] } });
    return result.violations.map((v) => ({ id: v.id, impact: v.impact, help: v.help, targets: v.nodes.map((n) => n.target.join(' ')) }));
  });
}
