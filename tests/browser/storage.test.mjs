// Storage faults at phone size: a corrupt stored job is set aside and reported while the others
// load; a full storage refuses a save with a message in plain words and the previous saved
// version survives; blocked storage still opens the demo and says that nothing is saved.
import { after, before, describe, test } from 'node:test';
import assert from 'node:assert/strict';
import { writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { OUTPUT, openApp, phone, start } from './harness.mjs';

let env;
before(async () => { env = await start(); });
after(async () => { await env?.browser.close(); env?.server.close(); });

const jobKeys = (page) => page.evaluate(() => Object.keys(localStorage).filter((k) => k.startsWith('tapline.v1.job.')));

describe('storage faults', () => {
  test('a corrupt stored job is set aside untouched and reported; the others load', async () => {
    const { context, page } = await phone(env.browser);
    await openApp(page, env.url);
    assert.equal((await jobKeys(page)).length, 1);
    await page.evaluate(() => localStorage.setItem('tapline.v1.job.broken', '{"saved_ms": 1, "job": {not json'));
    await page.reload();
    await page.waitForSelector('[data-testid=banner]');
    assert.match(await page.textContent('[data-testid=banner]'), /could not be read and was set aside as tapline\.v1\.aside\.broken/);
    assert.equal(await page.locator('[data-testid=job-card]').count(), 1);
    assert.equal(await page.evaluate(() => localStorage.getItem('tapline.v1.aside.broken')), '{"saved_ms": 1, "job": {not json');
    assert.equal(await page.evaluate(() => localStorage.getItem('tapline.v1.job.broken')), null);
    await context.close();
  });

  test('with storage full a save is refused in plain words and the previous version survives', async () => {
    const { context, page } = await phone(env.browser);
    await openApp(page, env.url);
    const [key] = await jobKeys(page);
    const before = JSON.parse(await page.evaluate((k) => localStorage.getItem(k), key));
    await page.click('[data-testid=open-job]');
    await page.click('[data-testid=tab-service]');
    await page.evaluate(() => {
      window.realSetItem = Storage.prototype.setItem;
      Storage.prototype.setItem = function full() { throw new DOMException('The quota has been exceeded.', 'QuotaExceededError'); };
    });
    await page.fill('[data-testid=job-name]', 'Renamed while full');
    await page.waitForSelector('[data-testid=banner]');
    assert.match(await page.textContent('[data-testid=banner]'), /Could not save: .*Storage may be full; export jobs to keep them/);
    const after = JSON.parse(await page.evaluate((k) => localStorage.getItem(k), key));
    assert.equal(after.job.name, before.job.name);
    assert.equal(await page.locator('[data-testid=banner]').count(), 1, 'each message shows once');
    // Once storage works again the message goes by itself and the edit is saved.
    await page.evaluate(() => { Storage.prototype.setItem = window.realSetItem; });
    await page.fill('[data-testid=job-name]', 'Renamed after');
    await page.waitForSelector('[data-testid=banner]', { state: 'detached' });
    assert.equal(JSON.parse(await page.evaluate((k) => localStorage.getItem(k), key)).job.name, 'Renamed after');
    await context.close();
  });

  test('an import that storage cannot hold is refused with a message, never listed and then lost', async () => {
    const { context, page } = await phone(env.browser);
    await openApp(page, env.url);
    const path = join(OUTPUT, 'import-when-full.json');
    writeFileSync(path, JSON.stringify({ version: 1, name: '4 Birch Row', system: { kind: 'split-phase', volts_to_neutral: 120, frequency_hz: 60 }, loads: [] }));
    await page.evaluate(() => {
      window.realSetItem = Storage.prototype.setItem;
      Storage.prototype.setItem = function full() { throw new DOMException('The quota has been exceeded.', 'QuotaExceededError'); };
    });
    await page.setInputFiles('[data-testid=import-file]', path);
    await page.waitForSelector('[data-testid=banner] >> text=was not added');
    assert.match(await page.textContent('body'), /“4 Birch Row” was not added: the browser has no room to keep it/);
    assert.equal(await page.locator('[data-testid=job-card]').count(), 1);
    // Dismissed, a message goes.
    const before = await page.locator('[data-testid=banner]').count();
    await page.locator('[data-testid=dismiss-banner]').first().click();
    assert.equal(await page.locator('[data-testid=banner]').count(), before - 1);
    await page.evaluate(() => { Storage.prototype.setItem = window.realSetItem; });
    await page.reload();
    assert.equal(await page.locator('[data-testid=job-card]').count(), 1);
    await context.close();
  });

  test('with storage blocked the demo still opens and the app says nothing is saved', async () => {
    const { context, page, seen } = await phone(env.browser);
    await page.addInitScript(() => {
      Object.defineProperty(window, 'localStorage', { get() { throw new DOMException('blocked', 'SecurityError'); } });
    });
    await openApp(page, env.url);
    await page.waitForSelector('[data-testid=banner]');
    assert.match(await page.textContent('[data-testid=banner]'), /not letting Tapline save \(private mode or storage blocked\)/);
    assert.equal(await page.locator('[data-testid=job-card]').count(), 1);
    await page.click('[data-testid=open-job]');
    await page.click('[data-testid=tab-results]');
    await page.waitForSelector('[data-testid=results-tab]');
    assert.deepEqual(seen.errors.filter((e) => !/blocked|SecurityError/.test(e)), []);
    await context.close();
  });
});
