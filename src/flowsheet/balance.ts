/**
 * Balance closure of a solved flowsheet: per component (in + generated - out), per element
 * and total mass, from the feeds, the products and the reactors' generation; and, when every
 * component has thermal data, the energy balance overall and per unit:
 *
 *   closure = (H_in + duty + power - H_out) / scale,
 *   scale = max(sum |H| of the streams in, sum |H| of the streams out, sum |duty| + |power|,
 *               sum F R T of the streams in)
 *
 * The last term is the size to which an enthalpy is known: the flashes that find a temperature
 * from an enthalpy stop at a fraction of R T (src/thermo/flash-ph.ts), and on the formation
 * basis a stream of hydrogen near 298 K has an enthalpy near zero, which alone would make the
 * relative closure of such a loop a test of rounding.
 * with H the enthalpy flows (W, formation basis) of the feeds and products (overall) or of the
 * unit's inlets and outlets (per unit). A unit's inlets are read as their makers left them, not
 * as the tear guesses the unit read, so that the per-unit closures also show what is left of
 * the tear iteration.
 */
import { R } from '../thermo/constants.js';
import type { Runtime } from './runtime.js';

export interface ComponentBalance {
  in: number;
  out: number;
  generated: number;
  /** (in + generated - out) / max(in + consumed, out, tiny): signed, relative. */
  closure: number;
}

export interface ElementBalance {
  in: number;
  out: number;
  closure: number;
}

/** An energy balance, W: enthalpy flows in and out, heat and shaft work put in. */
export interface EnergyBalance {
  in: number;
  out: number;
  duty: number;
  power: number;
  closure: number;
}

export interface Balance {
  components: Record<string, ComponentBalance>;
  elements: Record<string, ElementBalance>;
  /** kg/s */
  mass: { in: number; out: number; closure: number };
  /** Overall energy balance (absent when the file's components lack thermal data). */
  energy?: EnergyBalance;
  /** Energy balance of each unit that exchanges heat or work or changes the state (absent as above). */
  unitEnergy?: Record<string, EnergyBalance>;
  /** Largest |closure| over components, elements, mass and energy. */
  worst: number;
}

function flowOf(s: { flows: Float64Array }): number {
  let t = 0;
  for (let i = 0; i < s.flows.length; i++) t += s.flows[i];
  return t;
}

function energyClosure(hin: number, hinAbs: number, hout: number, houtAbs: number, duty: number, power: number, thermal: number): EnergyBalance {
  const scale = Math.max(hinAbs, houtAbs, Math.abs(duty) + Math.abs(power), thermal, TINY);
  const c = hin + duty + power - hout;
  return { in: hin, out: hout, duty, power, closure: hin === 0 && hout === 0 && duty === 0 && power === 0 ? 0 : c / scale };
}

/** F R T of a stream, W (0 for no flow or no temperature). */
function thermalScale(s: { flows: Float64Array; T: number }): number {
  const F = flowOf(s);
  return F > 0 && Number.isFinite(s.T) ? F * R * s.T : 0;
}

/** Enthalpy flow of a stream, W (0 for no flow). */
function enthalpyFlow(s: { flows: Float64Array; h: number }): number {
  const F = flowOf(s);
  return F > 0 ? F * s.h : 0;
}

function computeEnergy(rt: Runtime): { overall: EnergyBalance; units: Record<string, EnergyBalance> } {
  let hin = 0;
  let hinAbs = 0;
  let hout = 0;
  let houtAbs = 0;
  let thermal = 0;
  for (const f of rt.feeds) {
    const s = rt.streams.get(f.name)!;
    const H = enthalpyFlow(s);
    hin += H;
    hinAbs += Math.abs(H);
    thermal += thermalScale(s);
  }
  for (const p of rt.products) {
    const H = enthalpyFlow(rt.streams.get(p)!);
    hout += H;
    houtAbs += Math.abs(H);
  }
  let duty = 0;
  let power = 0;
  const units: Record<string, EnergyBalance> = {};
  for (const b of rt.blocks) {
    const e = b.energy?.() ?? { duty: 0, power: 0 };
    duty += e.duty;
    power += e.power;
    let a = 0;
    let aa = 0;
    let o = 0;
    let oa = 0;
    let th = 0;
    for (const s of b.spec.inlets) {
      const st = rt.streams.get(s)!;
      const H = enthalpyFlow(st);
      a += H;
      aa += Math.abs(H);
      th += thermalScale(st);
    }
    for (const s of b.spec.outlets) {
      const H = enthalpyFlow(rt.streams.get(s)!);
      o += H;
      oa += Math.abs(H);
    }
    units[b.spec.name] = energyClosure(a, aa, o, oa, e.duty, e.power, th);
  }
  return { overall: energyClosure(hin, hinAbs, hout, houtAbs, duty, power, thermal), units };
}

const TINY = 1e-300;

export function computeBalance(rt: Runtime): Balance {
  const { model, n } = rt;
  const inF = new Float64Array(n);
  const outF = new Float64Array(n);
  const gen = new Float64Array(n);
  for (const f of rt.feeds) for (let i = 0; i < n; i++) inF[i] += f.flows[i];
  for (const p of rt.products) {
    if (rt.feeds.some((f) => f.name === p)) continue; // a feed no unit takes is counted in and out
    const s = rt.streams.get(p)!;
    for (let i = 0; i < n; i++) outF[i] += s.flows[i];
  }
  for (const f of rt.feeds) {
    if (rt.products.includes(f.name)) for (let i = 0; i < n; i++) outF[i] += f.flows[i];
  }
  for (const b of rt.blocks) {
    const g = b.generation?.();
    if (g) for (let i = 0; i < n; i++) gen[i] += g[i];
  }
  const components: Record<string, ComponentBalance> = {};
  let worst = 0;
  model.ids.forEach((id, i) => {
    const scale = Math.max(inF[i] + Math.max(0, -gen[i]), outF[i], Math.abs(gen[i]), TINY);
    const c = (inF[i] + gen[i] - outF[i]) / scale;
    const closure = inF[i] === 0 && outF[i] === 0 && gen[i] === 0 ? 0 : c;
    components[id] = { in: inF[i], out: outF[i], generated: gen[i], closure };
    worst = Math.max(worst, Math.abs(closure));
  });
  const elements: Record<string, ElementBalance> = {};
  const names = new Set<string>();
  for (const e of model.elements) for (const k of Object.keys(e)) names.add(k);
  for (const el of [...names].sort()) {
    let a = 0;
    let b = 0;
    for (let i = 0; i < n; i++) {
      const k = model.elements[i][el] ?? 0;
      a += k * inF[i];
      b += k * outF[i];
    }
    const closure = a === 0 && b === 0 ? 0 : (a - b) / Math.max(a, b, TINY);
    elements[el] = { in: a, out: b, closure };
    worst = Math.max(worst, Math.abs(closure));
  }
  let mi = 0;
  let mo = 0;
  for (let i = 0; i < n; i++) {
    mi += inF[i] * model.components[i].MW;
    mo += outF[i] * model.components[i].MW;
  }
  const mc = mi === 0 && mo === 0 ? 0 : (mi - mo) / Math.max(mi, mo, TINY);
  worst = Math.max(worst, Math.abs(mc));
  if (!rt.energy) return { components, elements, mass: { in: mi, out: mo, closure: mc }, worst };
  const e = computeEnergy(rt);
  // NaN (a stream left without an enthalpy) must show as open, never as closed
  const ec = Number.isFinite(e.overall.closure) ? Math.abs(e.overall.closure) : Infinity;
  worst = Math.max(worst, ec);
  for (const u of Object.values(e.units)) worst = Math.max(worst, Number.isFinite(u.closure) ? Math.abs(u.closure) : Infinity);
  return { components, elements, mass: { in: mi, out: mo, closure: mc }, energy: e.overall, unitEnergy: e.units, worst };
}
