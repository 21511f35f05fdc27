/**
 * An energy balance the flows do not depend on is solved once, on the converged flows
 * (runtime.ts, energyDecoupled; closure.ts): the state must be the one a solve that carries the
 * energy balance in every pass finds. The twin of each demo below adds, on its purge, an
 * adiabatic flash outside the loop: a unit whose split depends on an enthalpy, so that the twin
 * carries the energy balance in every pass of its iteration. Every stream and figure the two
 * share must agree to the tolerance of the solve.
 */
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { loadFlowsheet, validateText } from '../../src/flowsheet/validate.js';
import { solveFlowsheet, type FlowsheetResult } from '../../src/flowsheet/solve.js';
import { createRuntime } from '../../src/flowsheet/runtime.js';
import { ROOT } from '../helpers/cli.js';

const CASES: { file: string; purge: string }[] = [
  { file: 'ammonia-loop.yaml', purge: 'purge' },
  { file: 'methanol-pilot.yaml', purge: 'purge' },
  { file: 'benzene-hydrogenation.yaml', purge: 'purge' },
];

function twinText(file: string, purge: string): string {
  const text = readFileSync(join(ROOT, 'flowsheets', file), 'utf8');
  const at = text.indexOf('\nunits:\n');
  expect(at).toBeGreaterThan(0);
  const drum = `  purge-drum: { type: flash, in: ${purge}, adiabatic: true, P: 1 bar, vapor: purge-gas, liquid: purge-liquid }\n`;
  return text.slice(0, at + 8) + drum + text.slice(at + 8);
}

/** Largest relative difference over the streams and unit figures both results have. */
function worstDifference(a: FlowsheetResult, b: FlowsheetResult): { rel: number; where: string } {
  let rel = 0;
  let where = '';
  const cmp = (x: number, y: number, w: string, floor: number) => {
    const d = Math.abs(x - y) / Math.max(Math.abs(x), Math.abs(y), floor);
    if (!(d <= rel)) {
      rel = d;
      where = `${w}: ${x} against ${y}`;
    }
  };
  for (const [name, s] of a.streams) {
    const t = b.streams.get(name);
    if (!t) continue;
    let F = 0;
    for (let i = 0; i < s.flows.length; i++) F += s.flows[i];
    for (let i = 0; i < s.flows.length; i++) cmp(s.flows[i], t.flows[i], `${name}.flows[${i}]`, F * 1e-6 + 1e-300);
    cmp(s.T, t.T, `${name}.T`, 1);
    cmp(s.P, t.P, `${name}.P`, 1);
    // an enthalpy is known to a fraction of R T (a hydrogen stream near 298 K has h near 0)
    cmp(s.h, t.h, `${name}.h`, 8.314 * s.T);
  }
  for (const [name, u] of a.units) {
    const v = b.units.get(name);
    if (!v) continue;
    for (const f of u.figures) {
      if (f.key !== 'duty' && f.key !== 'power') continue;
      const g = v.figures.find((x) => x.key === f.key)!;
      cmp(f.value, g.value, `${name}.${f.key}`, 1);
    }
  }
  return { rel, where };
}

describe('the energy balance solved once on the converged flows', () => {
  for (const c of CASES) {
    it(`${c.file}: the same state as with the energy balance in every pass`, () => {
      const { model } = loadFlowsheet(join(ROOT, 'flowsheets', c.file));
      const twin = validateText(`twin-${c.file}`, twinText(c.file, c.purge)).model;
      expect(createRuntime(model).energyDecoupled).toBe(true);
      expect(createRuntime(twin).energyDecoupled).toBe(false);
      const a = solveFlowsheet(model);
      const b = solveFlowsheet(twin);
      expect(a.status, a.message).toBe('converged');
      expect(b.status, b.message).toBe('converged');
      const d = worstDifference(a, b);
      // both meet the tear tolerance (rtol 1e-10, the default) and close to 1e-9: measured
      // 6e-12 to 4e-10 (a duty, a difference of enthalpy flows); 1e-8 leaves room for round-off
      expect(d.rel, d.where).toBeLessThan(1e-8);
      expect(Math.abs(a.balance.energy!.closure)).toBeLessThanOrEqual(1e-9);
      for (const [u, e] of Object.entries(a.balance.unitEnergy!)) expect(Math.abs(e.closure), u).toBeLessThanOrEqual(1e-9);
    });
  }

  for (const f of ['methanol-pilot-split.yaml', 'methanol-pilot-equilibrium.yaml', 'ammonia-loop-adiabatic.yaml']) {
    it(`${f}: the same state with the energy balance asked for in every pass (energyEveryPass)`, () => {
      const { model } = loadFlowsheet(join(ROOT, 'flowsheets', f));
      expect(createRuntime(model).energyDecoupled).toBe(true);
      const a = solveFlowsheet(model);
      const b = solveFlowsheet(model, { energyEveryPass: true });
      expect(a.status, a.message).toBe('converged');
      expect(b.status, b.message).toBe('converged');
      const d = worstDifference(a, b);
      expect(d.rel, d.where).toBeLessThan(1e-8);
    });
  }

  it('a temperature only the energy balance decides is the computed one, never the stand-in', () => {
    // ammonia-loop: the recycle's maker is the circulator, whose outlet temperature the iteration
    // leaves at its inlet's (-10 degC); the answer is the compressed gas, hotter by some kelvin
    const r = solveFlowsheet(loadFlowsheet(join(ROOT, 'flowsheets', 'ammonia-loop.yaml')).model);
    expect(r.status, r.message).toBe('converged');
    const gasIn = r.streams.get('separator-gas')!;
    const gasOut = r.streams.get('loop-gas')!;
    const recycle = r.streams.get('recycle')!;
    expect(gasOut.T - gasIn.T).toBeGreaterThan(1);
    expect(Math.abs(recycle.T - gasOut.T)).toBeLessThan(1e-9 * gasOut.T);
    const power = r.units.get('circulator')!.figures.find((f) => f.key === 'power')!.value;
    expect(power).toBeGreaterThan(0);
    // and the mixer's adiabatic outlet follows from the enthalpies in
    const mixed = r.streams.get('mixed-feed')!;
    let hin = 0;
    let F = 0;
    for (const name of ['makeup', 'recycle']) {
      const s = r.streams.get(name)!;
      const f = s.flows.reduce((p, q) => p + q, 0);
      hin += f * s.h;
      F += f;
    }
    expect(Math.abs(mixed.h - hin / F)).toBeLessThan(1e-9 * 8.314 * mixed.T);
  });

  it('a loop whose flows depend on the energy balance carries it in every pass', () => {
    // two adiabatic beds at equilibrium: the extents follow from temperatures the energy
    // balance finds; one bed at a set T with equilibrium at that T does not couple
    const beds = loadFlowsheet(join(ROOT, 'flowsheets', 'ammonia-loop-two-beds.yaml')).model;
    expect(createRuntime(beds).energyDecoupled).toBe(false);
    const fixedT = loadFlowsheet(join(ROOT, 'flowsheets', 'methanol-pilot-equilibrium.yaml')).model;
    expect(createRuntime(fixedT).energyDecoupled).toBe(true);
  });
});
