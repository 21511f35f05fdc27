// Debian's chromium driven by playwright-core: the launch used by the browser tests and by
// `npm run docs:screenshots`. No browser is downloaded: /usr/bin/chromium comes from apt-get.
import { existsSync, mkdtempSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';

export const CHROMIUM = process.env.LOOPCLOSE_CHROMIUM || '/usr/bin/chromium';

export const ARGS = [
  '--headless', '--no-sandbox', '--disable-gpu', '--disable-quic', '--no-first-run',
  '--disable-background-networking', '--disable-component-update', '--disable-sync',
];

export function chromiumAvailable() {
  return existsSync(CHROMIUM);
}

/**
 * A browser context in a fresh user-data folder (removed by close()).
 * @param {{ width?: number, height?: number }} [viewport]
 */
export async function launch(viewport = { width: 1200, height: 900 }) {
  const { chromium } = await import('playwright-core');
  const userDataDir = mkdtempSync(join(tmpdir(), 'loopclose-chromium-'));
  const context = await chromium.launchPersistentContext(userDataDir, {
    executablePath: CHROMIUM,
    args: ARGS,
    headless: true,
    viewport,
    deviceScaleFactor: 1,
  });
  return {
    context,
    async close() {
      await context.close();
      rmSync(userDataDir, { recursive: true, force: true });
    },
  };
}

/** The address a page is served at: a name that cannot resolve, so nothing can reach out by mistake. */
export const PAGE_URL = 'http://report.loopclose.invalid/page.html';

/**
 * Opens HTML as the only thing the page may load: every request is routed, the page itself is
 * answered from memory, anything else is refused and recorded.
 * @param {import('playwright-core').BrowserContext} context
 * @param {string} html
 */
export async function openPage(context, html) {
  const page = await context.newPage();
  const outside = [];
  const errors = [];
  page.on('console', (m) => {
    if (m.type() === 'error') errors.push(m.text());
  });
  page.on('pageerror', (e) => errors.push(String(e)));
  await page.route('**/*', async (route) => {
    const url = route.request().url();
    if (url === PAGE_URL) await route.fulfill({ status: 200, contentType: 'text/html; charset=utf-8', body: html });
    else {
      outside.push(url);
      await route.abort();
    }
  });
  await page.goto(PAGE_URL, { waitUntil: 'load' });
  return { page, outside, errors };
}
