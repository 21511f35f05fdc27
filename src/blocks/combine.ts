/**
 * Inlets combined into one stream: component flows added, pressure the lowest of the inlets,
 * temperature the molar-flow-weighted mean. The mean is no answer: it is where the blocks
 * start their PH flash from (the enthalpy balance decides the temperature), and the outlet
 * temperature of a file without thermal data whose unit keeps its inlet's. Shared by the blocks
 * that take several inlets.
 */
import type { Stream } from './types.js';

/** Adds the inlets' flows into `out.flows` and sets out.T and out.P as described above (a stand-in T if an inlet's is). */
export function combineInlets(ins: readonly Stream[], out: Stream): void {
  const f = out.flows;
  const n = f.length;
  f.fill(0);
  let pMin = Infinity;
  let tSum = 0;
  let fSum = 0;
  let standIn = false;
  for (const s of ins) {
    let tot = 0;
    for (let i = 0; i < n; i++) {
      f[i] += s.flows[i];
      tot += s.flows[i];
    }
    if (s.P < pMin) pMin = s.P;
    if (tot > 0 && Number.isFinite(s.T)) {
      tSum += s.T * tot;
      fSum += tot;
      if (s.standIn) standIn = true;
    }
  }
  out.standIn = standIn;
  out.P = Number.isFinite(pMin) ? pMin : Number.NaN;
  out.T = fSum > 0 ? tSum / fSum : ins[0]?.T ?? Number.NaN;
}
