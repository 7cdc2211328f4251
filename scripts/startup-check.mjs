// Start-up check: how long the installed app takes to open offline on a slow phone.
//
// The release build in dist/ is served on 127.0.0.1 and opened once in headless Chromium, so its
// service worker installs and caches every file (as it does on a phone the first time). Then, seven
// times, a new browser process opens the same profile with the network off and the CPU slowed 4×
// through the DevTools protocol (Emulation.setCPUThrottlingRate), and the time from the start of
// navigation until the job list is usable is taken: the first job card is on screen and the
// page's main thread is free again (a task queued right after the card appears has run). The
// median of the seven is checked against the budget below; every run is printed.
//
// Usage: node scripts/startup-check.mjs (after a release build; the test command runs it).
import { chromium } from 'playwright-core';
import { mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join, dirname } from 'node:path';
import { fileURLToPath } from 'node:url';
import { serve } from '../tests/browser/server.mjs';

// Budget for the median cold start, milliseconds: 2000 ms. On the 2-core machines of
// DEVELOPERS.md the median has ranged from about 0.4 s to 1.1 s with the machine otherwise idle,
// depending on the host, and up to 1.8 s with another job running beside it; the budget sits
// above all of them, so that a regression fails while machine noise does not.
// The aim is 500 ms, met in some runs and missed in others: DEVELOPERS.md ("Where start-up time
// goes") shows most of a start is the browser's own work on the page and compiling on first call
// the ~870 functions the first screen runs, which shrinks only with the module.
const BUDGET_MS = 2000;
const AIM_MS = 500;
const RUNS = 7;
const THROTTLE = 4;

const root = join(dirname(fileURLToPath(import.meta.url)), '..');
const CHROMIUM = process.env.CHROMIUM_PATH ?? '/usr/bin/chromium';
const FLAGS = ['--no-sandbox', '--disable-gpu', '--no-first-run', '--disable-background-networking',
  '--disable-component-update', '--disable-sync', '--disable-dev-shm-usage'];
const PHONE = { viewport: { width: 390, height: 844 }, deviceScaleFactor: 3, isMobile: true, hasTouch: true };

// Runs in the page before any of its scripts: notes when the first job card appears, then when a
// task queued behind it runs (the main thread is free to take a tap), and says so on the console,
// so the check waits without polling the page (a poll would itself take the main thread).
const WATCH = () => {
  new MutationObserver((_, observer) => {
    if (document.querySelector('[data-testid=job-card]')) {
      observer.disconnect();
      const card = performance.now();
      setTimeout(() => console.log(`tapline-usable ${card} ${performance.now()}`), 0);
    }
  }).observe(document, { childList: true, subtree: true });
};

const server = await serve(join(root, 'dist'));
const url = `http://127.0.0.1:${server.address().port}/`;
const profile = mkdtempSync(join(tmpdir(), 'tapline-startup-'));
const open = () => chromium.launchPersistentContext(profile, {
  executablePath: CHROMIUM, headless: true, args: FLAGS, serviceWorkers: 'allow', ...PHONE,
});

let status = 0;
try {
  // Install: the first visit caches the app and seeds the demo job.
  {
    const context = await open();
    const page = context.pages()[0] ?? (await context.newPage());
    await page.goto(url);
    await page.waitForSelector('[data-testid=job-card]', { timeout: 30000 });
    await page.evaluate(async () => { await navigator.serviceWorker.ready; });
    await context.close();
  }
  const times = [];
  for (let run = 0; run < RUNS; run += 1) {
    const context = await open();
    await context.setOffline(true);
    const page = context.pages()[0] ?? (await context.newPage());
    await page.addInitScript(WATCH);
    const cdp = await context.newCDPSession(page);
    await cdp.send('Emulation.setCPUThrottlingRate', { rate: THROTTLE });
    const said = page.waitForEvent('console', { predicate: (m) => m.text().startsWith('tapline-usable '), timeout: 30000 });
    await page.goto(url);
    const [card, usable] = (await said).text().split(' ').slice(1).map(Number);
    const controlled = await page.evaluate(() => navigator.serviceWorker.controller !== null);
    if (!controlled) {
      throw new Error('the service worker did not serve the page: the start was not from the installed app');
    }
    console.log(`start ${run + 1}: job card at ${card.toFixed(0)} ms, usable at ${usable.toFixed(0)} ms`);
    times.push(usable);
    await context.close();
  }
  times.sort((a, b) => a - b);
  const median = times[Math.floor(RUNS / 2)];
  console.log(`startup-check: median of ${RUNS} offline cold starts at ${THROTTLE}x CPU slow-down: ${median.toFixed(0)} ms (budget ${BUDGET_MS} ms, aim ${AIM_MS} ms)`);
  if (median > BUDGET_MS) {
    console.error(`startup-check: FAILED: ${median.toFixed(0)} ms is over the ${BUDGET_MS} ms budget`);
    status = 1;
  }
} catch (e) {
  console.error(`startup-check: ${e.message}`);
  status = 1;
} finally {
  server.close();
  rmSync(profile, { recursive: true, force: true });
}
process.exit(status);
