import { describe, expect, it } from 'vitest';
import { readFileSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { cli, tempFile } from '../helpers/cli.js';
import { BUTANE_LOOP } from '../helpers/butane-loop.js';

// The closed-form recycle-purge loop (test/flowsheet/loop.test.ts): 100 mol/s of 95 % n-butane
// and 5 % N2, X = 0.3 per pass, all isobutane taken out. Purge total = p (1-X) F (1-z) / (X + p - pX)
// + F z; at 20 mol/s (72 kmol/h), p = 0.0803571.
const FILE = `${BUTANE_LOOP}targets:
  - { output: streams.purge.total, value: 72 kmol/h, by: purge-split.out.purge, within: "0.01:0.5" }
`;

describe('the HTML report gives a target in the unit it was written in', () => {
  it('reached 72 kmol/h (not the SI 20) at purge 0.0803571, as the text report says', () => {
    const f = tempFile('target.yaml', FILE);
    const out = join(dirname(f), 'target.html');
    const r = cli(['report', f, '--out', out, '--no-date']);
    expect(r.code).toBe(0);
    const html = readFileSync(out, 'utf8');
    const section = html.slice(html.indexOf('>Targets<'));
    const cells = [...section.matchAll(/<td[^>]*>([^<]*)<\/td>/g)].slice(0, 4).map((m) => m[1]);
    expect(cells[0]).toBe('72 kmol/h');
    expect(cells[2]).toBe('0.0803571');
    const text = cli(['solve', f]);
    expect(text.stdout).toMatch(/reached 72 kmol\/h by purge-split\.out\.purge = 0\.0803571/);
  });

  it('a target whose last value tried has no steady state gives no output figure (the once-through reactor short of hydrogen)', () => {
    // 100 mol/s of 50 % CO2, 45 % H2: CO2 + 3 H2 -> CH3OH + H2O has a steady state only for X <= 0.3
    // (H2 out = 45 - 150 X); CO2 out = 30 mol/s would need X = 0.4.
    const f = tempFile('short.yaml', `components: { CO2: {}, H2: {}, CH3OH: {}, H2O: {}, N2: {} }
feeds:
  fresh: { composition: { CO2: 0.5, H2: 0.45, N2: 0.05 }, molar-flow: 100 mol/s, T: 500 K, P: 10 bar }
units:
  reactor: { type: reactor, in: fresh, out: r-out, T: 500 K, reactions: [ { equation: "CO2 + 3 H2 -> CH3OH + H2O", key: CO2, conversion: 0.5 } ] }
targets:
  - { output: streams.r-out.flows.CO2, value: 30 mol/s, by: reactor.reactions.0.conversion, within: "0.1:0.6" }
`);
    const out = join(dirname(f), 'short.html');
    const r = cli(['report', f, '--out', out, '--no-date']);
    expect(r.code).toBe(4);
    const html = readFileSync(out, 'utf8');
    const section = html.slice(html.indexOf('>Targets<'));
    const cells = [...section.matchAll(/<td[^>]*>([^<]*)<\/td>/g)].slice(0, 4).map((m) => m[1]);
    expect(cells[0]).toBe('no solution at the last value tried');
    expect(cells[3]).toBe('no');
  });
});
