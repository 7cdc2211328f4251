// Browser tests at phone size in headless Chromium from Debian.
import { after, before, describe, test } from 'node:test';
import assert from 'node:assert/strict';
import { readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { OUTPUT, ROOT, openApp, phone, shot, start } from './harness.mjs';
import { serve } from './server.mjs';

let env;
before(async () => { env = await start(); });
after(async () => { await env?.browser.close(); env?.server.close(); });

const local = (seen) => [...seen.hosts].filter((h) => h !== '127.0.0.1');

describe('the app shell', () => {
  test('loads at phone size with no console errors and no request beyond 127.0.0.1', async () => {
    const { context, page, seen } = await phone(env.browser);
    await openApp(page, env.url);
    assert.equal(await page.textContent('[data-testid=app-title]'), 'Tapline');
    assert.match(await page.textContent('[data-testid=caution-line]'), /qualified persons/);
    // The demo job is there on first start, with its status line from the engine.
    assert.match(await page.textContent('[data-testid=job-status]'), /^neutral found loose \(1\.5 Ω\) · neutral \d+ A · if it opens: /);
    await shot(page, 'phone-jobs');
    assert.deepEqual(seen.errors, []);
    assert.deepEqual(local(seen), []);
    await context.close();
  });

  test('fits 360 px with no sideways scrolling and touch targets of at least 44 px', async () => {
    const { context, page } = await phone(env.browser, { viewport: { width: 360, height: 740 } });
    await openApp(page, env.url);
    for (const tab of [null, 'tab-service', 'tab-loads', 'tab-results', 'tab-whatif', 'tab-panel', 'tab-readings']) {
      if (tab === null) {
        await page.click('[data-testid=open-job]');
      } else {
        await page.click(`[data-testid=${tab}]`);
      }
      const width = await page.evaluate(() => document.documentElement.scrollWidth);
      assert.ok(width <= 360, `${tab}: page is ${width} px wide`);
      const small = await page.$$eval('button, select, input[type=text], input[type=search]', (els) =>
        els.filter((e) => e.offsetParent !== null)
          .map((e) => [e.getAttribute('data-testid') ?? e.textContent, e.getBoundingClientRect().height])
          .filter(([, h]) => h < 44));
      assert.deepEqual(small, [], `${tab}: targets under 44 px`);
    }
    await context.close();
  });
});

describe('jobs', () => {
  test('eight appliances go in with one tap each onto the chosen leg; the new line is shown and focused', async () => {
    const { context, page, seen } = await phone(env.browser, { viewport: { width: 390, height: 844 } });
    await openApp(page, env.url);
    let taps = 0;
    const tap = async (sel) => { await page.click(sel); taps += 1; };
    await tap('[data-testid=new-job]');
    await tap('[data-testid=tab-loads]');
    for (const id of ['kettle', 'tv', 'fridge', 'microwave']) await tap(`[data-testid=add-${id}]`);
    await page.selectOption('[data-testid=add-target]', 'L2-N');
    taps += 1;
    for (const id of ['toaster', 'computer', 'led-lamp', 'dryer']) await tap(`[data-testid=add-${id}]`);
    assert.equal(await page.locator('[data-testid=load-row]').count(), 8);
    assert.ok(taps <= 11, `${taps} taps for eight appliances`);
    // The chosen leg stayed chosen; the 240 V dryer went across both legs.
    assert.equal(await page.locator('[data-testid=group-L1] [data-testid=load-row]').count(), 4);
    assert.equal(await page.locator('[data-testid=group-L2] [data-testid=load-row]').count(), 3);
    assert.equal(await page.locator('[data-testid=group-L1-L2] [data-testid=load-row]').count(), 1);
    // The line just added is on screen and has the focus.
    const focused = await page.evaluate(() => document.activeElement?.getAttribute('data-testid'));
    assert.equal(focused, 'load-line');
    assert.match(await page.evaluate(() => document.activeElement.textContent), /Clothes dryer|Dryer/i);
    // On screen and not under the sticky job bar.
    const box = await page.evaluate(() => {
      const r = document.activeElement.getBoundingClientRect();
      return [r.top, r.bottom, innerHeight, document.querySelector('[data-testid=job-bar]').getBoundingClientRect().bottom];
    });
    assert.ok(box[0] >= box[3] - 1 && box[1] <= box[2], `new line at ${box}`);
    // Eight closed lines keep the page short.
    const height = await page.evaluate(() => document.documentElement.scrollHeight);
    assert.ok(height < 2600, `page is ${height} px tall`);
    await shot(page, 'phone-eight-appliances');
    assert.deepEqual(seen.errors, []);
    await context.close();
  });

  test('create a job, add loads from the library and see live results', async () => {
    const { context, page, seen } = await phone(env.browser);
    await openApp(page, env.url);
    await page.click('[data-testid=new-job]');
    await page.click('[data-testid=tab-loads]');
    await page.fill('[data-testid=library-search]', 'space');
    await page.click('[data-testid=add-space-heater]');
    await page.selectOption('[data-testid=add-target]', 'L2-N');
    await page.fill('[data-testid=library-search]', '');
    await page.click('[data-testid=add-tv]');
    assert.equal(await page.locator('[data-testid=load-row]').count(), 2);
    // Grouped by leg, each group with its total (rated watts; the leg current from the engine).
    assert.match(await page.textContent('[data-testid=total-L1]'), /^1500 W rated on · leg now 12\.5 A$/);
    assert.match(await page.textContent('[data-testid=total-L2]'), /^120 W rated on/);
    await shot(page, 'phone-loads');
    await page.click('[data-testid=tab-results]');
    const names = await page.locator('[data-testid=appliance-result] .appliance-name').allTextContents();
    assert.deepEqual(names, ['Space heater', 'Television']);
    // 1500 W at 120 V on a stiff source: 12.5 A on L1 (the engine's number, formatted).
    assert.match(await page.textContent('[data-testid=leg-L1]'), /12\.5 A/);
    await shot(page, 'phone-results');
    assert.deepEqual(seen.errors, []);
    await context.close();
  });

  test('the what-if explores a loose and an open neutral without changing the job; the job records the neutral as found', async () => {
    const { context, page } = await phone(env.browser);
    await openApp(page, env.url);
    await page.click('[data-testid=open-job]');
    const stored = () => page.evaluate(() => {
      const key = Object.keys(localStorage).find((k) => k.startsWith('tapline.v1.job.'));
      return JSON.parse(localStorage.getItem(key)).job.neutral;
    });
    const before = await stored();
    await page.click('[data-testid=tab-whatif]');
    assert.ok(await page.isVisible('[data-testid=caution-gate]'), 'cautions come first');
    await page.click('[data-testid=accept-cautions]');
    assert.match(await page.textContent('[data-testid=neutral-found-line]'), /as found on site: loose, 1\.5 Ω \(lights dim/);
    // The what-if opens on an open neutral.
    assert.match(await page.textContent('[data-testid=what-if-heading]'), /If the neutral opens/);
    const ifOpen = await page.$$eval('[data-testid=what-if-appliance]', (els) => els.map((e) => e.getAttribute('data-outcome')));
    assert.ok(ifOpen.includes('likely_damage'), `outcomes if open: ${ifOpen}`);
    assert.ok(await page.isVisible('[data-testid=what-if-tag]'), 'a what-if says it is one');
    // "As found" is the job's own state, and is not called a what-if.
    await page.click('[data-testid=neutral-as-found]');
    assert.match(await page.textContent('[data-testid=what-if-heading]'), /As found: neutral loose, 1\.5 Ω/);
    assert.equal(await page.isVisible('[data-testid=what-if-tag]'), false);
    await page.click('[data-testid=neutral-loose]');
    await page.fill('[data-testid=neutral-ohms]', 'lots');
    assert.match(await page.textContent('[data-testid=whatif-tab] .field-error'), /Loose-connection resistance: must be a number from 0 to/);
    await page.fill('[data-testid=neutral-ohms]', '3');
    await page.waitForSelector('[data-testid=sweep-plot] path');
    assert.ok(await page.isVisible('[data-testid=what-if-tag]'), 'a what-if says it is one');
    await shot(page, 'phone-whatif-loose');
    // One line per connection and voltage, each listing its appliances, with its own dash;
    // every appliance is on a line.
    const lines = await page.$$eval('[data-testid=plot-line]', (els) => els.map((e) => [e.textContent, e.querySelector('line').getAttribute('stroke-dasharray')]));
    assert.equal(new Set(lines.map((l) => l[1])).size, lines.length, `dashes ${lines}`);
    // Tick labels are at least 12 px on a phone.
    const tick = await page.$eval('[data-testid=sweep-plot] .tick', (t) => t.getBoundingClientRect().height);
    assert.ok(tick >= 12, `tick labels ${tick} px`);
    // A tap near the right edge reads out every appliance with the neutral open.
    const svg = await page.locator('[data-testid=sweep-plot] svg[role=img]').boundingBox();
    await page.mouse.click(svg.x + svg.width - 2, svg.y + svg.height / 2);
    assert.equal(await page.textContent('[data-testid=readout-ohms]'), 'open');
    const rows = await page.$$eval('[data-testid=readout-row]', (els) => els.map((e) => e.textContent));
    const names = await page.$$eval('[data-testid=plot-line]', (els) => els.map((e) => e.textContent.split(': ')[1]).join(', ').split(', '));
    assert.equal(rows.length, names.length);
    for (const n of names) assert.ok(rows.some((r) => r.startsWith(n)), `${n} in the readout`);
    // The slider reads the plot too, at the solid end.
    await page.fill('[data-testid=plot-slider]', '0');
    assert.equal(await page.textContent('[data-testid=readout-ohms]'), '0 Ω (solid)');
    assert.deepEqual(await stored(), before, 'exploring saves nothing');
    // Results are the job as found: the loose 1.5 Ω neutral, not the 3 Ω explored.
    await page.click('[data-testid=tab-results]');
    const asFound = await page.$$eval('[data-testid=appliance-result]', (els) => els.map((e) => e.getAttribute('data-outcome')));
    assert.ok(!asFound.includes('stall'), `outcomes as found: ${asFound}`);
    await page.reload();
    await page.waitForSelector('[data-testid=results-tab]');
    assert.deepEqual(await stored(), before, 'nor after a reload');
    // Recording the neutral as found open is an edit of the job, on the Service tab.
    await page.click('[data-testid=tab-service]');
    await page.selectOption('[data-testid=found-state]', 'open');
    await page.fill('[data-testid=neutral-found-how]', 'no neutral at the meter base, 2026-12-02');
    assert.equal((await stored()).state, 'open');
    await page.click('[data-testid=tab-results]');
    const outcomes = await page.$$eval('[data-testid=appliance-result]', (els) => els.map((e) => e.getAttribute('data-outcome')));
    assert.ok(outcomes.includes('likely_damage') && outcomes.includes('stall'), `outcomes open: ${outcomes}`);
    // The homeowner summary says it in plain words, from the same results.
    await page.click('[data-testid=owner-as-found]');
    assert.match(await page.textContent('[data-testid=owner-summary]'), /Aquarium heater: .* far too high, it is likely damaged/);
    await shot(page, 'phone-results-open');
    await page.click('[data-testid=back-to-jobs]');
    assert.match(await page.textContent('[data-testid=job-status]'), /^neutral found open · /);
    await context.close();
  });

  test('a value written survives a reload; a bad value comes back as typed with its problem, and the last good job stays saved', async () => {
    const { context, page } = await phone(env.browser);
    await openApp(page, env.url);
    await page.click('[data-testid=open-job]');
    await page.click('[data-testid=tab-service]');
    await page.fill('[data-testid=job-name]', '9 Quarry Lane');
    await page.click('[data-testid=tab-loads]');
    // Each appliance is one line; tapping it opens its details.
    await page.locator('[data-testid=load-line]').first().click();
    await page.locator('[data-testid=load-watts]').first().fill('lots');
    assert.match(await page.locator('.field.bad .field-error').first().textContent(), /must be a number from 0.1 to/);
    await page.click('[data-testid=tab-results]');
    assert.ok(await page.isVisible('[data-testid=problems]'));
    await page.reload();
    // A reload keeps the screen: the same job, on the results, with its problems.
    await page.waitForSelector('[data-testid=problems]');
    assert.equal(await page.textContent('[data-testid=job-title]'), '9 Quarry Lane');
    // The saved job is the last valid version; the draft is kept beside it.
    const saved = await page.evaluate(() => {
      const key = Object.keys(localStorage).find((k) => k.startsWith('tapline.v1.job.'));
      return JSON.parse(localStorage.getItem(key)).job.loads[0].watts;
    });
    assert.equal(saved, 1500);
    await page.click('[data-testid=tab-loads]');
    assert.equal(await page.locator('[data-testid=load-watts]').first().inputValue(), 'lots');
    assert.match(await page.locator('.field.bad .field-error').first().textContent(), /must be a number from 0.1 to/);
    // Fixed, it saves, and the draft is no longer needed.
    await page.locator('[data-testid=load-watts]').first().fill('1200');
    const drafts = await page.evaluate(() => Object.keys(localStorage).filter((k) => k.startsWith('tapline.v1.draft.')).length);
    assert.equal(drafts, 0);
    await context.close();
  });

  test('duplicate, rename, delete with undo, and search', async () => {
    const { context, page } = await phone(env.browser);
    await openApp(page, env.url);
    await page.click('[data-testid=duplicate-job]');
    assert.equal(await page.locator('[data-testid=job-card]').count(), 2);
    await page.locator('[data-testid=rename-job]').first().click();
    await page.fill('[data-testid=rename-input]', 'Shop at 3 Kiln Yard, ÉCOLE');
    await page.click('[data-testid=rename-save]');
    await page.fill('[data-testid=job-search]', 'kiln');
    assert.equal(await page.locator('[data-testid=job-card]').count(), 1);
    // Case is folded beyond ASCII too (a job's name is the user's words, in any script).
    await page.fill('[data-testid=job-search]', 'école');
    assert.equal(await page.locator('[data-testid=job-card]').count(), 1);
    await page.fill('[data-testid=job-search]', '');
    await page.locator('[data-testid=delete-job]').first().click();
    assert.equal(await page.locator('[data-testid=job-card]').count(), 1);
    await page.click('[data-testid=undo-delete]');
    assert.equal(await page.locator('[data-testid=job-card]').count(), 2);
    await context.close();
  });

  test('export a job and import it back; a broken file shows the engine errors and changes nothing', async () => {
    const { context, page } = await phone(env.browser);
    await openApp(page, env.url);
    const [download] = await Promise.all([page.waitForEvent('download'), page.click('[data-testid=export-job]')]);
    const path = join(OUTPUT, 'exported-job.json');
    await download.saveAs(path);
    const exported = JSON.parse(readFileSync(path, 'utf8'));
    assert.equal(exported.version, 1);
    assert.match(exported.name, /Larkspur/);
    await page.setInputFiles('[data-testid=import-file]', path);
    await page.waitForSelector('[data-testid=job-page]');
    await page.click('[data-testid=back-to-jobs]');
    assert.equal(await page.locator('[data-testid=job-card]').count(), 2);

    const broken = join(OUTPUT, 'broken-job.json');
    writeFileSync(broken, JSON.stringify({ version: 1, system: { kind: 'split-phase' }, loads: [{ connect: 'L9-N', model: 'resistive', watts: -3 }] }));
    await page.setInputFiles('[data-testid=import-file]', broken);
    await page.waitForSelector('[data-testid=import-problems]');
    const text = await page.textContent('[data-testid=import-problems]');
    assert.match(text, /Appliance 1, connected: /);
    assert.match(text, /Appliance 1, watts: must be a number from 0.1 to/);
    assert.equal(await page.locator('[data-testid=job-card]').count(), 2);
    await shot(page, 'phone-import-error');
    await context.close();
  });
});

describe('storage trouble', () => {
  test('with storage blocked the app says so and still computes', async () => {
    const { context, page, seen } = await phone(env.browser);
    await context.addInitScript(() => {
      Object.defineProperty(window, 'localStorage', { get() { throw new DOMException('blocked', 'SecurityError'); } });
    });
    await openApp(page, env.url);
    assert.match(await page.textContent('[data-testid=banner]'), /not letting Tapline save/);
    await page.click('[data-testid=open-job]');
    assert.ok(await page.locator('[data-testid=appliance-result]').count() > 0);
    assert.deepEqual(seen.errors, []);
    await context.close();
  });

  test('a corrupt or newer stored job is set aside and reported; the others load', async () => {
    const { context, page } = await phone(env.browser);
    await context.addInitScript(() => {
      if (!sessionStorage.getItem('seeded-bad')) {
        sessionStorage.setItem('seeded-bad', '1');
        localStorage.setItem('tapline.v1.job.broken', '{"saved_ms": 1, "job": ');
        localStorage.setItem('tapline.v1.job.future', JSON.stringify({ saved_ms: 2, job: { version: 9, name: 'From the future' } }));
      }
    });
    await openApp(page, env.url);
    const banners = await page.locator('[data-testid=banner]').allTextContents();
    assert.equal(banners.filter((b) => /set aside/.test(b)).length, 2, banners.join('\n'));
    assert.equal(await page.locator('[data-testid=job-card]').count(), 1);
    const kept = await page.evaluate(() => [localStorage.getItem('tapline.v1.aside.broken'), localStorage.getItem('tapline.v1.aside.future')]);
    assert.equal(kept[0], '{"saved_ms": 1, "job": ');
    assert.match(kept[1], /From the future/);
    await context.close();
  });
});

describe('offline', () => {
  test('after the service worker is active, a reload with the network off still opens the app', async () => {
    // A server of its own, stopped before the reload, so nothing can answer but the cache.
    const server = await serve(join(ROOT, 'dist'));
    const url = `http://127.0.0.1:${server.address().port}/`;
    const { context, page } = await phone(env.browser);
    await openApp(page, url);
    await page.evaluate(async () => { await navigator.serviceWorker.ready; });
    if (!(await page.evaluate(() => navigator.serviceWorker.controller !== null))) {
      await page.reload();
      await page.waitForSelector('[data-testid=jobs-page]');
    }
    assert.ok(await page.evaluate(() => navigator.serviceWorker.controller !== null), 'the worker controls the page');
    await context.setOffline(true);
    const closed = new Promise((done) => server.close(done));
    server.closeAllConnections();
    await closed;
    await page.reload();
    await page.waitForSelector('[data-testid=job-card]', { timeout: 20000 });
    await page.click('[data-testid=open-job]');
    assert.ok(await page.locator('[data-testid=appliance-result]').count() > 0);
    await shot(page, 'phone-offline');
    await context.close();
  });
});

describe('entry on site', () => {
  test('the job bar stays on screen, an empty search says so, and removing an appliance can be undone', async () => {
    const { context, page, seen } = await phone(env.browser);
    await openApp(page, env.url);
    await page.click('[data-testid=open-job]');
    await page.click('[data-testid=tab-loads]');
    await page.fill('[data-testid=library-search]', 'zzz');
    assert.match(await page.textContent('[data-testid=library-empty]'), /No appliance in the library matches/);
    await page.fill('[data-testid=library-search]', '');
    const names = async () => page.locator('[data-testid=load-name]').evaluateAll((els) => els.map((e) => e.value));
    const before = await names();
    // Scroll to the bottom: the tabs are still on screen.
    await page.evaluate(() => window.scrollTo(0, document.body.scrollHeight));
    const bar = await page.locator('[data-testid=job-bar]').boundingBox();
    assert.ok(bar && bar.y >= -1 && bar.y < 5, `job bar at ${bar?.y}`);
    await page.locator('[data-testid=load-line]').last().click();
    await page.locator('[data-testid=remove-load]').last().click();
    assert.equal((await names()).length, before.length - 1);
    assert.match(await page.textContent('[data-testid=undo-edit-bar]'), /Removed “/);
    await page.click('[data-testid=undo-edit]');
    assert.deepEqual((await names()).sort(), [...before].sort());
    // A later edit ends the undo: undoing then would throw the later edit away.
    await page.locator('[data-testid=load-line]').last().click();
    await page.locator('[data-testid=remove-load]').last().click();
    await page.locator('[data-testid=load-line]').first().click();
    await page.locator('[data-testid=load-name]').first().fill('Kept name');
    assert.equal(await page.locator('[data-testid=undo-edit-bar]').count(), 0);
    assert.equal((await names()).length, before.length - 1);
    assert.deepEqual(seen.errors, []);
    await context.close();
  });
});
