import { describe, expect, it } from 'vitest';
import { reportHtml, reportSvg } from '../../src/report/html/page.js';
import { CAUTION } from '../../src/report/format.js';
import { esc } from '../../src/report/html/markup.js';
import { textWidth } from '../../src/report/html/layout.js';
import { DEMOS, inputOf, streamNames, svgTexts } from './solved.js';
import { validateText } from '../../src/flowsheet/validate.js';
import { solveFlowsheet } from '../../src/flowsheet/solve.js';
import { reportInputOf } from '../../src/report/html/adapter.js';

/** Any reference to something outside the page: src/href/xlink:href/url()/@import with a scheme or a protocol-relative address. */
const OUTSIDE = /(?:\b(?:src|href|xlink:href|action|poster|data)\s*=\s*["']?\s*(?:[a-z][a-z0-9+.-]*:|\/\/))|url\(\s*["']?\s*(?:https?:|\/\/)|@import/i;

describe('HTML report of the demo flowsheets', () => {
  for (const file of DEMOS) {
    it(`${file}: self-contained, under 2 MB, status first, every unit and stream drawn, the same bytes twice`, async () => {
      const input = inputOf(file);
      expect(input.status).toBe('converged');
      const html = await reportHtml(input);
      expect(html.startsWith('<!DOCTYPE html>')).toBe(true);
      expect(OUTSIDE.test(html)).toBe(false);
      expect(/https?:\/\//.test(html.replace(/xmlns(:xlink)?="http:\/\/www\.w3\.org\/[0-9/a-z]+"/g, ''))).toBe(false);
      expect(Buffer.byteLength(html, 'utf8')).toBeLessThan(2 * 1024 * 1024);
      expect(html.indexOf('Status: converged')).toBeGreaterThan(0);
      expect(html.indexOf('Status: converged')).toBeLessThan(html.indexOf('<h2>Streams'));
      const svg = html.slice(html.indexOf('<svg'), html.indexOf('</svg>'));
      const texts = svgTexts(svg);
      for (const u of input.topology.units) expect(texts).toContain(u.name);
      for (const s of streamNames(input.topology)) expect(texts).toContain(s);
      expect(html).toContain(CAUTION);
      expect(await reportHtml(input)).toBe(html);
      expect(await reportHtml(inputOf(file))).toBe(html);
    });
  }

  it('the stream table shows flows in the display unit: the ammonia makeup of 2400 Nm3/h is 107.08 kmol/h within 0.1 %', async () => {
    // Molar volume of an ideal gas at 273.15 K and 101.325 kPa: 22.413 969 54 L/mol (CODATA 2018
    // recommended values, Tiesinga et al., Rev. Mod. Phys. 93, 025010 (2021)); 2400 / 22.41397 =
    // 107.076 kmol/h. The real-gas volume at normal conditions differs by well under 0.1 %.
    const html = await reportHtml(inputOf('flowsheets/ammonia-loop.yaml'));
    const row = /<tr><th scope="row">total \[kmol\/h\]<\/th><td class="n">([^<]+)<\/td>/.exec(html);
    expect(row).not.toBeNull();
    expect(Math.abs(Number(row![1]) - 2400 / 22.41397) / 107.076).toBeLessThan(1e-3);
  });

  it('another --flow-unit is used in the headers and the numbers', async () => {
    const html = await reportHtml(inputOf('flowsheets/ammonia-loop.yaml', { flowUnit: 'mol/s' }));
    const row = /<tr><th scope="row">total \[mol\/s\]<\/th><td class="n">([^<]+)<\/td>/.exec(html);
    expect(row).not.toBeNull();
    expect(Math.abs(Number(row![1]) - (2400 / 22.41397) / 3.6) / 29.74).toBeLessThan(1e-3);
  });

  it('a standard-volume flow unit says beside the numbers that it is the ideal-gas volume at its reference', async () => {
    // The makeup is given as 2400 Nm3/h real-gas volume; shown in Nm3/h the report's flows are
    // ideal-gas volumes (2399.0), as the text output says: the page must say so too.
    const html = await reportHtml(inputOf('flowsheets/ammonia-loop.yaml', { flowUnit: 'Nm3/h' }));
    expect(html).toContain('flows in Nm3/h (ideal-gas volume at 0 degC, 101.325 kPa');
    const plain = await reportHtml(inputOf('flowsheets/ammonia-loop.yaml'));
    expect(plain).toContain('flows in kmol/h, T in');
  });

  it('a result that did not converge is shown as a diagnosis: status, message, last iterate labelled, no stream table', async () => {
    const input = inputOf('flowsheets/methanol-pilot.yaml', { maxPasses: 3 });
    expect(input.status).toBe('not-converged');
    const html = await reportHtml(input);
    expect(html).toContain('Status: not-converged');
    expect(html).toContain('this is not a solution');
    expect(html).toContain('Last iterate of the tear streams (NOT A SOLUTION)');
    expect(html).not.toContain('<h2>Streams');
    expect(html).not.toContain('<h2>Balance');
    expect(html).toContain(esc(input.message!));
    // The drawing is there, with names but no values in its tooltips.
    const svg = html.slice(html.indexOf('<svg'), html.indexOf('</svg>'));
    for (const u of input.topology.units) expect(svgTexts(svg)).toContain(u.name);
    expect(svg).toContain('no values: the result is not-converged, not a solution');
    expect(svg).not.toMatch(/total \[kmol\/h\]: /);
  });

  it('every numeric unit figure is shown with a label, energy figures included when present and absent otherwise', async () => {
    // Absent: a file whose components have no thermal data has no energy balance.
    const { model } = validateText('plain.yaml', `
components:
  A: { Tc: 190.6 K, Pc: 46 bar, omega: 0.011, formula: C2H4 }
  B: { Tc: 305 K, Pc: 49 bar, omega: 0.1, formula: C4H8 }
feeds:
  fresh: { flows: { A: 10 mol/s }, T: 300 K, P: 20 bar }
units:
  mix: { type: mixer, in: [fresh, recycle], out: r-in, T: 300 K }
  rx: { type: reactor, in: r-in, out: r-out, reactions: [ { equation: "2 A -> B", key: A, conversion: 0.3 } ] }
  sep: { type: separator, in: r-out, out: { product: { B: 1 }, gas: rest } }
  split: { type: splitter, in: gas, out: { purge: 0.025, recycle: rest } }
`);
    const plain = await reportHtml(reportInputOf(solveFlowsheet(model)));
    expect(plain).not.toContain('duty');
    expect(plain).not.toContain('enthalpy flow');
    expect(plain).not.toContain('<h3>Energy</h3>');
    expect(plain).toContain('<th scope="row">to purge</th><td class="n">0.025000</td>');
    // Present: the ammonia demo (built-in components carry their data).
    const input = inputOf('flowsheets/ammonia-loop.yaml');
    const units = input.result.units as Record<string, Record<string, unknown>>;
    expect(typeof units.chiller.duty).toBe('number');
    units.chiller.duty = -1.5e6;
    units.converter.heatLoss = 2500;
    const html = await reportHtml(input);
    expect(html).toContain('<th scope="row">vapor fraction</th>');
    expect(html).toContain('<th scope="row">duty</th><td class="n">-1500.0 kW</td>');
    expect(html).toContain('<th scope="row">heat loss</th><td class="n">2500.0</td>');
    expect(html).toContain('enthalpy flow [kW]');
    expect(html).toContain('<h3>Energy</h3>');
    expect(html).toMatch(/<th scope="row">duty \[kW\]<\/th><td class="n">-?[0-9.]+<\/td>/);
  });

  it('the drawing alone is a standalone SVG with its legend', async () => {
    const input = inputOf('flowsheets/benzene-hydrogenation.yaml');
    const svg = await reportSvg(input);
    expect(svg.startsWith('<?xml version="1.0" encoding="UTF-8"?>\n<svg xmlns="http://www.w3.org/2000/svg"')).toBe(true);
    const texts = svgTexts(svg);
    expect(texts).toContain('Legend');
    expect(texts).toContain('tear stream (two bars: where the solver cuts the loop)');
    expect(texts).toContain('recycle stream (dashed)');
    // Tears and recycles carry their classes (the legend's line styles).
    for (const t of input.topology.tears) expect(svg).toMatch(new RegExp(`<g class="[^"]*\\btear\\b[^"]*" data-stream="${t}"`));
    for (const r of input.topology.recycles) expect(svg).toMatch(new RegExp(`<g class="[^"]*\\brecycle\\b[^"]*" data-stream="${r}"`));
  });

  it('text from the file is escaped', async () => {
    const input = inputOf('flowsheets/ammonia-loop.yaml');
    input.title = 'Loop <script>alert(1)</script> & "more"';
    const html = await reportHtml(input);
    expect(html).not.toContain('<script>alert(1)');
    expect(html).toContain('Loop &lt;script&gt;alert(1)&lt;/script&gt; &amp; &quot;more&quot;');
  });

  it('a long title widens the drawing so that its heading is not cut off', async () => {
    const input = inputOf('flowsheets/ammonia-loop.yaml');
    input.title = 'A very long title '.repeat(12).trim();
    const svg = await reportSvg(input);
    const width = Number(/<svg[^>]* width="([\d.]+)"/.exec(svg)![1]);
    expect(width).toBeGreaterThanOrEqual(textWidth(`${input.title} - ${input.file} (converged)`, 13));
  });
});
