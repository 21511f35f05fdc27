// Makes the pictures of the README (`npm run docs:screenshots`, after a build): the report of
// the ammonia demo and a plot of the tour's sweep, taken with the browser setup of the browser
// tests (Debian's chromium through playwright-core). Each PNG is kept under 300 kB.
import { spawnSync } from 'node:child_process';
import { mkdtempSync, readFileSync, statSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { dirname, join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import { chromiumAvailable, CHROMIUM, launch, openPage } from '../test/browser/chromium.mjs';

const root = resolve(dirname(fileURLToPath(import.meta.url)), '..');
const work = mkdtempSync(join(tmpdir(), 'loopclose-docs-'));
const LIMIT = 300 * 1024;

function loopclose(args, okCodes = [0]) {
  const r = spawnSync(process.execPath, [join(root, 'bin', 'loopclose.js'), ...args], { cwd: root, encoding: 'utf8' });
  if (!okCodes.includes(r.status)) throw new Error(`loopclose ${args.join(' ')} exited ${r.status}: ${r.stderr}`);
}

if (!chromiumAvailable()) {
  process.stderr.write(`no browser at ${CHROMIUM}: install it with apt-get install -y chromium\n`);
  process.exit(1);
}

const report = join(work, 'loop.html');
loopclose(['report', 'flowsheets/ammonia-loop.yaml', '--out', report, '--no-date']);
const sweep = join(work, 'conversion.csv');
loopclose(['sweep', 'flowsheets/methanol-pilot.yaml', '--grid', 'reactor.reactions.0.conversion=0.15:0.35:21',
  '--report', 'streams.purge.flows.H2[kmol/h],streams.recycle.fractions.N2,loop.recycle-ratio,reactor.conversion.CO2', '--out', sweep]);
const plot = join(work, 'plot.html');
loopclose(['plot', sweep, '--x', 'reactor.reactions.0.conversion', '--y', 'streams.purge.flows.H2,streams.recycle.fractions.N2', '--out', plot]);

const browser = await launch({ width: 1100, height: 760 });
try {
  const shots = [
    { html: report, out: 'docs/report.png', clip: async (page) => page.screenshot({ path: join(root, 'docs/report.png'), clip: { x: 0, y: 0, width: 1100, height: 760 } }) },
    { html: plot, out: 'docs/sweep-plot.png', clip: async (page) => (await page.$('.plot svg')).screenshot({ path: join(root, 'docs/sweep-plot.png') }) },
  ];
  for (const s of shots) {
    const { page, outside, errors } = await openPage(browser.context, readFileSync(s.html, 'utf8'));
    await s.clip(page);
    await page.close();
    if (outside.length || errors.length) throw new Error(`${s.out}: requests ${outside.join(', ')}; errors ${errors.join('; ')}`);
    const size = statSync(join(root, s.out)).size;
    if (size > LIMIT) throw new Error(`${s.out} is ${size} bytes, over ${LIMIT}`);
    process.stdout.write(`${s.out}: ${size} bytes\n`);
  }
} finally {
  await browser.close();
}
