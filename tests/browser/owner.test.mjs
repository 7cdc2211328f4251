// The homeowner view at phone size: a drawing with one wire per leg and the neutral and one box
// per appliance, whose outcomes follow the engine as the neutral is shown found, loose and open;
// a summary naming every appliance with the engine's outcome; a second language with no message
// left untranslated; and the page to leave behind, printed at Letter and A4.
import { after, before, describe, test } from 'node:test';
import assert from 'node:assert/strict';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { OUTPUT, openApp, phone, shot, start } from './harness.mjs';

let env;
before(async () => { env = await start(); });
after(async () => { await env?.browser.close(); env?.server.close(); });

const outcomes = (page, sel) => page.$$eval(sel, (els) => els.map((e) => e.getAttribute('data-outcome')));

describe('homeowner view', () => {
  test('the drawing and the summary follow the engine in every neutral state', async () => {
    const { context, page, seen } = await phone(env.browser, { viewport: { width: 360, height: 740 } });
    await openApp(page, env.url);
    await page.click('[data-testid=open-job]');
    await page.click('[data-testid=owner-as-found]');
    const names = await page.$$eval('[data-testid=appliance-result] .appliance-name', (els) => els.map((e) => e.textContent));
    assert.equal(await page.locator('[data-testid=diagram-leg]').count(), 2);
    assert.equal(await page.locator('[data-testid=diagram-neutral]').count(), 1);
    assert.equal(await page.locator('[data-testid=diagram-appliance]').count(), names.length);
    // As found: the boxes carry the outcomes of the results (the engine's report as found).
    assert.deepEqual(await outcomes(page, '[data-testid=diagram-appliance]'), await outcomes(page, '[data-testid=appliance-result]'));
    const lines = await page.$$eval('[data-testid=owner-appliance]', (els) => els.map((e) => e.textContent));
    assert.equal(lines.length, names.length);
    names.forEach((n, i) => assert.ok(lines[i].startsWith(n), `${lines[i]} names ${n}`));
    assert.match(await page.textContent('[data-testid=owner-urgent]'), /urgent to repair/);
    await shot(page, 'phone-owner-found');
    // Opens: the series path is marked, and each box has the outcome the what-if tab lists.
    await page.click('[data-testid=owner-open]');
    assert.ok(await page.isVisible('[data-testid=diagram-neutral-open]'));
    const series = await page.$$eval('[data-testid=diagram-appliance]', (els) => els.map((e) => [e.getAttribute('data-connect'), e.classList.contains('series')]));
    for (const [connect, marked] of series) assert.equal(marked, connect.endsWith('-N'), `${connect}`);
    const drawnOpen = await outcomes(page, '[data-testid=diagram-appliance]');
    assert.notDeepEqual(drawnOpen, await outcomes(page, '[data-testid=appliance-result]'), 'opening changes outcomes');
    await shot(page, 'phone-owner-open');
    await page.click('[data-testid=tab-whatif]');
    if (await page.isVisible('[data-testid=accept-cautions]')) await page.click('[data-testid=accept-cautions]');
    assert.match(await page.textContent('[data-testid=what-if-heading]'), /If the neutral opens/);
    // The what-if lists the appliances switched on; the drawing shows the one switched off too.
    assert.deepEqual(await outcomes(page, '[data-testid=what-if-appliance]'), drawnOpen.filter((o) => o !== 'off'));
    await page.click('[data-testid=tab-results]');
    // Tapping an appliance reads its line.
    await page.locator('[data-testid=diagram-appliance]').first().click();
    assert.ok((await page.textContent('[data-testid=owner-explain]')).startsWith(names[0]));
    assert.deepEqual(seen.errors, []);
    await context.close();
  });

  test('in Spanish every string is translated, and the page to leave behind prints at Letter and A4', async () => {
    const { context, page } = await phone(env.browser);
    await openApp(page, env.url);
    await page.click('[data-testid=open-job]');
    await page.click('.owner-settings > summary');
    await page.fill('[data-testid=owner-tech]', 'Ana Ruiz');
    await page.fill('[data-testid=owner-licence]', 'E-12345 (invented)');
    await page.selectOption('[data-testid=owner-lang]', 'es');
    const text = await page.textContent('[data-testid=homeowner-summary]');
    assert.match(text, /Para el propietario/);
    assert.match(text, /Preparado por Ana Ruiz, licencia E-12345/);
    assert.doesNotMatch(text, /\b(owner|outcome|short|toggle|diagram|settings|print)\.[a-z_.]+/, 'no message id left');
    for (const state of ['as-found', 'loose', 'open']) {
      await page.click(`[data-testid=owner-${state}]`);
      const t = await page.textContent('[data-testid=homeowner-summary]');
      assert.doesNotMatch(t, /\b(owner|outcome|short|toggle|diagram)\.[a-z_.]+/, `${state}: no message id left`);
      assert.doesNotMatch(t, /voltage OK|If the neutral|Right now/, `${state}: no English left`);
    }
    await page.reload();
    await page.waitForSelector('[data-testid=owner-summary]');
    assert.match(await page.textContent('[data-testid=homeowner-summary]'), /Para el propietario/, 'the language is kept');
    await page.emulateMedia({ media: 'print' });
    assert.equal(await page.isVisible('.owner-settings'), false);
    assert.ok(await page.isVisible('.sign-space'));
    await shot(page, 'print-owner-es');
    for (const format of ['Letter', 'A4']) {
      const path = join(OUTPUT, `owner-${format}.pdf`);
      await page.pdf({ path, format });
      const pages = (readFileSync(path, 'latin1').match(/\/Type\s*\/Page[^s]/g) ?? []).length;
      assert.ok(pages >= 1 && pages <= 8, `${format}: ${pages} pages`);
    }
    await context.close();
  });
});
