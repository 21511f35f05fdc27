/**
 * The reports and plots opened in a real browser (Debian's chromium through playwright-core):
 * nothing leaves the page, no console error, every name visible, no two labels overlapping,
 * printable to PDF (A4 and letter), a screenshot that is not blank. Run by `npm run test:browser`.
 */
import { mkdtempSync, readFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import type { BrowserContext, Page } from 'playwright-core';
import { afterAll, beforeAll, describe, expect, it } from 'vitest';
import { cli } from '../helpers/cli.js';
import { drawFlowsheet } from '../../src/report/html/drawing.js';
import { DEMOS, inputOf, streamNames, TRAIN } from '../report/solved.js';
import { CHROMIUM, chromiumAvailable, launch, openPage } from './chromium.mjs';

const available = chromiumAvailable();
if (!available) process.stderr.write(`browser tests skipped: no browser at ${CHROMIUM} (install it with: apt-get install -y chromium)\n`);

const dir = mkdtempSync(join(tmpdir(), 'loopclose-browser-'));
let browser: { context: BrowserContext; close(): Promise<void> } | undefined;

beforeAll(async () => {
  if (available) browser = await launch();
});
afterAll(async () => {
  await browser?.close();
});

interface TextBox {
  text: string;
  x: number;
  y: number;
  w: number;
  h: number;
  visible: boolean;
}

/** Every <text> of the drawing with its box on screen. */
async function drawingTexts(page: Page): Promise<TextBox[]> {
  return page.$$eval('.drawing svg text', (els) => els.map((el) => {
    const r = el.getBoundingClientRect();
    // This runs in the page; the test program has no DOM types, so the window is read untyped.
    const s = (globalThis as unknown as { getComputedStyle(e: unknown): { visibility: string; display: string } }).getComputedStyle(el);
    return { text: el.textContent ?? '', x: r.x, y: r.y, w: r.width, h: r.height, visible: s.visibility !== 'hidden' && s.display !== 'none' && r.width > 0 && r.height > 0 };
  }));
}

function overlapping(boxes: TextBox[]): string[] {
  const out: string[] = [];
  const eps = 0.5;
  for (let i = 0; i < boxes.length; i++) {
    for (let j = i + 1; j < boxes.length; j++) {
      const a = boxes[i];
      const b = boxes[j];
      if (a.x + eps < b.x + b.w && b.x + eps < a.x + a.w && a.y + eps < b.y + b.h && b.y + eps < a.y + a.h) out.push(`"${a.text}" / "${b.text}"`);
    }
  }
  return out;
}

/** Distinct colours of a PNG, counted by the browser itself (a canvas in a blank page). */
async function colours(context: BrowserContext, png: Buffer): Promise<number> {
  const page = await context.newPage();
  try {
    await page.setContent('<canvas id="c"></canvas>');
    return await page.evaluate(async (b64) => {
      // This runs in the page; the test program has no DOM types, so the window is read untyped.
      const w = globalThis as any;
      const img = new w.Image();
      img.src = `data:image/png;base64,${b64}`;
      await img.decode();
      const c = w.document.getElementById('c');
      c.width = img.width;
      c.height = img.height;
      const g = c.getContext('2d');
      g.drawImage(img, 0, 0);
      const d = g.getImageData(0, 0, c.width, c.height).data;
      const seen = new Set<number>();
      for (let k = 0; k < d.length && seen.size < 64; k += 4) seen.add((d[k] << 16) | (d[k + 1] << 8) | d[k + 2]);
      return seen.size;
    }, png.toString('base64'));
  } finally {
    await page.close();
  }
}

async function printable(page: Page): Promise<void> {
  for (const format of ['A4', 'Letter']) {
    const pdf = await page.pdf({ format, printBackground: true });
    expect(pdf.subarray(0, 5).toString('latin1')).toBe('%PDF-');
    expect(pdf.length).toBeGreaterThan(5000);
  }
}

describe.skipIf(!available)('reports in a browser', () => {
  for (const file of DEMOS) {
    it(`${file}: nothing leaves the page, no console error, every name visible, labels apart, prints, not blank`, async () => {
      const out = join(dir, `${file.replace(/\W+/g, '-')}.html`);
      expect(cli(['report', file, '--out', out, '--no-date']).code).toBe(0);
      const html = readFileSync(out, 'utf8');
      const { page, outside, errors } = await openPage(browser!.context, html);
      try {
        const texts = await drawingTexts(page);
        const topology = inputOf(file).topology;
        expect(texts.length).toBeGreaterThan(topology.units.length + streamNames(topology).length);
        for (const name of [...topology.units.map((u) => u.name), ...streamNames(topology)]) {
          const t = texts.find((b) => b.text === name);
          expect(t, `name ${name} in the drawing`).toBeDefined();
          expect(t!.visible, `name ${name} visible`).toBe(true);
        }
        expect(overlapping(texts)).toEqual([]);
        // Pointing at a stream and clicking a unit fill the panel with their figures.
        const stream = topology.units[0].outlets[0];
        await page.hover(`.drawing [data-stream="${stream}"] .line`, { force: true });
        await expect.poll(() => page.textContent('#lc-panel')).toContain(`${stream} (`);
        expect(await page.textContent('#lc-panel')).toContain('total [');
        const unit = topology.units[1].name;
        await page.click(`.drawing [data-unit="${unit}"] .shape`, { force: true });
        await expect.poll(() => page.textContent('#lc-panel')).toContain(`${unit} (`);
        // The native tooltip is there without any script.
        expect(await page.$eval(`.drawing [data-unit="${unit}"] > title`, (t) => t.textContent)).toContain(unit);
        await printable(page);
        const png = await page.screenshot({ fullPage: true });
        expect(await colours(browser!.context, png)).toBeGreaterThan(8);
        expect(outside).toEqual([]);
        expect(errors).toEqual([]);
      } finally {
        await page.close();
      }
    });
  }

  it('a report of a result that did not converge opens cleanly and shows the diagnosis, not a stream table', async () => {
    const out = join(dir, 'nc.html');
    expect(cli(['report', 'flowsheets/methanol-pilot.yaml', '--max-passes', '3', '--method', 'wegstein', '--out', out, '--no-date']).code).toBe(3);
    const { page, outside, errors } = await openPage(browser!.context, readFileSync(out, 'utf8'));
    try {
      expect(await page.isVisible('#not-a-solution')).toBe(true);
      expect(await page.$('h2:text-is("Streams")')).toBeNull();
      expect(overlapping(await drawingTexts(page))).toEqual([]);
      await printable(page);
      expect(outside).toEqual([]);
      expect(errors).toEqual([]);
    } finally {
      await page.close();
    }
  });

  it('a plot of a sweep with failed points and the report of that sweep open cleanly, print and are not blank', async () => {
    const sweep = join(dir, 'sweep.csv');
    const r = cli(['sweep', 'flowsheets/methanol-pilot.yaml', '--grid', 'reactor.reactions.0.conversion=0.05:0.35:4', '--grid', 'purge-split.out.recycle=0.9:0.999:3',
      '--report', 'streams.purge.total[kmol/h],streams.recycle.fractions.N2', '--max-passes', '25', '--out', sweep]);
    expect([0, 3]).toContain(r.code);
    const plot = join(dir, 'plot.html');
    expect(cli(['plot', sweep, '--x', 'reactor.reactions.0.conversion', '--y', 'streams.purge.total,streams.recycle.fractions.N2', '--out', plot]).code).toBe(0);
    const report = join(dir, 'sweep.html');
    expect(cli(['report', sweep, '--out', report]).code).toBe(0);
    for (const file of [plot, report]) {
      const { page, outside, errors } = await openPage(browser!.context, readFileSync(file, 'utf8'));
      try {
        const titles = await page.$$eval('svg text', (els) => els.filter((e) => (e.getBoundingClientRect().width > 0)).map((e) => e.textContent ?? ''));
        expect(titles).toContain('streams.purge.total [kmol/h]');
        expect(titles).toContain('reactor.reactions.0.conversion');
        await printable(page);
        const png = await page.screenshot({ fullPage: true });
        expect(await colours(browser!.context, png)).toBeGreaterThan(8);
        expect(outside).toEqual([]);
        expect(errors).toEqual([]);
      } finally {
        await page.close();
      }
    }
  });

  it('a larger train (nested recycles, long names, an unknown unit type): every name visible, no labels overlapping', async () => {
    const input = inputOf('flowsheets/ammonia-loop.yaml', { maxPasses: 2 });
    input.topology = TRAIN;
    const html = `<!DOCTYPE html><html><head><meta charset="utf-8"></head><body><div class="drawing">${await drawFlowsheet(input)}</div></body></html>`;
    const { page, outside, errors } = await openPage(browser!.context, html);
    try {
      const texts = await drawingTexts(page);
      for (const name of [...TRAIN.units.map((u) => u.name), ...streamNames(TRAIN)]) expect(texts.find((b) => b.text === name && b.visible), name).toBeDefined();
      expect(overlapping(texts)).toEqual([]);
      expect(outside).toEqual([]);
      expect(errors).toEqual([]);
    } finally {
      await page.close();
    }
  });

  it('the overlap check itself works: two labels drawn on top of each other are caught', async () => {
    const html = '<!DOCTYPE html><html><body><div class="drawing"><svg width="200" height="60"><text x="10" y="30">first-label</text><text x="40" y="34">second-label</text><text x="10" y="55">apart</text></svg></div></body></html>';
    const { page } = await openPage(browser!.context, html);
    const found = overlapping(await drawingTexts(page));
    await page.close();
    expect(found).toEqual(['"first-label" / "second-label"']);
  });

  it('the route check itself works: a page that reaches out is caught', async () => {
    const { page, outside } = await openPage(browser!.context, '<!DOCTYPE html><html><body><img src="http://elsewhere.invalid/x.png"></body></html>');
    await page.close();
    expect(outside).toEqual(['http://elsewhere.invalid/x.png']);
  });
});
