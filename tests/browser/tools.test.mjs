// Browser tests of the field tools at phone size: diagnosis from readings, panel balancing and
// shared-neutral circuits.
import { after, before, describe, test } from 'node:test';
import assert from 'node:assert/strict';
import { openApp, phone, shot, start } from './harness.mjs';

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
  test('diagnosis from two readings gives the neutral resistance and a verdict', async () => {
    const { context, page, seen } = await phone(env.browser);
    await openApp(page, env.url);
    await page.click('[data-testid=open-diagnose]');
    assert.ok(await page.isVisible('[data-testid=diagnosis-problems]'), 'asks for readings first');
    await fillReading(page, 0, ['121.4', '119.8', '12.1', '3.0']);
    await fillReading(page, 1, ['114.9', '124.1', '24.4', '3.0']);
    await page.waitForSelector('[data-testid=diagnosis]');
    assert.equal(await page.getAttribute('[data-testid=diagnosis]', 'data-verdict'), 'suspect');
    assert.match(await page.textContent('[data-testid=neutral-ohms-result]'), /^0\.350 Ω$/);
    await shot(page, 'phone-diagnose');
    // A bad entry names its field; the readings stay as typed.
    await page.locator('[data-testid=reading]').nth(1).locator('[data-testid=reading-i1]').fill('lots');
    await page.waitForSelector('[data-testid=diagnosis-problems]');
    assert.match(await page.textContent('[data-testid=diagnosis-problems]'), /readings\[1\]\.l1_a/);
    assert.deepEqual(seen.errors, []);
    await context.close();
  });

  test('balancing lists moves, and applying them balances the panel', async () => {
    const { context, page } = await phone(env.browser);
    await openApp(page, env.url);
    await page.click('[data-testid=new-job]');
    await page.click('[data-testid=tab-loads]');
    for (const id of ['kettle', 'space-heater', 'toaster']) {
      await page.click(`[data-testid=add-${id}]`);
    }
    await page.click('[data-testid=tab-panel]');
    const before = parseFloat(await page.textContent('[data-testid=balance-before]'));
    const after = parseFloat(await page.textContent('[data-testid=balance-after]'));
    assert.ok(after < before, `${after} < ${before}`);
    assert.ok(await page.locator('[data-testid=moves] li').count() > 0);
    await shot(page, 'phone-balance');
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
