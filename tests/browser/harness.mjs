// Shared set-up for the browser tests: the static server, Debian's Chromium driven by
// playwright-core (never a downloaded browser), a phone-sized context, and checks that every
// request stays on 127.0.0.1 and the console stays free of errors.
import { chromium } from 'playwright-core';
import { mkdirSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { serve } from './server.mjs';

const here = dirname(fileURLToPath(import.meta.url));
export const ROOT = join(here, '..', '..');
export const OUTPUT = join(here, 'output');
mkdirSync(OUTPUT, { recursive: true });

export const CHROMIUM = process.env.CHROMIUM_PATH ?? '/usr/bin/chromium';
const FLAGS = [
  '--no-sandbox', '--disable-gpu', '--disable-quic', '--no-first-run', '--disable-background-networking',
  '--disable-component-update', '--disable-sync', '--disable-dev-shm-usage',
];
export const PHONE = { viewport: { width: 390, height: 844 }, deviceScaleFactor: 3, isMobile: true, hasTouch: true };

export async function start() {
  const server = await serve(join(ROOT, 'dist'));
  const browser = await chromium.launch({ executablePath: CHROMIUM, headless: true, args: FLAGS });
  const url = `http://127.0.0.1:${server.address().port}/`;
  return { server, browser, url };
}

/** A fresh phone context and page with request and console watchers. */
export async function phone(browser, options = {}) {
  const context = await browser.newContext({ ...PHONE, acceptDownloads: true, ...options });
  const page = await context.newPage();
  const seen = { hosts: new Set(), errors: [] };
  page.on('request', (r) => seen.hosts.add(new URL(r.url()).hostname));
  page.on('console', (m) => { if (m.type() === 'error') seen.errors.push(m.text()); });
  page.on('pageerror', (e) => seen.errors.push(e.message));
  return { context, page, seen };
}

/** Opens the app and waits for the job list. */
export async function openApp(page, url) {
  await page.goto(url);
  await page.waitForSelector('[data-testid=jobs-page]', { timeout: 20000 });
}

export function shot(page, name) {
  return page.screenshot({ path: join(OUTPUT, `${name}.png`), fullPage: true });
}
