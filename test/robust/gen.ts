/**
 * Random valid reaction loops for the fuzz tests, written as flowsheet YAML text (so that the
 * whole path, parse -> validate -> structure -> solve -> report, is exercised).
 *
 * A loop: one or two feeds -> mixer (with the recycle) -> reactor (zero to two reactions with
 * random balanced stoichiometry over the chosen components) -> a parting unit (separator with
 * random recoveries, condenser with a random fixed split, or an equilibrium condenser) ->
 * purge splitter (or none) -> recycle.
 *
 * Stoichiometry is random but always balanced by element: the coefficients are found by
 * searching small integer vectors in the null space of the element matrix of a random subset
 * of the components (library components, real formulas).
 */
import fc from 'fast-check';
import { parseFormula } from '../../src/thermo/formula.js';
import { findComponent } from '../../src/thermo/components.js';

/** Library components of C, H, O, N (and argon) met in synthesis and hydrogenation loops. */
export const POOL = ['H2', 'N2', 'Ar', 'CH4', 'CO', 'CO2', 'H2O', 'NH3', 'CH3OH', 'C2H6', 'C2H4', 'C3H8', 'C3H6', 'CH3OCH3'] as const;

function elementsOf(id: string): Record<string, number> {
  const f = parseFormula(findComponent(id)!.formula) as unknown;
  return f instanceof Map ? Object.fromEntries(f as Map<string, number>) : { ...(f as Record<string, number>) };
}

/**
 * Balanced reactions among `ids` with integer coefficients -3..3 (at least one reactant and
 * one product, no common factor), in a fixed order. Deterministic.
 */
export function balancedReactions(ids: readonly string[]): { nu: number[] }[] {
  const els = ids.map(elementsOf);
  const names = [...new Set(els.flatMap((e) => Object.keys(e)))];
  const k = ids.length;
  const out: { nu: number[] }[] = [];
  const nu = new Array<number>(k).fill(-3);
  const gcd = (a: number, b: number): number => (b === 0 ? Math.abs(a) : gcd(b, a % b));
  for (;;) {
    const nz = nu.filter((v) => v !== 0);
    if (nz.length >= 2 && nz.some((v) => v < 0) && nz.some((v) => v > 0) && nz.reduce(gcd) === 1) {
      if (names.every((el) => nu.reduce((s, v, i) => s + v * (els[i][el] ?? 0), 0) === 0)) out.push({ nu: nu.slice() });
    }
    let i = 0;
    while (i < k && nu[i] === 3) nu[i++] = -3;
    if (i === k) break;
    nu[i]++;
  }
  return out;
}

export function equationText(ids: readonly string[], nu: readonly number[]): string {
  const side = (sign: number) => nu.map((v, i) => [v * sign, ids[i]] as const).filter(([v]) => v > 0).map(([v, id]) => (v === 1 ? id : `${v} ${id}`)).join(' + ');
  return `${side(-1)} -> ${side(1)}`;
}

export interface LoopSpec {
  ids: string[];
  feeds: { fractions: number[]; flow: number; T: number; P: number }[];
  reactions: { pick: number; conversion: number; keyPick: number }[];
  parting: { kind: 'separator'; recovery: number[] } | { kind: 'split'; split: number[] } | { kind: 'equilibrium'; T: number; P: number };
  purge: number | null;
  method: 'auto' | 'direct' | 'wegstein' | 'newton';
}

/**
 * Fractions in [0, 1]; values below 1e-12 become exactly 0. (Sub-1e-12 fractions, down to
 * denormals, found a closure bug outside this generator's reach: see the regression cases in
 * fuzz-loops.test.ts. They are kept there as fixed cases rather than drawn at random.)
 */
const fraction = fc.double({ min: 0, max: 1, noNaN: true }).map((v) => (v < 1e-12 ? 0 : v));
/** Fractions with weight at the hard ends: exactly 0 and 1, and tiny and near-one values. */
const edgyFraction = fc.oneof(
  { weight: 3, arbitrary: fraction },
  { weight: 1, arbitrary: fc.constantFrom(0, 1, 1e-4, 0.9999, 1e-9) },
);

export function loopSpec(opts: { equilibrium?: boolean } = {}): fc.Arbitrary<LoopSpec> {
  return fc
    .uniqueArray(fc.constantFrom(...POOL), { minLength: 2, maxLength: 5 })
    .chain((ids) => {
      const n = ids.length;
      const feed = fc.record({
        fractions: fc.array(edgyFraction, { minLength: n, maxLength: n }).filter((a) => a.some((v) => v > 0)),
        flow: fc.double({ min: 1e-3, max: 1e3, noNaN: true }),
        T: fc.double({ min: 250, max: 500, noNaN: true }),
        P: fc.double({ min: 1e5, max: 2e7, noNaN: true }),
      });
      const parting = opts.equilibrium
        ? fc.record({ kind: fc.constant('equilibrium' as const), T: fc.double({ min: 200, max: 350, noNaN: true }), P: fc.double({ min: 1e5, max: 2e7, noNaN: true }) })
        : fc.oneof(
          fc.record({ kind: fc.constant('separator' as const), recovery: fc.array(edgyFraction, { minLength: n, maxLength: n }) }),
          fc.record({ kind: fc.constant('split' as const), split: fc.array(edgyFraction, { minLength: n, maxLength: n }) }),
        );
      return fc.record({
        ids: fc.constant(ids),
        feeds: fc.array(feed, { minLength: 1, maxLength: 2 }),
        reactions: fc.array(fc.record({ pick: fc.nat(), conversion: fc.oneof(fraction.map((v) => v * 0.95), fc.constantFrom(0, 1, 1e-6)), keyPick: fc.nat() }), { maxLength: 2 }),
        parting,
        purge: fc.oneof({ weight: 4, arbitrary: fc.oneof(fc.double({ min: 1e-4, max: 0.5, noNaN: true }), fc.constantFrom(1e-4, 1e-3, 1)) }, { weight: 1, arbitrary: fc.constant(null) }),
        method: fc.constantFrom('auto' as const, 'auto' as const, 'direct' as const, 'wegstein' as const, 'newton' as const),
      });
    });
}

const g = (v: number) => Number(v.toPrecision(12)).toString();

/** The YAML text of a loop. Always valid syntax and types; the structure may still be refused. */
export function loopYaml(s: LoopSpec): string {
  const { ids } = s;
  const lines: string[] = [`components: { ${ids.map((id) => `${id}: {}`).join(', ')} }`, 'feeds:'];
  s.feeds.forEach((f, k) => {
    const sum = f.fractions.reduce((a, b) => a + b, 0);
    const comp = ids.map((id, i) => `${id}: ${g(f.fractions[i] / sum)}`).join(', ');
    lines.push(`  feed${k}: { composition: { ${comp} }, normalize: true, molar-flow: ${g(f.flow)} mol/s, T: ${g(f.T)} K, P: ${g(f.P)} Pa }`);
  });
  const all = balancedReactions(ids);
  const rx = all.length === 0 ? [] : s.reactions.map((r) => {
    const nu = all[r.pick % all.length].nu;
    const reactants = nu.map((v, i) => (v < 0 ? i : -1)).filter((i) => i >= 0);
    return { eq: equationText(ids, nu), key: ids[reactants[r.keyPick % reactants.length]], conversion: r.conversion };
  });
  lines.push('units:');
  lines.push(`  mix: { type: mixer, in: [${s.feeds.map((_, k) => `feed${k}`).join(', ')}, recycle], out: r-in }`);
  // Parallel reactions sharing a key must not convert more than all of it.
  const total = new Map<string, number>();
  for (const r of rx) total.set(r.key, (total.get(r.key) ?? 0) + r.conversion);
  const scaled = rx.map((r) => ({ ...r, conversion: (total.get(r.key) ?? 0) > 1 ? r.conversion / total.get(r.key)! : r.conversion }));
  lines.push(`  reactor: { type: reactor, in: r-in, out: r-out, reactions: [${scaled.map((r) => `{ equation: "${r.eq}", key: ${r.key}, conversion: ${g(r.conversion)} }`).join(', ')}] }`);
  const gas = s.purge === null ? 'recycle' : 'gas';
  const p = s.parting;
  if (p.kind === 'separator') {
    lines.push(`  sep: { type: separator, in: r-out, out: { product: { ${ids.map((id, i) => `${id}: ${g(p.recovery[i])}`).join(', ')} }, ${gas}: rest } }`);
  } else if (p.kind === 'split') {
    lines.push(`  sep: { type: condenser, in: r-out, T: 300 K, P: 10 bar, model: split, split: { ${ids.map((id, i) => `${id}: ${g(p.split[i])}`).join(', ')} }, vapor: ${gas}, liquid: product }`);
  } else {
    lines.push(`  sep: { type: condenser, in: r-out, T: ${g(p.T)} K, P: ${g(p.P)} Pa, vapor: ${gas}, liquid: product }`);
  }
  if (s.purge !== null) {
    lines.push(`  split: { type: splitter, in: gas, out: { purge: ${g(s.purge)}, recycle: rest } }`);
  }
  if (rx.length === 0) lines[lines.findIndex((l) => l.startsWith('  reactor:'))] = '  reactor: { type: mixer, in: r-in, out: r-out }';
  lines.push(`solver: { method: ${s.method}, max-passes: 3000 }`);
  return `${lines.join('\n')}\n`;
}

/** Every number in a plain result object (arrays, typed arrays, objects); null is allowed. */
export function nonFinitePaths(v: unknown, path = '$', out: string[] = []): string[] {
  if (typeof v === 'number') {
    if (!Number.isFinite(v)) out.push(`${path} = ${v}`);
  } else if (v instanceof Float64Array || Array.isArray(v)) {
    Array.from(v as ArrayLike<unknown>).forEach((x, i) => nonFinitePaths(x, `${path}[${i}]`, out));
  } else if (v instanceof Map) {
    for (const [k, x] of v) nonFinitePaths(x, `${path}.${String(k)}`, out);
  } else if (v && typeof v === 'object') {
    for (const [k, x] of Object.entries(v)) nonFinitePaths(x, `${path}.${k}`, out);
  }
  return out;
}
