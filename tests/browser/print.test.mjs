// Printing the results: the page names the job, its notes, the neutral as found and the date, and
// no appliance card is split across pages, at Letter and A4 (PDFs and screenshots saved).
import { after, before, describe, test } from 'node:test';
import assert from 'node:assert/strict';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { OUTPUT, openApp, phone, shot, start } from './harness.mjs';

let env;
before(async () => { env = await start(); });
after(async () => { await env?.browser.close(); env?.server.close(); });

describe('print', () => {
  test('the results print with the job, its notes and date, cards whole, at Letter and A4', async () => {
    const { context, page } = await phone(env.browser);
    await openApp(page, env.url);
    await page.click('[data-testid=open-job]');
    await page.click('[data-testid=tab-results]');
    assert.equal(await page.isVisible('[data-testid=print-header]'), false, 'on screen the header stays hidden');
    await page.emulateMedia({ media: 'print' });
    const header = await page.textContent('[data-testid=print-header]');
    assert.match(header, /27 Larkspur Row/);
    assert.match(header, /Invented demo: lights flicker/);
    assert.match(header, /Printed \d{4}-\d\d-\d\d \d\d:\d\d · neutral as found: loose/);
    assert.equal(await page.isVisible('[data-testid=job-bar]'), false);
    const breaks = await page.$$eval('.appliance', (els) => els.map((e) => getComputedStyle(e).breakInside));
    assert.ok(breaks.length > 0 && breaks.every((b) => b === 'avoid'), `break-inside: ${breaks}`);
    await shot(page, 'print-results');
    for (const format of ['Letter', 'A4']) {
      const path = join(OUTPUT, `results-${format}.pdf`);
      await page.pdf({ path, format, printBackground: false });
      const pages = (readFileSync(path, 'latin1').match(/\/Type\s*\/Page[^s]/g) ?? []).length;
      assert.ok(pages >= 1 && pages <= 6, `${format}: ${pages} pages`);
    }
    await context.close();
  });
});
