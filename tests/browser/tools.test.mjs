// Browser tests of the field tools at phone size: readings kept in the job and diagnosed, the
// panel schedule and balancing, and shared-neutral circuits.
import { after, before, describe, test } from 'node:test';
import assert from 'node:assert/strict';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { OUTPUT, openApp, phone, shot, start } from './harness.mjs';

let env;
before(async () => { env = await start(); });
after(async () => { await env?.browser.close(); env?.server.close(); });

async function fillReading(page, index, [v1, v2, i1, i2]) {
  const card = page.locator('[data-testid=reading]').nth(index);
  await card.locator('[data-testid=reading-v1]').fill(v1);
  await card.locator('[data-testid=reading-v2]').fill(v2);
  await card.locator('[data-testid=reading-i1]').fill(i1);
  await card.locator('[data-testid=reading-i2]').fill(i2);
}

describe('field tools', () => {
  test('readings are part of the job: diagnosed, kept across a reload, re-tested and compared', async () => {
    const { context, page, seen } = await phone(env.browser);
    await openApp(page, env.url);
    await page.click('[data-testid=open-diagnose]');
    await page.waitForSelector('[data-testid=readings-tab]');
    assert.equal(await page.locator('[data-testid=reading-set]').count(), 1);
    assert.ok(await page.isVisible('[data-testid=diagnosis-problems]'), 'asks for readings first');
    await fillReading(page, 0, ['121.4', '119.8', '12.1', '3.0']);
    await fillReading(page, 1, ['114.9', '124.1', '24.4', '3.0']);
    await page.waitForSelector('[data-testid=diagnosis]');
    assert.equal(await page.getAttribute('[data-testid=diagnosis]', 'data-verdict'), 'suspect');
    assert.match(await page.textContent('[data-testid=neutral-ohms-result]'), /^0\.350 Ω$/);
    await shot(page, 'phone-readings');
    // A bad entry is named beside its field; the readings stay as typed.
    const second = page.locator('[data-testid=reading]').nth(1);
    await second.locator('[data-testid=reading-i1]').fill('lots');
    await page.waitForSelector('[data-testid=diagnosis-problems]');
    assert.match(await second.locator('.field.bad .field-error').textContent(), /must be a number/);
    await second.locator('[data-testid=reading-i1]').fill('24.4');
    await page.waitForSelector('[data-testid=diagnosis]');

    // The readings survive a reload: they were saved with the job.
    await page.reload();
    // A reload keeps the screen: the same job.
    await page.waitForSelector('[data-testid=job-page]');
    await page.click('[data-testid=tab-readings]');
    assert.equal(await page.locator('[data-testid=reading]').nth(1).locator('[data-testid=reading-v2]').inputValue(), '124.1');
    assert.equal(await page.getAttribute('[data-testid=diagnosis]', 'data-verdict'), 'suspect');

    // A re-test after the repair is a new dated set, compared with the first.
    await page.click('[data-testid=add-reading-set]');
    assert.equal(await page.locator('[data-testid=reading-set]').count(), 2);
    const set2 = page.locator('[data-testid=reading-set]').nth(1);
    const fill2 = async (k, v) => {
      const card = set2.locator('[data-testid=reading]').nth(k);
      for (const [id, x] of [['reading-v1', v[0]], ['reading-v2', v[1]], ['reading-i1', v[2]], ['reading-i2', v[3]]]) {
        await card.locator(`[data-testid=${id}]`).fill(x);
      }
    };
    await fill2(0, ['120.9', '121.9', '12.1', '3.0']);
    await fill2(1, ['119.9', '122.3', '24.6', '3.0']);
    await set2.locator('[data-testid=diagnosis]').waitFor();
    assert.equal(await set2.locator('[data-testid=diagnosis]').getAttribute('data-verdict'), 'healthy');
    assert.match(await page.textContent('[data-testid=readings-comparison]'), /First test .*0\.350.* Latest .*0\.032.* less/);
    await shot(page, 'phone-readings-retest');
    // A reading can be removed.
    await set2.locator('[data-testid=add-reading]').click();
    assert.equal(await set2.locator('[data-testid=reading]').count(), 3);
    await set2.locator('[data-testid=remove-reading]').nth(2).click();
    assert.equal(await page.locator('[data-testid=reading-set]').nth(1).locator('[data-testid=reading]').count(), 2);

    // Export the job and import it back: the readings come with it.
    const [download] = await Promise.all([page.waitForEvent('download'), page.click('[data-testid=export-open-job]')]);
    const path = join(OUTPUT, 'exported-readings-job.json');
    await download.saveAs(path);
    const exported = JSON.parse(readFileSync(path, 'utf8'));
    assert.equal(exported.readings.length, 2);
    assert.equal(exported.readings[1].readings[1].l2_n_v, 122.3);
    await page.click('[data-testid=back-to-jobs]');
    await page.setInputFiles('[data-testid=import-file]', path);
    await page.waitForSelector('[data-testid=job-page]');
    await page.click('[data-testid=tab-readings]');
    assert.equal(await page.locator('[data-testid=reading-set]').count(), 2);
    assert.match(await page.textContent('[data-testid=readings-comparison]'), /less/);
    assert.deepEqual(seen.errors, []);
    await context.close();
  });

  test('a schedule filled by position balances, the moves apply with undo and survive a reload', async () => {
    const { context, page, seen } = await phone(env.browser);
    await openApp(page, env.url);
    await page.click('[data-testid=new-job]');
    await page.click('[data-testid=tab-panel]');
    // Four circuits entered on the schedule: three on L1 (positions 1, 2, 5) and one on L2 (3).
    let taps = 0;
    for (const [pos, name, watts] of [['1', 'Kitchen', '1500'], ['2', 'Laundry', '1200'], ['5', 'Bath', '1000'], ['3', 'Hall', '100']]) {
      if ((await page.locator('[data-testid=add-circuit]').getAttribute('open')) === null) {
        await page.click('[data-testid=add-circuit] summary');
        taps += 1;
      }
      await page.fill('[data-testid=new-circuit-position]', pos);
      await page.fill('[data-testid=new-circuit-name]', name);
      await page.fill('[data-testid=new-circuit-watts]', watts);
      await page.click('[data-testid=new-circuit-add]');
      taps += 1;
    }
    assert.ok(taps <= 5, `${taps} taps`);
    const lines = page.locator('[data-testid=schedule-line]');
    assert.equal(await lines.count(), 4);
    const order = await lines.evaluateAll((els) => els.map((e) => [e.dataset.positions, e.dataset.leg]));
    assert.deepEqual(order, [['1', 'L1'], ['2', 'L1'], ['3', 'L2'], ['5', 'L1']]);
    assert.match(await page.textContent('[data-testid=layout-text]'), /positions 1-2 on L1, 3-4 on L2/);
    const before = parseFloat(await page.textContent('[data-testid=balance-before]'));
    const after = parseFloat(await page.textContent('[data-testid=balance-after]'));
    assert.ok(after < before, `${after} < ${before}`);
    const moves = await page.locator('[data-testid=moves] li').allTextContents();
    assert.ok(moves.length > 0);
    assert.ok(moves.every((m) => /position \d+ \(/.test(m) && /(to position \d+ on L\d|with position \d+)/.test(m)), moves.join(' | '));
    // The schedule shows where each moving breaker goes.
    assert.match(await page.locator('[data-testid=schedule-after]').allTextContents().then((t) => t.join(' ')), /→ L2 at \d+/);
    await shot(page, 'phone-schedule');
    // Apply, undo, apply again.
    await page.click('[data-testid=apply-moves]');
    await page.waitForSelector('[data-testid=no-moves]');
    await page.click('[data-testid=undo-edit]');
    await page.waitForSelector('[data-testid=apply-moves]');
    assert.equal(parseFloat(await page.textContent('[data-testid=balance-before]')), before);
    await page.click('[data-testid=apply-moves]');
    await page.waitForSelector('[data-testid=no-moves]');
    assert.equal(parseFloat(await page.textContent('[data-testid=balance-before]')), after);
    assert.equal(await page.locator('[data-testid=schedule-mismatch]').count(), 0);
    const applied = await lines.evaluateAll((els) => els.map((e) => [e.dataset.positions, e.dataset.leg]));
    await shot(page, 'phone-schedule-applied');

    // Reload and find the panel as it was left.
    await page.reload();
    // A reload keeps the screen: the same job.
    await page.waitForSelector('[data-testid=job-page]');
    await page.click('[data-testid=tab-panel]');
    await page.waitForSelector('[data-testid=no-moves]');
    assert.deepEqual(await page.locator('[data-testid=schedule-line]').evaluateAll((els) => els.map((e) => [e.dataset.positions, e.dataset.leg])), applied);

    // A line opens to its fields: mark one to stay, and flip the layout to see the warning.
    await page.locator('[data-testid=schedule-line] summary').first().click();
    await page.locator('[data-testid=circuit-stays]').first().check();
    await page.waitForSelector('[data-testid=schedule-tags]:has-text("stays")');
    await page.check('[data-testid=flip-layout]');
    assert.match(await page.textContent('[data-testid=layout-text]'), /flipped/);
    assert.ok(await page.locator('[data-testid=schedule-mismatch]').count() > 0);
    assert.deepEqual(seen.errors, []);
    await context.close();
  });

  test('balancing appliances added on the loads screen', async () => {
    const { context, page } = await phone(env.browser);
    await openApp(page, env.url);
    await page.click('[data-testid=new-job]');
    await page.click('[data-testid=tab-loads]');
    for (const id of ['kettle', 'space-heater', 'toaster']) {
      await page.click(`[data-testid=add-${id}]`);
    }
    await page.click('[data-testid=tab-panel]');
    assert.equal(await page.locator('[data-testid=schedule-line]').count(), 3);
    const before = parseFloat(await page.textContent('[data-testid=balance-before]'));
    const after = parseFloat(await page.textContent('[data-testid=balance-after]'));
    assert.ok(after < before, `${after} < ${before}`);
    await page.click('[data-testid=apply-moves]');
    await page.waitForSelector('[data-testid=no-moves]');
    assert.equal(parseFloat(await page.textContent('[data-testid=balance-before]')), after);
    await context.close();
  });

  test('a shared neutral with both hots on one leg is flagged loudly', async () => {
    const { context, page } = await phone(env.browser);
    await openApp(page, env.url);
    await page.click('[data-testid=new-job]');
    await page.click('[data-testid=tab-service]');
    await page.click('[data-testid=add-multiwire]');
    await page.click('[data-testid=tab-loads]');
    await page.click('[data-testid=add-kettle]');
    await page.click('[data-testid=add-toaster]');
    const rows = page.locator('[data-testid=load-multiwire]');
    await page.locator('[data-testid=load-line]').first().click();
    await rows.nth(0).fill('A');
    await rows.nth(1).fill('A');
    await page.click('[data-testid=tab-results]');
    const mw = page.locator('[data-testid=multiwire-result]');
    assert.equal(await mw.getAttribute('data-same-leg'), 'true');
    assert.match(await mw.textContent(), /DANGER: every hot is on L1/);
    await shot(page, 'phone-multiwire');
    await context.close();
  });
});
