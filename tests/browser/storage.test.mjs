// Storage faults at phone size: a corrupt stored job is set aside and reported while the others
// load; a full storage refuses a save with a message in plain words and the previous saved
// version survives; blocked storage still opens the demo and says that nothing is saved; a job
// and settings stored by the first release (no revision, two settings) read, and their stored
// text stays as it was until an edit saves the job in today's form.
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

  test('a job and settings stored by the first release read, and stay as stored until an edit saves them anew', async () => {
    const { context, page, seen } = await phone(env.browser);
    await openApp(page, env.url);
    // The first release stored {saved_ms, job} without a revision, and settings of two keys; its
    // jobs had no neutral.found. (The shapes are this project's own earlier storage schema.)
    const oldJob = JSON.stringify({ saved_ms: 1764000000000, job: { version: 1, name: '12 Larch Close', notes: '',
      system: { kind: 'split-phase', volts_to_neutral: 120, frequency_hz: 60 },
      neutral: { state: 'loose', ohms: 1.5 },
      loads: [{ name: 'Porch lamp', connect: 'L1-N', model: 'lamp', watts: 60, rated_v: 120, power_factor: 1, on: true },
        { name: 'Chest freezer', connect: 'L2-N', model: 'motor', watts: 400, rated_v: 120, power_factor: 0.8, on: true }] } });
    const oldSettings = '{"units":"m","cautions_seen":true}';
    await page.evaluate(([job, settings]) => {
      localStorage.clear();
      localStorage.setItem('tapline.v1.seeded', 'true');
      localStorage.setItem('tapline.v1.job.first-release', job);
      localStorage.setItem('tapline.v1.settings', settings);
    }, [oldJob, oldSettings]);
    await page.reload();
    await page.waitForSelector('[data-testid=job-card]');
    assert.equal(await page.locator('[data-testid=job-card]').count(), 1);
    assert.match(await page.textContent('[data-testid=job-card]'), /12 Larch Close/);
    assert.equal(await page.locator('[data-testid=banner]').count(), 0, 'nothing set aside or reported');
    // Opened and read, nothing is written back: the old copy stays until an edit is saved.
    await page.click('[data-testid=open-job]');
    await page.click('[data-testid=tab-results]');
    await page.waitForSelector('[data-testid=results-tab]');
    await page.click('[data-testid=tab-service]');
    assert.equal(await page.evaluate(() => localStorage.getItem('tapline.v1.job.first-release')), oldJob);
    assert.equal(await page.evaluate(() => localStorage.getItem('tapline.v1.settings')), oldSettings);
    assert.equal(await page.inputValue('[data-testid=found-ohms]'), '1.5');
    assert.equal(await page.inputValue('[data-testid=units]'), 'm', 'the old settings read');
    // The first edit saves the job in today's form: a revision, the edit, every old field kept.
    await page.fill('[data-testid=job-name]', '12 Larch Close, rear unit');
    await page.waitForFunction(() => JSON.parse(localStorage.getItem('tapline.v1.job.first-release')).revision === 1);
    const saved = JSON.parse(await page.evaluate(() => localStorage.getItem('tapline.v1.job.first-release')));
    const was = JSON.parse(oldJob);
    assert.equal(saved.job.name, '12 Larch Close, rear unit');
    assert.deepEqual(saved.job.loads, was.job.loads);
    assert.deepEqual(saved.job.neutral, was.job.neutral);
    assert.deepEqual(saved.job.system, was.job.system);
    assert.deepEqual(seen.errors, []);
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
