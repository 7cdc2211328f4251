// Navigation at phone size: every screen has an address (in the fragment, #/job/<id>/<tab>),
// back and forward move between screens, back closes an open appliance first and never leaves
// the app while a job is open, a reload keeps the screen, an address opens its screen directly
// (online, offline and from a sub-path), and an address naming a job this phone lacks says so.
import { after, before, describe, test } from 'node:test';
import assert from 'node:assert/strict';
import { join } from 'node:path';
import { ROOT, openApp, phone, shot, start } from './harness.mjs';
import { serve } from './server.mjs';

let env;
before(async () => { env = await start(); });
after(async () => { await env?.browser.close(); env?.server.close(); });

const TABS = ['service', 'loads', 'results', 'whatif', 'panel', 'readings'];
const active = (page) => page.$eval('.job-bar .tab.active', (e) => e.getAttribute('data-testid'));
const jobId = (page) => page.evaluate(() => Object.keys(localStorage).find((k) => k.startsWith('tapline.v1.job.')).slice('tapline.v1.job.'.length));

describe('navigation', () => {
  test('back moves from a tab to the job, then to the list; an open appliance closes first; the app is never left', async () => {
    const { context, page, seen } = await phone(env.browser);
    await openApp(page, env.url);
    await page.click('[data-testid=open-job]');
    assert.match(page.url(), /#\/job\/[0-9a-f]+\/results$/);
    await page.click('[data-testid=tab-service]');
    assert.match(page.url(), /\/service$/);
    await page.goBack();
    assert.equal(await active(page), 'tab-results');
    await page.goBack();
    await page.waitForSelector('[data-testid=jobs-page]');
    // Forward returns to the job.
    await page.goForward();
    await page.waitForSelector('[data-testid=job-page]');
    // An appliance opened by a tap has its own address; back closes it and stays on the tab.
    await page.click('[data-testid=tab-loads]');
    await page.locator('[data-testid=load-line]').nth(1).click();
    assert.match(page.url(), /\/appliances\/2$/);
    assert.ok(await page.locator('details.load-details').nth(1).evaluate((d) => d.open));
    await page.goBack();
    assert.equal(await page.locator('details.load-details').nth(1).evaluate((d) => d.open), false);
    assert.equal(await active(page), 'tab-loads');
    assert.match(page.url(), /^http:\/\/127\.0\.0\.1:\d+\//, 'still in the app');
    assert.deepEqual(seen.errors, []);
    await context.close();
  });

  test('a reload keeps the screen, and an address opened directly goes there with the job list beneath', async () => {
    const { context, page } = await phone(env.browser);
    await openApp(page, env.url);
    const id = await jobId(page);
    await page.click('[data-testid=open-job]');
    for (const tab of TABS) {
      await page.click(`[data-testid=tab-${tab}]`);
      await page.reload();
      await page.waitForSelector('[data-testid=job-page]');
      assert.equal(await active(page), `tab-${tab}`, `reload on ${tab}`);
    }
    await page.click('[data-testid=open-cautions]');
    await page.reload();
    await page.waitForSelector('[data-testid=cautions-page]');
    // A link opened in a new tab: the screen it names, and back lands on the job list.
    const other = await context.newPage();
    await other.goto(`${env.url}#/job/${id}/panel`);
    await other.waitForSelector('[data-testid=panel-tab]');
    await other.goBack();
    await other.waitForSelector('[data-testid=jobs-page]');
    // A job this phone does not have: said plainly, with the way to the list.
    await other.goto(`${env.url}#/job/0000dead/results`);
    await other.waitForSelector('[data-testid=missing-page]');
    assert.match(await other.textContent('[data-testid=missing-page]'), /not on this phone/);
    await shot(other, 'phone-missing-job');
    await other.click('[data-testid=missing-to-jobs]');
    await other.waitForSelector('[data-testid=jobs-page]');
    await context.close();
  });

  test('an address opens offline from the service worker, and the app works from a sub-path', async () => {
    const sub = await serve(join(ROOT, 'dist'), 0, '/field/tools/tapline/');
    try {
      const base = `http://127.0.0.1:${sub.address().port}/field/tools/tapline/`;
      const { context, page } = await phone(env.browser);
      await openApp(page, base);
      const id = await jobId(page);
      await page.evaluate(() => navigator.serviceWorker.ready);
      await page.reload();
      await page.waitForSelector('[data-testid=jobs-page]');
      await context.setOffline(true);
      const offline = await context.newPage();
      await offline.goto(`${base}#/job/${id}/readings`);
      await offline.waitForSelector('[data-testid=readings-tab]', { timeout: 20000 });
      await shot(offline, 'phone-offline-subpath-readings');
      await context.setOffline(false);
      await context.close();
    } finally {
      sub.close();
    }
  });
});
