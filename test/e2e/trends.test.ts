import assert from 'node:assert/strict';
import { before, describe, test } from 'node:test';
import type { Browser, Page } from 'playwright-core';
import request from 'supertest';
import { DEMO_MACHINES } from '../../api/db/seed';
import type { MachineTrends } from '../../api/contracts/trends';
import { Machine } from '../../api/modules/machines/model';
import type { Person } from '../../api/modules/people/repository';
import { db, makePerson, PASSWORD, signIn, testApp } from '../support/api';
import { launchBrowser, screenshot, signInThroughPage, startServer } from '../support/browser';
import { freshMachine } from '../support/records';

const TABLET = { width: 1024, height: 768 };

describe('reading trends on the machine page, the focused runner and the places list', () => {
  let base: string;
  let browser: Browser;
  let competent: Person, trainee: Person, admin: Person;
  let storesSaw: Machine;

  before(async () => {
    db();
    base = await startServer();
    browser = await launchBrowser();
    competent = await makePerson(['competent_person'], 'Ines Corrow');
    trainee = await makePerson(['trainee'], 'Tamsin Reddaway');
    admin = await makePerson(['workshop_admin'], 'Bryn Halloway');
    storesSaw = (await Machine.findOne({ where: { assetTag: DEMO_MACHINES[1]!.assetTag } }))!;
  });

  async function pageAs(person: Person): Promise<Page> {
    const context = await browser.newContext({ viewport: TABLET });
    const page = await context.newPage();
    await signInThroughPage(page, base, person.email, PASSWORD);
    return page;
  }

  test('when a competent person opens the stores saw on the tablet, then every charted point sits where the axis puts its stored reading, out-of-limits readings are diamonds, a drift notice says the rule, and the table lists the same readings', async () => {
    const api = testApp();
    const token = (await signIn(api, competent.email)).token;
    const stored = (await request(api).get(`/api/machines/${storesSaw.id}/trends`).set({ authorization: `Bearer ${token}` }).expect(200)).body as MachineTrends;
    assert.ok(stored.series.length >= 5, 'tension, squareness, guides, belt, descent and speed on the stores saw');

    const page = await pageAs(competent);
    await page.goto(`${base}/machines/${storesSaw.id}`);
    await page.getByRole('heading', { name: 'Readings over time' }).waitFor();
    await page.locator('sw-trend-chart').first().waitFor();
    await page.getByText('Drift rule: a straight line fitted (least squares) through the last 5 readings').waitFor();

    for (const series of stored.series) {
      const chart = page.locator(`figure[data-series="${series.key}"]`);
      await chart.scrollIntoViewIfNeeded();
      const svg = chart.locator('svg[role=img]');
      const name = await svg.getAttribute('aria-label');
      assert.match(name ?? '', new RegExp(`^${series.label.replace(/[()]/g, '.')}`), 'the chart is named for a screen reader');
      assert.match(name!, new RegExp(`${series.points.length} readings?`));

      // Read the drawing back: two y-axis tick labels give the scale, each mark's centre gives its value.
      const drawn = await chart.evaluate((figure) => {
        const ticks = [...figure.querySelectorAll<SVGTextElement>('text.y-tick')].map((t) => {
          const r = t.getBoundingClientRect();
          return { value: Number(t.dataset['value']), y: r.top + r.height / 2 };
        });
        const points = [...figure.querySelectorAll<SVGGElement>('g.point')].map((g) => {
          const r = g.querySelector('circle, path')!.getBoundingClientRect();
          return { record: g.dataset['record']!, y: r.top + r.height / 2, shape: g.querySelector('circle') ? 'circle' : 'diamond' };
        });
        return { ticks, points };
      });
      assert.ok(drawn.ticks.length >= 2, `${series.key} has an axis`);
      const [a, b] = [drawn.ticks[0]!, drawn.ticks[drawn.ticks.length - 1]!];
      const valueAt = (y: number) => a.value + ((y - a.y) * (b.value - a.value)) / (b.y - a.y);
      const span = Math.abs(b.value - a.value);
      assert.equal(drawn.points.length, series.points.length, `${series.key}: one mark per stored reading`);
      for (const p of series.points) {
        const mark = drawn.points.find((d) => d.record === p.recordId);
        assert.ok(mark, `${series.key}: a mark for record ${p.recordId}`);
        assert.ok(Math.abs(valueAt(mark.y) - p.value) <= span * 0.01, `${series.key}: drawn at ${valueAt(mark.y)}, stored ${p.value}`);
        assert.equal(mark.shape, p.outOfLimits ? 'diamond' : 'circle', `${series.key}: ${p.recordId} marked by shape`);
      }
      const notice = chart.getByRole('note');
      if (series.drift) assert.match(await notice.innerText(), new RegExp(`Drifting toward the ${series.drift.toward === 'max' ? 'maximum' : 'minimum'}`));
      else assert.equal(await notice.count(), 0);
    }

    const guides = page.locator('figure[data-series="guide-bearings/back-rollers/fixed-guide"]');
    await guides.scrollIntoViewIfNeeded();
    await screenshot(page, 'trends-stores-saw-1024x768');
    await guides.getByRole('button', { name: 'Show the readings as a table' }).click();
    const rows = guides.locator('table tbody tr');
    const fixed = stored.series.find((s) => s.key === 'guide-bearings/back-rollers/fixed-guide')!;
    assert.equal(await rows.count(), fixed.points.length);
    for (const [i, p] of fixed.points.entries()) {
      assert.equal(await rows.nth(i).getAttribute('data-record'), p.recordId);
      assert.match(await rows.nth(i).innerText(), new RegExp(`${String(p.value).replace('.', '\\.')} mm`));
    }
    await screenshot(page, 'trends-table-1024x768');
    await page.context().close();
  });

  test('when a trainee opens a record in the runner on a 1024×768 tablet, then the places fold away behind the menu button and a long step’s primary action stays in view', async () => {
    const machine = await freshMachine('Runner layout saw');
    const api = testApp();
    const token = (await signIn(api, trainee.email)).token;
    const started = await request(api).post('/api/records').set({ authorization: `Bearer ${token}` }).send({ machineId: machine.id, procedureKey: 'speed-change' }).expect(201);
    const page = await pageAs(trainee);
    const nav = page.locator('mat-sidenav.places');
    assert.equal(await nav.isVisible(), true, 'the places are beside the page on Today');

    await page.goto(`${base}/records/${started.body.id}`);
    const step = page.locator('sw-step-form').first();
    await step.waitFor({ state: 'visible' });
    await page.waitForTimeout(400); // the side navigation slides away
    assert.equal(await nav.isVisible(), false, 'the places are folded away in the runner');
    const menu = page.getByRole('button', { name: 'Open the list of places' });
    assert.equal(await menu.isVisible(), true);
    const main = await page.locator('main').boundingBox();
    assert.ok(main && main.width >= TABLET.width - 1, `the runner has the full width (${main?.width} px)`);
    // Past the cautions of "Before you start" (they stay above the work), the step's header at the top of the screen:
    // the step is taller than the screen, and its Save step button stays at the bottom of the view.
    await page.locator('mat-step-header').first().evaluate((el) => el.scrollIntoView({ block: 'start' }));
    await page.waitForTimeout(200);
    const form = await step.locator('form').boundingBox();
    assert.ok(form && form.height > TABLET.height - 64, `the first step is taller than the view (${form?.height} px)`);
    await screenshot(page, 'runner-focused-1024x768');
    const save = step.getByRole('button', { name: /^Save step$/ });
    const box = await save.boundingBox();
    assert.ok(box && box.y >= 0 && box.y + box.height <= TABLET.height, `Save step is in view (${JSON.stringify(box)})`);
    assert.ok(box.height >= 56, 'the primary action is 56 px high');

    await menu.click();
    await nav.waitFor({ state: 'visible' });
    assert.equal(await page.getByRole('link', { name: 'Machines' }).isVisible(), true, 'the places open over the runner when asked for');
    await page.context().close();
  });

  test('when an admin opens the competency matrix, then Competencies alone is marked as the current place, and People alone on the people list', async () => {
    const page = await pageAs(admin);
    await page.goto(`${base}/people/competencies`);
    await page.locator('h1').first().waitFor();
    // Each link reads its icon's ligature and then its label: the label is the last line.
    const current = async () => (await page.locator('nav[aria-label=Places] a[aria-current=page]').allInnerTexts()).map((t) => t.trim().split('\n').pop()!);
    assert.deepEqual(await current(), ['Competencies']);
    assert.equal(await page.locator('nav[aria-label=Places] a.mdc-list-item--activated').count(), 1);
    await page.goto(`${base}/people`);
    await page.locator('h1').first().waitFor();
    assert.deepEqual(await current(), ['People']);
    await page.context().close();
  });
});
