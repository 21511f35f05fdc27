/**
 * Hard cases while solving: very high recycle ratios, tiny purges, components at zero flow,
 * all-liquid and all-vapor condensers, a flash near a mixture critical point, hydrogen's
 * negative acentric factor, very low and very high meter pressures; and how a run that is no
 * solution ends (not-converged exit 3, infeasible exit 4, internal error exit 1).
 */
import { spawnSync } from 'node:child_process';
import { readdirSync } from 'node:fs';
import { dirname } from 'node:path';
import { describe, expect, it } from 'vitest';
import { validateText } from '../../src/flowsheet/validate.js';
import { solveFlowsheet, type FlowsheetResult } from '../../src/flowsheet/solve.js';
import { elementClosure } from '../helpers/balance.js';
import { resultObject, solveText } from '../../src/report/solve.js';
import { BIN, ROOT, cli, tempFile } from '../helpers/cli.js';
import { nonFinitePaths } from './gen.js';

/**
 * Reactant A (methanol) with inert I (nitrogen): fresh feed FA, FI; per-pass conversion X of
 * 2 CH3OH -> CH3OCH3 + H2O; both products removed by the separator; fraction p of the gas purged. Balances around the
 * mixer, reactor, separator and splitter (Felder and Rousseau, Elementary Principles of
 * Chemical Processes, 3rd ed., Section 4.7, recycle and purge (from memory)) give
 *   R_A = a FA / (1 - a) with a = (1 - p)(1 - X),   R_I = (1 - p) FI / p.
 */
function purgeLoop(X: number, p: number, FA = 10, FI = 0.2): string {
  return `
components: { CH3OH: {}, CH3OCH3: {}, H2O: {}, N2: {} }
feeds:
  fresh: { flows: { CH3OH: ${FA} mol/s, N2: ${FI} mol/s }, T: 300 K, P: 20 bar }
units:
  mix: { type: mixer, in: [fresh, recycle], out: r-in }
  reactor: { type: reactor, in: r-in, out: r-out, reactions: [ { equation: "2 CH3OH -> CH3OCH3 + H2O", key: CH3OH, conversion: ${X} } ] }
  sep: { type: separator, in: r-out, out: { product: { CH3OCH3: 1, H2O: 1 }, gas: rest } }
  split: { type: splitter, in: gas, out: { purge: ${p}, recycle: rest } }
`;
}

function closedForm(X: number, p: number, FA = 10, FI = 0.2) {
  const a = (1 - p) * (1 - X);
  return { RA: (a * FA) / (1 - a), RI: ((1 - p) * FI) / p };
}

function expectSolution(r: FlowsheetResult): void {
  expect(r.status, r.message).toBe('converged');
  expect(elementClosure(r)).toBeLessThanOrEqual(1e-9);
  for (const s of r.streams.values()) for (const v of s.flows) expect(v).toBeGreaterThanOrEqual(0);
  expect(nonFinitePaths(resultObject(r))).toEqual([]);
}

describe('extreme recycle', () => {
  it('recycle ratio above 100 (X = 0.005, p = 0.002): the closed form to 1e-8', () => {
    const { model } = validateText('loop.yaml', purgeLoop(0.005, 0.002));
    const r = solveFlowsheet(model);
    expectSolution(r);
    const { RA, RI } = closedForm(0.005, 0.002);
    const rec = r.streams.get('recycle')!;
    expect(Math.abs(rec.flows[0] - RA) / RA).toBeLessThan(1e-8);
    expect(Math.abs(rec.flows[3] - RI) / RI).toBeLessThan(1e-8);
    expect(r.loop.recycleRatio).toBeGreaterThan(100);
  });

  it('a purge fraction of 1e-4: the inert builds up 10^4-fold, closed form to 1e-8', () => {
    const { model } = validateText('loop.yaml', purgeLoop(0.25, 1e-4));
    const r = solveFlowsheet(model);
    expectSolution(r);
    const { RI } = closedForm(0.25, 1e-4);
    expect(RI).toBeGreaterThan(1999);
    const rec = r.streams.get('recycle')!;
    expect(Math.abs(rec.flows[3] - RI) / RI).toBeLessThan(1e-8);
  });

  it('a purge fraction of 1e-4 with direct substitution alone does not converge in 500 passes and says so', () => {
    const { model } = validateText('loop.yaml', purgeLoop(0.25, 1e-4));
    const r = solveFlowsheet(model, { method: 'direct', maxPasses: 500 });
    expect(r.status).toBe('not-converged');
    expect(r.worst?.[0].name).toMatch(/^recycle\.N2$/);
    const text = solveText(r);
    expect(text).not.toMatch(/^Streams/m);
    expect(text).toMatch(/last iterate of the tear streams/);
    expect(text).toMatch(/try: another method/);
  });
});

describe('components at zero flow', () => {
  it('a component in no feed and formed nowhere stays exactly zero, and its balance is closed', () => {
    const text = purgeLoop(0.25, 0.05).replace('N2: {} }', 'N2: {}, Ar: {} }');
    const r = solveFlowsheet(validateText('zero.yaml', text).model);
    expectSolution(r);
    for (const s of r.streams.values()) expect(s.flows[4]).toBe(0);
    expect(r.balance.components.Ar).toEqual({ in: 0, out: 0, generated: 0, closure: 0 });
  });
});

describe('condensers at the ends of the phase diagram', () => {
  const condenserLoop = (T: string, P: string, feed: string) => `
components: { H2: {}, N2: {}, H2O: {}, CH3OH: {} }
feeds:
  fresh: { composition: { ${feed} }, molar-flow: 2 mol/s, T: 300 K, P: 50 bar }
units:
  mix: { type: mixer, in: [fresh, recycle], out: c-in }
  cool: { type: condenser, in: c-in, T: ${T}, P: ${P}, vapor: gas, liquid: liquid }
  split: { type: splitter, in: gas, out: { purge: 0.1, recycle: rest } }
`;

  it('all liquid: water and methanol at 300 K and 50 bar: no vapor, the liquid takes the feed', () => {
    const r = solveFlowsheet(validateText('liq.yaml', condenserLoop('300 K', '50 bar', 'H2O: 0.5, CH3OH: 0.5')).model);
    // Either a converged all-liquid state or a clear statement that the flash finds two
    // liquids (SRK with k_ij = 0 for water-methanol); never a made-up vapor.
    if (r.status === 'converged') {
      expectSolution(r);
      expect(r.streams.get('gas')!.total).toBe(0);
      expect(r.streams.get('liquid')!.total).toBeCloseTo(2, 12);
    } else {
      expect(r.status).toBe('invalid');
      expect(r.message).toMatch(/two liquid phases/);
    }
  });

  it('all liquid: pure water at 300 K and 50 bar', () => {
    const r = solveFlowsheet(validateText('liq.yaml', condenserLoop('300 K', '50 bar', 'H2O: 1')).model);
    expectSolution(r);
    expect(r.streams.get('gas')!.total).toBe(0);
    expect(r.streams.get('recycle')!.total).toBe(0);
    expect(r.streams.get('liquid')!.total).toBeCloseTo(2, 12);
    expect(r.units.get('cool')!.figures.find((f) => f.key === 'vaporFraction')!.value).toBe(0);
  });

  it('all vapor: hydrogen and nitrogen at 300 K: no liquid, the purge takes all', () => {
    const r = solveFlowsheet(validateText('vap.yaml', condenserLoop('300 K', '50 bar', 'H2: 0.75, N2: 0.25')).model);
    expectSolution(r);
    expect(r.streams.get('liquid')!.total).toBe(0);
    expect(r.streams.get('purge')!.total).toBeCloseTo(2, 9);
    expect(r.units.get('cool')!.notes.join(' ')).toMatch(/vapor/);
  });
});

describe('a flash near the mixture critical point', () => {
  // Methane + n-butane at 310 K has its mixture critical point near 130 bar (SRK); the
  // K-value warm start of a loop is the path by which a flash can slide to the trivial
  // solution (K -> 1). Every answer is a true split (phases apart), a single phase, or a
  // run that says it is no solution; never a split with both phases alike.
  for (const P of [110, 120, 125, 128, 130, 132, 135]) {
    it(`CH4 0.7 / nC4H10 0.3 in a loop at 310 K, ${P} bar`, () => {
      const text = `
components: { CH4: {}, nC4H10: {} }
feeds:
  fresh: { composition: { CH4: 0.7, nC4H10: 0.3 }, molar-flow: 1 mol/s, T: 310 K, P: ${P} bar }
units:
  mix: { type: mixer, in: [fresh, recycle], out: d-in }
  drum: { type: flash, in: d-in, T: 310 K, P: ${P} bar, vapor: gas, liquid: liquid }
  split: { type: splitter, in: gas, out: { purge: 0.5, recycle: rest } }
`;
      const r = solveFlowsheet(validateText('crit.yaml', text).model);
      expect(['converged', 'not-converged', 'invalid']).toContain(r.status);
      expect(nonFinitePaths(resultObject(r))).toEqual([]);
      if (r.status !== 'converged') {
        expect(r.message).toBeTruthy();
        return;
      }
      expectSolution(r);
      const y = r.streams.get('gas')!;
      const x = r.streams.get('liquid')!;
      if (y.total > 0 && x.total > 0) {
        const d = Math.abs(y.fractions[0] - x.fractions[0]);
        expect(d).toBeGreaterThan(1e-4);
      }
    });
  }
});

describe('hydrogen and extreme meter pressures', () => {
  const meter = (P: string, gas = 'H2: 1') => `
components: { H2: {}, N2: {} }
feeds:
  f: { composition: { ${gas} }, meter: { flow: 10 m3/h, pressure: ${P}, temperature: 300 K } }
`;

  it('hydrogen (acentric factor -0.216 in the table): Z above 1 and rising with pressure at 300 K, both equations', () => {
    // 300 K is far above hydrogen's Boyle temperature (about 110 K (from memory)), so Z > 1
    // and dZ/dP > 0 at every pressure; a negative omega must not upset the alpha function.
    for (const eos of ['SRK', 'PR']) {
      let last = 1;
      for (const P of ['10 bar', '100 bar', '300 bar', '1000 bar']) {
        const { model } = validateText('h2.yaml', meter(P).replace('components:', `thermo: { eos: ${eos} }\ncomponents:`));
        const r = solveFlowsheet(model);
        expect(r.status).toBe('converged');
        expect(r.feeds[0].Z, `${eos} ${P}`).toBeGreaterThan(last);
        expect(r.feeds[0].phase).toBe('vapor');
        last = r.feeds[0].Z;
      }
      expect(last).toBeLessThan(2);
    }
  });

  it('hydrogen and nitrogen at 1000 bar and 1 mbar: finite, positive, and ideal in the low-pressure limit', () => {
    for (const gas of ['H2: 1', 'H2: 0.75, N2: 0.25', 'N2: 1']) {
      const hi = solveFlowsheet(validateText('hi.yaml', meter('1000 bar', gas)).model);
      expect(hi.status).toBe('converged');
      expect(hi.feeds[0].Z).toBeGreaterThan(1);
      expect(Number.isFinite(hi.feeds[0].molarFlow)).toBe(true);
      const lo = solveFlowsheet(validateText('lo.yaml', meter('1 mbar', gas)).model);
      expect(lo.status).toBe('converged');
      // Z -> 1 as P -> 0 (the virial expansion: Z = 1 + B P / RT + ...); at 100 Pa, |B P / RT| < 1e-5.
      expect(Math.abs(lo.feeds[0].Z - 1)).toBeLessThan(1e-5);
      expect(lo.feeds[0].molarFlow).toBeGreaterThan(0);
      expect(nonFinitePaths(resultObject(hi))).toEqual([]);
      expect(nonFinitePaths(resultObject(lo))).toEqual([]);
    }
  });
});

describe('how a run that is no solution ends (CLI)', () => {
  it('not-converged: exit 3, largest residuals by stream and component, last iterate, history, what to try; no stream table', () => {
    const f = tempFile('slow.yaml', purgeLoop(0.25, 1e-4));
    const r = cli(['solve', f, '--method', 'direct', '--max-passes', '200']);
    expect(r.code).toBe(3);
    expect(r.stdout).toMatch(/^status: not-converged/);
    expect(r.stdout).toMatch(/what the loop is doing at the last iterate:\n\s+`recycle` still changes from pass to pass: N2 by /);
    expect(r.stdout).toMatch(/last iterate of the tear streams .*not a solution\):\n\s+recycle: CH3OH [0-9.e+-]+, CH3OCH3 [0-9.e+-]+, H2O [0-9.e+-]+, N2 [0-9.e+-]+; T /);
    expect(r.stdout).toMatch(/residual history \(pass: scaled residual\): 1: /);
    expect(r.stdout).toMatch(/try: another method/);
    expect(r.stdout).not.toMatch(/^Streams/m);
    expect(r.stdout).not.toMatch(/^Balance/m);
    const j = cli(['solve', f, '--method', 'direct', '--max-passes', '200', '--json']);
    expect(j.code).toBe(3);
    const o = JSON.parse(j.stdout);
    expect(o.status).toBe('not-converged');
    expect(o.streams).toBeUndefined();
    expect(Object.keys(o.lastTears)).toEqual(['recycle']);
    expect(o.lastTears.recycle.flows.N2).toBeGreaterThan(0);
    expect(o.worst[0].name).toBe('recycle.N2');
    expect(o.history.length).toBeGreaterThan(0);
  });

  it('infeasible: exit 4, the shortfall named, no stream table', () => {
    const f = tempFile('short.yaml', `
components: { H2: {}, N2: {}, NH3: {} }
feeds:
  gas: { flows: { H2: 1 mol/s, N2: 1 mol/s }, T: 300 K, P: 100 bar }
units:
  r: { type: reactor, in: gas, out: out, reactions: [ { equation: "N2 + 3 H2 -> 2 NH3", key: N2, conversion: 0.9 } ] }
`);
    const r = cli(['solve', f]);
    expect(r.code).toBe(4);
    expect(r.stdout).toMatch(/^status: infeasible/);
    expect(r.stdout).toMatch(/needs 2\.7 mol\/s of H2, but only 1 mol\/s/);
    expect(r.stdout).not.toMatch(/^Streams/m);
  });

  it('an internal error prints one line and how to get details, exit 1; --debug shows the trace', () => {
    // LOOPCLOSE_FAULT=1 is a test hook of src/cli/main.ts: every command throws before it starts.
    const env = { ...process.env, LOOPCLOSE_FAULT: '1' };
    const r = cliEnv(['solve', 'flowsheets/methanol-pilot.yaml'], env);
    expect(r.code).toBe(1);
    expect(r.stdout).toBe('');
    const lines = r.stderr.trimEnd().split('\n');
    expect(lines).toHaveLength(1);
    expect(lines[0]).toMatch(/^internal error: .*\(run again with --debug for details, and report it\)$/);
    const d = cliEnv(['--debug', 'solve', 'flowsheets/methanol-pilot.yaml'], env);
    expect(d.code).toBe(1);
    expect(d.stderr).toMatch(/^\s+at .+/m);
    // Without the hook the same command works.
    expect(cli(['solve', 'flowsheets/methanol-pilot.yaml']).code).toBe(0);
  });

  it('--out writes through a temporary name: the report is there, no temporary file is left, and an input error writes nothing', () => {
    const dir = dirname(tempFile('x.txt', ''));
    const out = `${dir}/report.txt`;
    const ok = cli(['solve', 'flowsheets/methanol-pilot.yaml', '--out', out]);
    expect(ok.code).toBe(0);
    expect(readdirSync(dir).sort()).toEqual(['report.txt', 'x.txt']);
    const bad = cli(['solve', 'test/bad/composition-sum.yaml', '--out', `${dir}/bad.txt`]);
    expect(bad.code).toBe(2);
    expect(readdirSync(dir).sort()).toEqual(['report.txt', 'x.txt']);
    const nowhere = cli(['solve', 'flowsheets/methanol-pilot.yaml', '--out', `${dir}/no/such/folder/r.txt`]);
    expect(nowhere.code).toBe(2);
    expect(nowhere.stderr).toMatch(/--out: cannot write .*: its folder does not exist/);
  });
});

function cliEnv(args: string[], env: NodeJS.ProcessEnv) {
  const r = spawnSync(process.execPath, [BIN, ...args], { cwd: ROOT, encoding: 'utf8', env, timeout: 60000 });
  return { code: r.status ?? -1, stdout: r.stdout, stderr: r.stderr };
}
