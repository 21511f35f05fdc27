/**
 * A small ammonia synthesis loop for the bilinear checks (an invented scenario; the numbers are
 * made up, only their consistency matters): makeup gas and recycle meet in a mixer, the reactor
 * runs N2 + 3 H2 -> 2 NH3 with a free extent, the condenser takes the product ammonia out as
 * liquid, and the loop gas is split into recycle and purge (same composition). Meters: makeup,
 * recycle, reactor inlet, product and purge flows; an analyzer on the purge reads Ar and NH3.
 *
 * Variables: flows F (mol/s), purge (= loop-gas) mole fractions y, the extent xi (mol/s), and
 * the reactor-inlet component flows n1 (mol/s). Balances:
 *   mixer      n1_k - F_M xM_k - F_R y_k = 0                     (4, bilinear in F_R y_k)
 *   inlet      sum_k n1_k - F_1 = 0                              (1)
 *   loop       n1_k + nu_k xi - [k = NH3] F_P - (F_R + F_G) y_k = 0   (4, bilinear)
 *   fractions  sum_k y_k - 1 = 0                                 (1)
 */
import type { PlantVariable, ReconciliationProblem } from '../../src/plant/index.js';

export const COMPONENTS = ['H2', 'N2', 'Ar', 'NH3'] as const;
const NU = [-3, -1, 0, 2];
const PRODUCT = [0, 0, 0, 1];
/** Makeup gas: stoichiometric H2/N2 with 1 % argon. */
export const MAKEUP = [0.7425, 0.2475, 0.01, 0];

export const V = {
  FM: 0, FR: 1, F1: 2, FP: 3, FG: 4,
  y: [5, 6, 7, 8] as const,
  xi: 9,
  n1: [10, 11, 12, 13] as const,
};
export const NAMES = ['makeup.flow', 'recycle.flow', 'reactor-in.flow', 'product.flow', 'purge.flow',
  'purge.H2', 'purge.N2', 'purge.Ar', 'purge.NH3', 'reaction.extent',
  'reactor-in.H2', 'reactor-in.N2', 'reactor-in.Ar', 'reactor-in.NH3'];
const N_VARS = NAMES.length;

/** The exact steady state for a makeup flow, recycle flow, purge flow and NH3 in the loop gas. */
export function exactLoop(FM = 100, FR = 400, FG = 10, yNH3 = 0.03): Float64Array {
  const x = new Float64Array(N_VARS);
  const yAr = (FM * MAKEUP[2]) / FG;
  const yN2 = (1 - yAr - yNH3) / 4; // loop gas H2 : N2 stays 3 : 1 with a stoichiometric makeup
  const y = [3 * yN2, yN2, yAr, yNH3];
  const xi = FM * MAKEUP[1] - FG * yN2;
  x[V.FM] = FM;
  x[V.FR] = FR;
  x[V.FG] = FG;
  x[V.xi] = xi;
  x[V.FP] = 2 * xi - FG * yNH3;
  let F1 = 0;
  for (let k = 0; k < 4; k++) {
    x[V.y[k]] = y[k];
    x[V.n1[k]] = FM * MAKEUP[k] + FR * y[k];
    F1 += x[V.n1[k]];
  }
  x[V.F1] = F1;
  return x;
}

export const MEASURED = [V.FM, V.FR, V.F1, V.FP, V.FG, V.y[2], V.y[3]];

/** Standard uncertainties: 1 % of the true flow for flow meters, 1 % and 2 % for the analyzer. */
export function sigmasFor(exact: Float64Array): Map<number, number> {
  return new Map([
    [V.FM, 0.01 * exact[V.FM]],
    [V.FR, 0.01 * exact[V.FR]],
    [V.F1, 0.01 * exact[V.F1]],
    [V.FP, 0.01 * exact[V.FP]],
    [V.FG, 0.01 * exact[V.FG]],
    [V.y[2], 0.01 * exact[V.y[2]]],
    [V.y[3], 0.02 * exact[V.y[3]]],
  ]);
}

/** mulberry32: a small seeded generator, so that the noise is the same on every run. */
export function seeded(seed: number): () => number {
  let a = seed >>> 0;
  return () => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return ((t ^ (t >>> 14)) >>> 0) / 4294967296;
  };
}

/** Standard normal draws by Box-Muller from a seeded uniform generator. */
export function normalDraws(seed: number): () => number {
  const u = seeded(seed);
  return () => {
    const u1 = Math.max(u(), 1e-300);
    const u2 = u();
    return Math.sqrt(-2 * Math.log(u1)) * Math.cos(2 * Math.PI * u2);
  };
}

/** Readings: exact + sigma * N(0, 1), the meter `biased` (if any) read high by `bias` (0.06 = +6 %). */
export function readings(exact: Float64Array, seed: number, biased?: number, bias = 0.06): Map<number, { value: number; sigma: number }> {
  const sig = sigmasFor(exact);
  const draw = normalDraws(seed);
  const out = new Map<number, { value: number; sigma: number }>();
  for (const j of MEASURED) {
    const s = sig.get(j)!;
    let value = exact[j] + s * draw();
    if (j === biased) value += bias * exact[j];
    out.set(j, { value, sigma: s });
  }
  return out;
}

export function loopProblem(data: Map<number, { value: number; sigma: number }>, opts: { analytic?: boolean } = {}): ReconciliationProblem {
  // Unmeasured start values: a rough design guess, not the answer.
  const guess = exactLoop(100, 400, 10, 0.03).map((v) => v * 1.1);
  const variables: PlantVariable[] = NAMES.map((name, j) => {
    const isFraction = j >= V.y[0] && j <= V.y[3];
    return {
      name,
      start: guess[j],
      lower: 0,
      upper: isFraction ? 1 : undefined,
      measured: data.get(j),
    };
  });
  const names = [
    ...COMPONENTS.map((c) => `mixer ${c}`),
    'reactor inlet total',
    ...COMPONENTS.map((c) => `loop ${c}`),
    'purge fractions sum to 1',
  ];
  return {
    variables,
    constraints: {
      count: 10,
      names,
      evaluate(x, out) {
        let sn = 0;
        let sy = 0;
        for (let k = 0; k < 4; k++) {
          const y = x[V.y[k]];
          const n1 = x[V.n1[k]];
          out[k] = n1 - x[V.FM] * MAKEUP[k] - x[V.FR] * y;
          out[5 + k] = n1 + NU[k] * x[V.xi] - PRODUCT[k] * x[V.FP] - (x[V.FR] + x[V.FG]) * y;
          sn += n1;
          sy += y;
        }
        out[4] = sn - x[V.F1];
        out[9] = sy - 1;
      },
      jacobian: opts.analytic === false ? undefined : (x, J) => {
        const n = N_VARS;
        for (let k = 0; k < 4; k++) {
          const y = x[V.y[k]];
          J[k * n + V.n1[k]] = 1;
          J[k * n + V.FM] = -MAKEUP[k];
          J[k * n + V.FR] = -y;
          J[k * n + V.y[k]] = -x[V.FR];
          const r = 5 + k;
          J[r * n + V.n1[k]] = 1;
          J[r * n + V.xi] = NU[k];
          J[r * n + V.FP] = -PRODUCT[k];
          J[r * n + V.FR] = -y;
          J[r * n + V.FG] = -y;
          J[r * n + V.y[k]] = -(x[V.FR] + x[V.FG]);
          J[4 * n + V.n1[k]] = 1;
          J[9 * n + V.y[k]] = 1;
        }
        J[4 * n + V.F1] = -1;
      },
    },
  };
}
