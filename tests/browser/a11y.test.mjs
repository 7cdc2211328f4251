// Accessibility at phone size: axe-core (from npm) injected into every main screen finds no
// serious or critical problem and no content outside a landmark ("region"). Only this test's own
// browser context lifts the Content-Security-Policy, to inject axe; the app keeps it everywhere
// else (the shell test checks that no request leaves 127.0.0.1).
import { after, before, describe, test } from 'node:test';
import assert from 'node:assert/strict';
import { join } from 'node:path';
import { ROOT, openApp, phone, start } from './harness.mjs';

let env;
before(async () => { env = await start(); });
after(async () => { await env?.browser.close(); env?.server.close(); });

const AXE = join(ROOT, 'node_modules', 'axe-core', 'axe.min.js');

async function audit(page, screen) {
  if (!(await page.evaluate(() => typeof window.axe !== 'undefined'))) {
    await page.addScriptTag({ path: AXE });
  }
  const violations = await page.evaluate(async () => {
    const r = await window.axe.run(document, { resultTypes: ['violations'] });
    return r.violations.map((v) => ({ id: v.id, impact: v.impact, nodes: v.nodes.slice(0, 3).map((n) => n.target.join(' ')) }));
  });
  const bad = violations.filter((v) => v.impact === 'serious' || v.impact === 'critical' || v.id === 'region');
  assert.deepEqual(bad, [], `${screen}: ${JSON.stringify(bad, null, 1)}`);
}

describe('accessibility', () => {
  test('every main screen passes axe-core with no serious, critical or region finding', async () => {
    const { context, page } = await phone(env.browser, { bypassCSP: true });
    await openApp(page, env.url);
    await audit(page, 'jobs');
    await page.click('[data-testid=open-job]');
    for (const tab of ['service', 'loads', 'results', 'whatif', 'panel', 'readings']) {
      await page.click(`[data-testid=tab-${tab}]`);
      await page.waitForSelector(`[data-testid=${tab}-tab]`);
      await audit(page, tab);
    }
    await page.click('[data-testid=back-to-jobs]');
    await page.click('[data-testid=open-cautions]');
    await audit(page, 'cautions');
    await context.close();
  });

  test('outside the audit the Content-Security-Policy stays in force: an injected script does not run', async () => {
    const { context, page } = await phone(env.browser);
    await openApp(page, env.url);
    await page.addScriptTag({ content: 'window.injected = true;' }).catch(() => {});
    assert.equal(await page.evaluate(() => window.injected === true), false);
    await context.close();
  });
});
