// Two tabs on one job at phone size: the second save notices the first (the revision stored with
// the job) and asks instead of overwriting; a job deleted in one tab is not brought back by the
// other; the job list follows what the other tab stored.
import { after, before, describe, test } from 'node:test';
import assert from 'node:assert/strict';
import { openApp, phone, shot, start } from './harness.mjs';

let env;
before(async () => { env = await start(); });
after(async () => { await env?.browser.close(); env?.server.close(); });

const stored = (page) => page.evaluate(() => {
  const key = Object.keys(localStorage).find((k) => k.startsWith('tapline.v1.job.'));
  return key ? JSON.parse(localStorage.getItem(key)) : null;
});

describe('two tabs', () => {
  test('a second save asks instead of overwriting, and a deleted job stays deleted', async () => {
    const { context, page: a } = await phone(env.browser);
    await openApp(a, env.url);
    const b = await context.newPage();
    await openApp(b, env.url);
    for (const p of [a, b]) {
      await p.click('[data-testid=open-job]');
      await p.click('[data-testid=tab-service]');
    }
    // A person types only in the tab in front, so each page is brought to the front before it
    // is used (a page left behind may not take input events at once).
    const use = async (p) => { await p.bringToFront(); return p; };
    const first = (await stored(a)).revision;
    await (await use(a)).fill('[data-testid=job-name]', 'Saved in tab A');
    assert.equal((await stored(a)).revision, first + 1);
    await (await use(b)).fill('[data-testid=job-name]', 'Typed in tab B');
    await b.waitForSelector('[data-testid=conflict]');
    assert.match(await b.textContent('[data-testid=conflict]'), /saved in another tab or window/);
    await shot(b, 'phone-two-tabs-conflict');
    assert.equal((await stored(b)).job.name, 'Saved in tab A', 'B did not overwrite A');
    // B's edit is kept as a draft meanwhile; B takes A's version.
    await (await use(b)).click('[data-testid=take-theirs]');
    assert.equal(await b.textContent('[data-testid=job-title]'), 'Saved in tab A');
    // Now B saves on top of what it has seen.
    await (await use(b)).fill('[data-testid=job-name]', 'Then tab B');
    assert.equal((await stored(b)).job.name, 'Then tab B');
    // A has not seen B's save: A's next edit asks, and "save mine" wins knowingly.
    await (await use(a)).fill('[data-testid=job-name]', 'A again');
    await a.waitForSelector('[data-testid=conflict]');
    await (await use(a)).click('[data-testid=keep-mine]');
    assert.equal((await stored(a)).job.name, 'A again');
    // A deletes the job; B's next edit does not bring it back.
    await (await use(a)).click('[data-testid=back-to-jobs]');
    await (await use(a)).click('[data-testid=delete-job]');
    assert.equal(await stored(a), null);
    await (await use(b)).fill('[data-testid=job-name]', 'Edited after the delete');
    await b.waitForSelector('[data-testid=conflict]');
    assert.match(await b.textContent('[data-testid=conflict]'), /deleted in another tab/);
    assert.equal(await stored(b), null, 'not brought back');
    await (await use(b)).click('[data-testid=take-theirs]');
    await b.waitForSelector('[data-testid=jobs-page]');
    assert.equal(await b.locator('[data-testid=job-card]').count(), 0);
    await context.close();
  });

  test('a job renamed in the list opens renamed, and its next edit saves without a conflict', async () => {
    const { context, page } = await phone(env.browser);
    await openApp(page, env.url);
    await page.click('[data-testid=open-job]');
    await page.click('[data-testid=back-to-jobs]');
    await page.click('[data-testid=rename-job]');
    await page.fill('[data-testid=rename-input]', '14 Fern Walk');
    await page.click('[data-testid=rename-save]');
    await page.click('[data-testid=open-job]');
    assert.equal(await page.textContent('[data-testid=job-title]'), '14 Fern Walk');
    await page.click('[data-testid=tab-service]');
    await page.fill('[data-testid=job-notes]', 'gate code 4411 (invented)');
    assert.equal(await page.locator('[data-testid=conflict]').count(), 0);
    const job = (await stored(page)).job;
    assert.equal(job.name, '14 Fern Walk');
    assert.equal(job.notes, 'gate code 4411 (invented)');
    await context.close();
  });
});
