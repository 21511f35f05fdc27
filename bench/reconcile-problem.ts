// The plant-sized reconciliation problem of bench/reconcile.mjs: a methanol loop with 6
// components and 4 elements (C, H, O, N), five streams with compositions (makeup, reactor in,
// reactor out, loop gas, crude liquid) and six flows: 36 variables, 21 balances (fraction sums,
// mixer and separator component balances, reactor element balances with free extents), 19
// readings. An invented scenario; its steady state is generated here and the readings are that
// state plus seeded noise. Used by bench/reconcile.mjs (bundled with esbuild) and by
// test/plant/methanol.test.ts.
import type { PlantVariable, ReconciliationProblem } from '../src/plant/index.js';

const COMP = ['H2', 'CO', 'CO2', 'H2O', 'CH3OH', 'N2'];
// Atoms per molecule: C, H, O, N.
const ATOMS: Record<string, number[]> = { H2: [0, 2, 0, 0], CO: [1, 0, 1, 0], CO2: [1, 0, 2, 0], H2O: [0, 2, 1, 0], CH3OH: [1, 4, 1, 0], N2: [0, 0, 0, 2] };
const NC = COMP.length;
const STREAMS = ['makeup', 'reactor-in', 'reactor-out', 'loop-gas', 'crude'];
const FLOWS = ['makeup', 'reactor-in', 'reactor-out', 'purge', 'recycle', 'crude'];
// Variable layout: flows, then fractions stream by stream.
export const F: Record<string, number> = Object.fromEntries(FLOWS.map((s, i) => [s, i]));
export const X = (stream: string, k: number): number => FLOWS.length + STREAMS.indexOf(stream) * NC + k;
export const N = FLOWS.length + STREAMS.length * NC;

/** The steady state by direct substitution on the recycle (invented design figures). */
export function steadyState(): Float64Array {
  const makeup = [0.7, 0.06, 0.2, 0, 0, 0.04].map((v) => v * 100); // mol/s
  const toLiquid = [0.001, 0.002, 0.02, 0.99, 0.97, 0.0005];
  const purgeFraction = 0.04;
  let recycle: number[] = new Array(NC).fill(0);
  let s1: number[] = [];
  let s2: number[] = [];
  let liquid: number[] = [];
  let vapour: number[] = [];
  for (let it = 0; it < 5000; it++) {
    s1 = makeup.map((m, k) => m + recycle[k]);
    const xi1 = 0.25 * s1[1]; // CO + 2 H2 -> CH3OH
    const xi2 = 0.08 * s1[2]; // CO2 + 3 H2 -> CH3OH + H2O
    s2 = s1.slice();
    s2[0] -= 2 * xi1 + 3 * xi2;
    s2[1] -= xi1;
    s2[2] -= xi2;
    s2[3] += xi2;
    s2[4] += xi1 + xi2;
    liquid = s2.map((v, k) => v * toLiquid[k]);
    vapour = s2.map((v, k) => v - liquid[k]);
    recycle = vapour.map((v) => v * (1 - purgeFraction));
  }
  const sum = (a: number[]) => a.reduce((p, q) => p + q, 0);
  const x = new Float64Array(N);
  const set = (stream: string, flows: number[]) => {
    const t = sum(flows);
    flows.forEach((v, k) => (x[X(stream, k)] = v / t));
    return t;
  };
  x[F.makeup] = set('makeup', makeup);
  x[F['reactor-in']] = set('reactor-in', s1);
  x[F['reactor-out']] = set('reactor-out', s2);
  const vTotal = set('loop-gas', vapour);
  x[F.purge] = vTotal * purgeFraction;
  x[F.recycle] = vTotal * (1 - purgeFraction);
  x[F.crude] = set('crude', liquid);
  return x;
}

/** Balances as sums of coefficient x variable (x variable): evaluate and analytic Jacobian. */
/** A term: [coefficient], [coefficient, j] or [coefficient, j, k] for c, c x_j, c x_j x_k. */
type Term = number[];

function balances(): { rows: Term[][]; names: string[] } {
  const rows: Term[][] = [];
  const names: string[] = [];
  for (const s of STREAMS) {
    rows.push([[-1], ...COMP.map((_, k) => [1, X(s, k)])]);
    names.push(`${s} fractions sum to 1`);
  }
  COMP.forEach((c, k) => {
    rows.push([[1, F['reactor-in'], X('reactor-in', k)], [-1, F.makeup, X('makeup', k)], [-1, F.recycle, X('loop-gas', k)]]);
    names.push(`mixer ${c}`);
  });
  ['C', 'H', 'O', 'N'].forEach((e, ei) => {
    const row: Term[] = [];
    COMP.forEach((c, k) => {
      const a = ATOMS[c][ei];
      if (a === 0) return;
      row.push([a, F['reactor-out'], X('reactor-out', k)], [-a, F['reactor-in'], X('reactor-in', k)]);
    });
    rows.push(row);
    names.push(`reactor ${e}`);
  });
  COMP.forEach((c, k) => {
    rows.push([[1, F['reactor-out'], X('reactor-out', k)], [-1, F.crude, X('crude', k)], [-1, F.purge, X('loop-gas', k)], [-1, F.recycle, X('loop-gas', k)]]);
    names.push(`separator ${c}`);
  });
  return { rows, names };
}

export function problem(state: Float64Array, seed: number, { analytic = true, biased }: { analytic?: boolean; biased?: number } = {}): ReconciliationProblem {
  const { rows, names } = balances();
  let a = seed >>> 0;
  const uniform = () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
  const normal = () => Math.sqrt(-2 * Math.log(Math.max(uniform(), 1e-300))) * Math.cos(2 * Math.PI * uniform());
  const measured = new Set([F.makeup, F['reactor-in'], F.purge, F.recycle, F.crude]);
  for (let k = 0; k < NC; k++) {
    measured.add(X('makeup', k));
    measured.add(X('loop-gas', k));
  }
  measured.add(X('crude', 3));
  measured.add(X('crude', 4));
  const variables: PlantVariable[] = [];
  for (let j = 0; j < N; j++) {
    const isFlow = j < FLOWS.length;
    const name = isFlow ? `${FLOWS[j]}.flow` : `${STREAMS[Math.floor((j - FLOWS.length) / NC)]}.${COMP[(j - FLOWS.length) % NC]}`;
    let meas: PlantVariable['measured'];
    if (measured.has(j)) {
      const sigma = isFlow ? 0.01 * state[j] : Math.max(0.01 * state[j], 1e-4);
      let v = state[j] + sigma * normal();
      if (j === biased) v += 0.06 * state[j];
      meas = { value: v, sigma };
    }
    variables.push({ name, start: isFlow ? state[j] * 1.1 : 1 / NC, lower: 0, upper: isFlow ? undefined : 1, measured: meas });
  }
  return {
    variables,
    constraints: {
      count: rows.length,
      names,
      evaluate(x, out) {
        for (let i = 0; i < rows.length; i++) {
          let s = 0;
          for (const t of rows[i]) s += t.length === 1 ? t[0] : t.length === 2 ? t[0] * x[t[1]] : t[0] * x[t[1]] * x[t[2]];
          out[i] = s;
        }
      },
      jacobian: analytic
        ? (x, J) => {
            for (let i = 0; i < rows.length; i++) {
              for (const t of rows[i]) {
                if (t.length === 2) J[i * N + t[1]] += t[0];
                else if (t.length === 3) {
                  J[i * N + t[1]] += t[0] * x[t[2]];
                  J[i * N + t[2]] += t[0] * x[t[1]];
                }
              }
            }
          }
        : undefined,
    },
  };
}

