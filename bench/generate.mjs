// Generated flowsheets for the scaling benchmark: N units, C components, recycle loops nested
// three deep. The flowsheets are invented; the extra components (beyond the built-in table) are
// invented too, with constants in the range of light hydrocarbons. This is a benchmark, not a
// check: nothing here is compared with published values.
//
// Layout: a train of stages of five units each,
//   mix-k -> rx-k -> cool-k -> split-k -> (next stage)
//                          \-> sep-k  -> product-k
// with three levels of recycle:
//   inner:  split-k returns part of its gas to mix-k, sep-k returns part of its liquid to mix-k;
//   group:  the last splitter of every group of G stages returns gas to the group's first mixer;
//   outer:  the last splitter of the train returns gas to the first mixer (and purges the rest).
// Each group's first mixer also takes a fresh feed. The reactors run C2H4 + H2 -> C2H6 at a
// fixed conversion; the condensers use the fixed-split model (or the equilibrium flash when
// asked, which is much slower per pass).

/** Invented constants for components beyond the built-in table: light-hydrocarbon-like. */
function inventedComponent(k) {
  // A smooth family: Tc from 200 to ~480 K, Pc from 50 to ~30 bar, omega from 0.02 to ~0.3.
  const t = (k % 40) / 40;
  const Tc = (200 + 280 * t).toFixed(1);
  const Pc = (50 - 20 * t).toFixed(2);
  const omega = (0.02 + 0.28 * t).toFixed(3);
  const carbons = 1 + (k % 6);
  const formula = `C${carbons}H${2 * carbons + 2}`;
  // Ideal-gas heat capacity and enthalpy of formation (the energy balance needs them), also
  // invented, growing with the carbon number as the alkanes' do.
  const cp = (20 + 22 * carbons).toFixed(1);
  const hf = (-(50 + 21 * carbons)).toFixed(1);
  return { id: `X${k}`, body: `{ Tc: ${Tc} K, Pc: ${Pc} bar, omega: ${omega}, formula: ${formula}, cp: ${cp} J/(mol K), hf: ${hf} kJ/mol }` };
}

/** Built-in components used first (the reaction needs H2, C2H4, C2H6). */
const BUILTIN = [
  'H2', 'C2H4', 'C2H6', 'CH4', 'N2', 'Ar', 'CO', 'CO2', 'C3H8', 'C3H6', 'nC4H10', 'iC4H10', 'nC5H12',
  'iC5H12', 'nC6H14', 'H2O', 'NH3', 'CH3OH', 'C2H5OH', 'H2S', 'SO2', 'COS', 'HCl', 'N2O', 'O2', 'He',
  'Ne', 'C2H2', 'C6H6', 'C7H8', 'C6H12', 'CH3OCH3', 'C2H4O', 'CH3CHO', 'CH2O', 'CH3COOH', 'Cl2', 'NO', 'SO3',
];

/** Component list (ids and YAML bodies) for C components. */
export function components(C) {
  if (C < 3) throw new RangeError('the generated flowsheets need at least 3 components');
  const out = [];
  for (let k = 0; k < C; k++) out.push(k < BUILTIN.length ? { id: BUILTIN[k], body: '{}' } : inventedComponent(k - BUILTIN.length));
  return out;
}

/**
 * YAML text of a generated flowsheet.
 * @param {{ units: number, components: number, groupSize?: number, condenser?: 'split' | 'equilibrium', method?: string }} o
 * @returns {{ text: string, units: number, stages: number, groups: number, loops: number }}
 */
export function generateFlowsheet(o) {
  const C = o.components;
  const stages = Math.max(1, Math.round(o.units / 5));
  const G = Math.max(1, o.groupSize ?? 5);
  const comps = components(C);
  const ids = comps.map((c) => c.id);
  const lines = [];
  lines.push(`# Generated benchmark flowsheet (invented): ${stages} stages, ${C} components.`);
  lines.push(`title: generated train, ${stages * 5} units, ${C} components`);
  lines.push('components:');
  for (const c of comps) lines.push(`  ${c.id}: ${c.body}`);
  lines.push('thermo: { eos: SRK }');
  lines.push(`solver: { method: ${o.method ?? 'wegstein'} }`);
  // Fresh feed: mostly hydrogen and ethylene, the rest spread over the other components.
  const frac = new Array(C).fill(0);
  frac[0] = 0.5;
  frac[1] = 0.3;
  frac[2] = 0.05;
  const restShare = 0.15 / (C - 3);
  for (let k = 3; k < C; k++) frac[k] = restShare;
  const comp = `{ ${ids.map((id, k) => `${id}: ${frac[k].toPrecision(12)}`).join(', ')} }`;
  lines.push('feeds:');
  const nGroups = Math.ceil(stages / G);
  for (let g = 0; g < nGroups; g++) {
    lines.push(`  fresh-${g}:`);
    lines.push(`    composition: ${comp}`);
    lines.push('    normalize: true');
    lines.push('    molar-flow: 10 kmol/h');
    lines.push('    T: 40 degC');
    lines.push('    P: 30 barg');
  }
  // Liquid split of the condensers: light components stay in the gas, heavier ones drop out.
  const split = `{ ${ids.map((id, k) => `${id}: ${k < 2 ? 0.001 : (0.02 + 0.3 * (k / C)).toFixed(4)}`).join(', ')} }`;
  lines.push('units:');
  let loops = 0;
  // A group loop for every complete group of G > 1 stages, when the train has more than one group.
  const hasGroup = (g) => G > 1 && stages > G && (g + 1) * G <= stages;
  for (let k = 0; k < stages; k++) {
    const g = Math.floor(k / G);
    const first = k % G === 0;
    const ins = [];
    if (first) ins.push(`fresh-${g}`);
    if (k > 0) ins.push(`next-${k - 1}`);
    ins.push(`gas-${k}`, `liq-${k}`);
    loops += 2;
    if (first && hasGroup(g)) {
      ins.push(`group-${g}`);
      loops++;
    }
    if (k === 0 && stages > 1) {
      ins.push('outer');
      loops++;
    }
    lines.push(`  mix-${k}: { type: mixer, in: [${ins.join(', ')}], out: rin-${k} }`);
    lines.push(`  rx-${k}:`);
    lines.push('    type: reactor');
    lines.push(`    in: rin-${k}`);
    lines.push(`    out: rout-${k}`);
    lines.push('    T: 120 degC');
    lines.push('    reactions:');
    lines.push('      - { equation: "C2H4 + H2 -> C2H6", key: C2H4, conversion: 0.2 }');
    lines.push(`  cool-${k}:`);
    lines.push('    type: condenser');
    lines.push(`    in: rout-${k}`);
    lines.push('    T: -20 degC');
    lines.push('    P: 29 barg');
    if ((o.condenser ?? 'split') === 'split') {
      lines.push('    model: split');
      lines.push(`    split: ${split}`);
    }
    lines.push(`    vapor: vap-${k}`);
    lines.push(`    liquid: cliq-${k}`);
    const outs = [`gas-${k}: 0.1`];
    if (k % G === G - 1 && hasGroup(g)) outs.push(`group-${g}: 0.1`);
    if (k === stages - 1) {
      if (stages > 1) outs.push("outer: 0.2");
      outs.push('purge: rest');
    } else outs.push(`next-${k}: rest`);
    lines.push(`  split-${k}: { type: splitter, in: vap-${k}, out: { ${outs.join(', ')} } }`);
    lines.push(`  sep-${k}:`);
    lines.push('    type: separator');
    lines.push(`    in: cliq-${k}`);
    lines.push(`    out: { product-${k}: { ${ids.slice(2).map((id) => `${id}: 0.9`).join(', ')} }, liq-${k}: rest }`);
  }
  // The recycles into the mixers are the tears an engineer would choose: one pass then carries
  // every change down the whole train (tearing each reactor outlet instead would need fewer
  // tears but move information one stage per pass).
  const tears = [];
  for (let k = 0; k < stages; k++) tears.push(`gas-${k}`, `liq-${k}`);
  for (let g = 0; g < nGroups; g++) if (hasGroup(g)) tears.push(`group-${g}`);
  if (stages > 1) tears.push('outer');
  lines.push(`tears: [${tears.join(', ')}]`);
  return { text: lines.join('\n') + '\n', units: stages * 5, stages, groups: nGroups, loops };
}
