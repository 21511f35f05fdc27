/**
 * The `components:` section: built-in rows by id (or name), rows of the file's own, and
 * overrides of built-in constants. Thermal data of the file's own (energy balances):
 *   cp: 29.1 J/(mol K)                                   a constant ideal-gas heat capacity
 *   cp: { over-R: [3.5, 1.2e-3], Tmin: 298 K, Tmax: 1500 K }   Cp/R = sum_k a_k (T/K)^k, with
 *                                                       its range of validity
 *   hf: -110.53 kJ/mol     standard enthalpy of formation of the ideal gas at 298.15 K
 *   gf: -137.17 kJ/mol     standard Gibbs energy of formation of the ideal gas (298.15 K, 1 bar)
 * A body that overrides a built-in row keeps the row's thermal data unless it gives its own.
 * A constant heat capacity has no range of its own: it is taken as valid from 20 K to 6000 K
 * (the limits of the state flashes), and the user answers for it.
 */
import { didYouMean } from '../diagnostics.js';
import { componentIds, findComponent } from '../thermo/components.js';
import { molarMass, parseFormula } from '../thermo/formula.js';
import type { ComponentData, CpCorrelation } from '../thermo/types.js';
import { R } from '../thermo/constants.js';
import type { Entry, Reader } from './source.js';
import { quantityAt } from './yaml-fields.js';

export function readComponent(r: Reader, e: Entry): ComponentData | undefined {
  const lib = findComponent(e.key);
  const v = e.value;
  const isEmpty = v === null || (r.isScalar(v) && (v.value === null || v.value === '' || v.value === 'library')) || (r.isMap(v) && v.items.length === 0);
  if (isEmpty) {
    if (r.isScalar(v) && typeof v.value === 'string' && v.value !== '' && v.value !== 'library') {
      r.bag.error(`component \`${e.key}\`: \`${v.value}\` is not understood`, r.at(v), 'write `{}` or `library` for the built-in data, or a body with Tc, Pc, omega and formula');
      return undefined;
    }
    if (!lib) {
      r.bag.error(`unknown component \`${e.key}\``, r.at(e.keyNode),
        didYouMean(e.key, componentIds()) ?? 'give its constants inline: `{ Tc: 408.1 K, Pc: 36.5 bar, omega: 0.183, formula: C4H10 }`');
      return undefined;
    }
    // Molar mass from the formula and the standard atomic weights, so that the mass balance
    // closes exactly wherever the element balance does (table values agree to 0.05 %).
    return { ...lib, id: e.key, MW: molarMass(lib.formula) };
  }
  if (r.isScalar(v)) {
    r.bag.error(`component \`${e.key}\` must be \`{}\`, \`library\` or a mapping of constants`, r.at(v));
    return undefined;
  }
  const f = r.entries(v, `component \`${e.key}\``, e.keyNode);
  if (!f) return undefined;
  r.checkKeys(f, ['Tc', 'Pc', 'omega', 'MW', 'formula', 'name', 'cp', 'hf', 'gf'], `component \`${e.key}\``);
  const ctx = { atmosphere: 101325 };
  // One message names every key a component of the file's own lacks.
  const missing = lib ? [] : ['Tc', 'Pc', 'omega', 'formula'].filter((k) => !r.find(f, k) && !r.strayNear(f, k));
  if (missing.length) {
    const example: Record<string, string> = { Tc: '`Tc: 408.1 K`', Pc: '`Pc: 36.5 bar`', omega: '`omega: 0.183` (the acentric factor)', formula: '`formula: C4H10`' };
    r.bag.error(`component \`${e.key}\` is not in the built-in table and has no ${missing.map((k) => `\`${k}\``).join(', ')}`, r.at(e.keyNode),
      `add ${missing.map((k) => example[k]).join(', ')}`);
  }
  const ok = missing.length === 0;
  const get = (k: string) => r.find(f, k);
  const Tc = get('Tc') ? quantityAt(r, get('Tc')!.value, 'temperature', `\`Tc\` of \`${e.key}\``, { above: 0, example: '408.1 K' }, ctx) : lib?.Tc;
  const Pc = get('Pc') ? quantityAt(r, get('Pc')!.value, 'pressure', `\`Pc\` of \`${e.key}\``, { above: 0, example: '36.5 bar' }, ctx) : lib?.Pc;
  const omega = get('omega') ? r.number(get('omega')!.value, `\`omega\` of \`${e.key}\``, '0.183') : lib?.omega;
  if (omega !== undefined && (omega < -1 || omega > 2)) r.bag.error(`\`omega\` of \`${e.key}\` is ${omega}; acentric factors lie between about -0.4 and 1.5`, r.at(get('omega')!.value));
  let formula = get('formula') ? r.string(get('formula')!.value, `\`formula\` of \`${e.key}\``, 'C4H10') : lib?.formula;
  if (formula !== undefined) {
    try {
      parseFormula(formula);
    } catch (err) {
      r.bag.error(`\`formula\` of \`${e.key}\`: ${(err as Error).message}`, r.at(get('formula')?.value ?? e.keyNode), 'write element symbols with counts, e.g. `C4H10` or `CH3OH`');
      formula = undefined;
    }
  }
  let MW = get('MW') ? quantityAt(r, get('MW')!.value, 'molarMass', `\`MW\` of \`${e.key}\``, { above: 0, example: '58.12 g/mol' }, ctx) : undefined;
  if (MW === undefined && !get('MW') && formula) MW = molarMass(formula);
  const name = get('name') ? r.string(get('name')!.value, `\`name\` of \`${e.key}\``) : lib?.name ?? e.key;
  const cp = get('cp') ? readCp(r, get('cp')!, e.key) : lib?.cp;
  const hf = get('hf') ? quantityAt(r, get('hf')!.value, 'molarEnergy', `\`hf\` of \`${e.key}\``, { example: '-110.53 kJ/mol' }, ctx) : lib?.hf;
  const gf = get('gf') ? quantityAt(r, get('gf')!.value, 'molarEnergy', `\`gf\` of \`${e.key}\``, { example: '-137.17 kJ/mol' }, ctx) : lib?.gf;
  if (!ok || Tc === undefined || Pc === undefined || omega === undefined || formula === undefined || MW === undefined) return undefined;
  if ((get('cp') && !cp) || (get('hf') && hf === undefined) || (get('gf') && gf === undefined)) return undefined;
  const own = ['cp', 'hf', 'gf'].filter((k) => get(k));
  const thermoSource = own.length ? `${own.join(', ')} given in ${r.src.path}${lib?.thermoSource ? `; the rest: ${lib.thermoSource}` : ''}` : lib?.thermoSource;
  return {
    id: e.key, name: name ?? e.key, formula, MW, Tc, Pc, omega,
    source: lib ? `${lib.source}; overridden in ${r.src.path}` : `given in ${r.src.path}`,
    ...(cp ? { cp } : {}), ...(hf !== undefined ? { hf } : {}), ...(gf !== undefined ? { gf } : {}),
    ...(thermoSource ? { thermoSource } : {}),
  };
}

/** The widest range a constant heat capacity is taken as valid over, K (the state flashes' limits). */
const CONSTANT_CP_RANGE = [20, 6000] as const;

/** `cp:` of a component of the file: a constant heat capacity, or a Cp/R polynomial with its range. */
function readCp(r: Reader, e: Entry, id: string): CpCorrelation | undefined {
  const what = `\`cp\` of \`${id}\``;
  const ctx = { atmosphere: 101325 };
  const v = e.value;
  if (!r.isMap(v)) {
    const c = quantityAt(r, v, 'molarHeatCapacity', what, { above: 0, example: '29.1 J/(mol K)' }, ctx);
    if (c === undefined) return undefined;
    return { pieces: [{ a: [c / R], Tmin: CONSTANT_CP_RANGE[0], Tmax: CONSTANT_CP_RANGE[1] }] };
  }
  const f = r.entries(v, what, e.keyNode);
  if (!f) return undefined;
  r.checkKeys(f, ['over-R', 'Tmin', 'Tmax'], what);
  const poly = r.find(f, 'over-R');
  const lo = r.find(f, 'Tmin');
  const hi = r.find(f, 'Tmax');
  if (!poly || !lo || !hi) {
    r.bag.error(`${what} as a polynomial needs \`over-R\` (the coefficients of Cp/R in powers of T/K), \`Tmin\` and \`Tmax\``, r.at(e.keyNode), 'for example `cp: { over-R: [3.259, 1.36e-3], Tmin: 298 K, Tmax: 1500 K }`, or a constant `cp: 29.1 J/(mol K)`');
    return undefined;
  }
  const items = r.list(poly.value, `\`over-R\` of ${what}`);
  if (!items) return undefined;
  const a: number[] = [];
  for (const it of items) {
    const x = r.number(it, `a coefficient of \`over-R\` of ${what}`, '3.5');
    if (x === undefined) return undefined;
    a.push(x);
  }
  if (a.length === 0 || a.length > 5) {
    r.bag.error(`\`over-R\` of ${what} has ${a.length} coefficients; give 1 to 5 (Cp/R = a0 + a1 T + ... + a4 T^4, T in K)`, r.at(poly.value));
    return undefined;
  }
  const Tmin = quantityAt(r, lo.value, 'temperature', `\`Tmin\` of ${what}`, { above: 0, example: '298 K' }, ctx);
  const Tmax = quantityAt(r, hi.value, 'temperature', `\`Tmax\` of ${what}`, { above: 0, example: '1500 K' }, ctx);
  if (Tmin === undefined || Tmax === undefined) return undefined;
  if (!(Tmax > Tmin)) {
    r.bag.error(`${what}: \`Tmax\` (${Tmax} K) must be above \`Tmin\` (${Tmin} K)`, r.at(hi.value));
    return undefined;
  }
  // the heat capacity must stay positive over its range (checked at 50 points)
  for (let k = 0; k <= 50; k++) {
    const T = Tmin + ((Tmax - Tmin) * k) / 50;
    let c = 0;
    for (let j = a.length - 1; j >= 0; j--) c = c * T + a[j];
    if (!(c > 0)) {
      r.bag.error(`${what}: the polynomial gives Cp/R = ${Number(c.toPrecision(4))} at ${Number(T.toPrecision(5))} K, inside its range; a heat capacity is positive`, r.at(poly.value), 'check the coefficients (Cp/R, T in kelvin) and the range');
      return undefined;
    }
  }
  return { pieces: [{ a, Tmin, Tmax }] };
}

