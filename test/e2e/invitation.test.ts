import assert from 'node:assert/strict';
import { randomUUID } from 'node:crypto';
import { createServer, type Server } from 'node:http';
import type { AddressInfo } from 'node:net';
import { resolve } from 'node:path';
import { after, describe, test } from 'node:test';
import { createApp } from '../../api/app';
import { createLogger } from '../../api/lib/logger';
import { Outbox } from '../../api/modules/mail/outbox';
import { User } from '../../api/modules/people/model';
import { db, makePerson, ownThrottles, PASSWORD, testConfig } from '../support/api';
import { launchBrowser, screenshot, signInThroughPage } from '../support/browser';
import { readMailbox, waitFor } from '../support/mail';

/** The production build and the real API, delivering e-mail to the test run's SMTP stand-in through a queue of its own. */
async function serve(): Promise<{ base: string; outbox: Outbox; close(): Promise<void> }> {
  const settings = { STATIC_DIR: resolve(import.meta.dirname, '..', '..', 'dist', 'setwright', 'browser'), COOKIE_SECURE: 'false', MAIL_QUEUE: `e2e-${randomUUID().slice(0, 8)}`, MAIL_POLL_SECONDS: '0.5' };
  // The invitation link must point at this server, so its address is known before the config is made.
  const server: Server = await new Promise((ok) => {
    const s = createServer();
    s.listen(0, '127.0.0.1', () => ok(s));
  });
  const base = `http://127.0.0.1:${(server.address() as AddressInfo).port}`;
  const config = testConfig({ ...settings, PUBLIC_URL: base });
  const outbox = new Outbox(db(), config, createLogger('silent'));
  server.on('request', createApp({ config, sequelize: db(), logger: createLogger('silent'), outbox, throttleNamespace: ownThrottles() }));
  await outbox.start();
  return {
    base,
    outbox,
    async close() {
      await outbox.stop();
      server.closeAllConnections();
      await new Promise<void>((ok) => server.close(() => ok()));
    },
  };
}

describe('an invitation, from the People page to the first sign-in', () => {
  let running: Awaited<ReturnType<typeof serve>> | undefined;
  // Inside the suite, so the mail worker stops before the shared database connection closes.
  after(async () => {
    await running?.close();
  });

  test('when an admin invites someone in the browser, then the e-mailed link lets them choose a password and they land on Today', async () => {
    running = await serve();
    const { base } = running;
    const admin = await makePerson(['workshop_admin'], 'Browser Admin');
    const email = `browser.invitee.${randomUUID().slice(0, 8)}@tests.example`;
    const browser = await launchBrowser();
    const page = await browser.newPage({ viewport: { width: 1024, height: 768 } });

    await signInThroughPage(page, base, admin.email, PASSWORD);
    await page.getByRole('navigation', { name: 'Places' }).getByRole('link', { name: 'People' }).click();
    await page.waitForURL(/\/people$/);
    await page.getByRole('button', { name: 'Invite someone' }).click();
    const dialog = page.getByRole('dialog');
    await dialog.getByLabel('Email').fill(email);
    await dialog.getByLabel('Name as it prints on records').fill('Browser Invitee');
    await dialog.getByRole('option', { name: 'Trainee' }).click();
    await dialog.getByRole('button', { name: 'Send invitation' }).click();
    await dialog.waitFor({ state: 'detached' });
    const row = page.getByRole('listitem').filter({ hasText: email });
    await row.getByText('Invited').waitFor();
    await screenshot(page, 'people-invited');

    const mail = await waitFor('the invitation e-mail', async () => (await readMailbox(process.env['MAIL_STAND_IN_DIR']!)).find((m) => m.to.includes(email)));
    const link = /(http:\/\/\S+\/set-password\?token=\S+)/.exec(mail.text)![1]!;
    assert.ok(link.startsWith(`${base}/set-password?token=`));

    // The invitee, on their own tablet.
    const theirs = await (await browser.newContext({ viewport: { width: 1024, height: 768 } })).newPage();
    await theirs.goto(link);
    await theirs.getByRole('heading', { name: 'Choose your password' }).waitFor();
    await theirs.getByLabel('New password').fill('a saw is only as true as its blade');
    await theirs.getByLabel('The same password again').fill('a saw is only as true as its blade');
    await screenshot(theirs, 'set-password');
    await theirs.getByRole('button', { name: 'Set password and sign in' }).click();
    await theirs.waitForURL(/\/today/);
    const user = await User.findOne({ where: { email } });
    assert.equal(user!.active, true);

    // The same link a second time says it no longer works.
    await theirs.goto(link);
    await theirs.getByLabel('New password').fill('another password entirely');
    await theirs.getByLabel('The same password again').fill('another password entirely');
    await theirs.getByRole('button', { name: 'Set password and sign in' }).click();
    await theirs.getByRole('alert').filter({ hasText: 'used already' }).waitFor();

    await page.reload();
    await page.getByRole('listitem').filter({ hasText: email }).getByText('Active').waitFor();
  });
});
