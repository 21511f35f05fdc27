/**
 * Feed: a plant reading -> molar flow. The entry point of the tool.
 *
 * A gas meter reads actual volume flow Q at line T and P; the molar flow is Q / v with v the
 * real-gas molar volume Z R T / P from the file's equation of state. For a differential-
 * pressure meter set up for a design density rho_d, the indicated volume flow is corrected by
 * the square root of the density ratio (ISO 5167-1:2003, clause 4: q_m = C E eps (pi/4) d^2
 * sqrt(2 dp rho), so an instrument that takes rho_d for rho indicates q_v sqrt(rho / rho_d)):
 *   q_v,actual = q_v,indicated sqrt(rho_d / rho),  q_m = q_v,indicated sqrt(rho_d rho).
 */
import type { FieldReader } from '../flowsheet/fields.js';
import type { FeedBasis, FeedSpec, MeterDesign, MeterUncertainty } from '../flowsheet/model.js';
import { getIn, isSettingMap, setIn } from '../flowsheet/settings.js';
import { R } from '../thermo/constants.js';
import { eosWork, type Eos } from '../thermo/types.js';
import { makeEos } from '../thermo/eos.js';
import { makeMeterEos, meterEosFor, type MeterEos, type MeterEosName, type MeterPhase } from '../thermo/meter-eos.js';
import type { BlockDef, Stream, UnitSummary } from './types.js';

/** Phase class of a feed at its meter (or stream) conditions; 'dense': supercritical and liquid-like (see src/thermo/meter-eos.ts). */
export type FeedPhase = MeterPhase;

export interface FeedResult {
  name: string;
  /** Compressibility factor at the feed (meter) conditions. */
  Z: number;
  /** m3/mol at the feed (meter) conditions. */
  molarVolume: number;
  /** mol/s */
  molarFlow: number;
  /** What the ideal-gas law would have given for the same reading (volumetric bases only). */
  idealMolarFlow?: number;
  /** (ideal - real) / real. */
  idealError?: number;
  phase: FeedPhase;
  /** The equation that converted the reading (the meter EOS, or the file's EOS where it fell back). */
  model: MeterEosName;
  /** Why the file's EOS converted this reading instead of the meter EOS, when it did. */
  fallback?: string;
  /**
   * Metered feeds: log-derivatives of the molar volume at the meter, (d ln v / d ln P)_T and
   * (d ln v / d ln T)_P (-1 and 1 for an ideal gas), and whether the conversion is sensitive there.
   */
  sensitivity?: { pressure: number; temperature: number; nearCritical: boolean };
  /** Metered feeds: the instrument uncertainties the file declares (`meter.uncertainty`). */
  uncertainty?: MeterUncertainty;
  /** Component molar flows, mol/s. */
  flows: Float64Array;
  /** Mole fractions. */
  composition: Float64Array;
  /** Stream temperature (K) and pressure (Pa): where the feed enters the flowsheet. */
  T: number;
  P: number;
  /**
   * Where Z, molarVolume, density and phase hold: the meter's temperature (K) and pressure (Pa) for
   * a metered feed (which may differ from the stream's T and P, a meter upstream of a compressor
   * or a heater), else the stream's.
   */
  conditions: { T: number; P: number };
  /** kg/mol of the mixture. */
  molarMass: number;
  /** kg/m3 at the feed conditions. */
  density: number;
  basis: FeedSpec['basis']['kind'];
  /** For standard-flow feeds: the reference used. */
  reference?: { name: string; label: string; T: number; P: number; basis: 'real' | 'ideal' };
  /** For corrected differential-pressure meters: sqrt(rho_d / rho). */
  densityCorrection?: number;
  warnings: string[];
}

/** Mixture molar mass, kg/mol. */
export function mixtureMolarMass(eos: Eos, x: ArrayLike<number>): number {
  let m = 0;
  for (let i = 0; i < eos.n; i++) m += x[i] * eos.components[i].MW;
  return m;
}

/**
 * Phase of a stream at T, P: a pure component by its stable root; a mixture by the
 * tangent-plane stability test (Michelsen 1982), then the stable root; 'dense' for a
 * supercritical, liquid-like state (the rules are in src/thermo/meter-eos.ts).
 */
export function phaseAt(eos: Eos, T: number, P: number, x: ArrayLike<number>): FeedPhase {
  if (eos.name === 'ideal') return 'vapor';
  return makeMeterEos(eos.name, eos).state(T, P, x).phase;
}

/**
 * SRK over the components of an ideal-gas equation of state, for the phase of a gas meter's state
 * (kept in the equation's work area); undefined when a component lacks Tc, Pc or omega.
 */
function idealPhaseCheck(eos: Eos): MeterEos | undefined {
  return eosWork<{ m: MeterEos | undefined }>(eos, 'idealPhaseCheck', () => {
    try {
      return { m: makeMeterEos('SRK', makeEos('SRK', eos.components)) };
    } catch {
      return { m: undefined };
    }
  }).m;
}

/**
 * A feed's reading -> molar flow. `meter` chooses the equation for every meter and standard-volume
 * conversion (and the Z, density and phase the feed reports); without it, the file's EOS `eos`.
 * Pass the runtime's meter EOS: making one per call costs time (and, for GERG-2008, a model).
 */
export function computeFeed(spec: FeedSpec, eos: Eos, meter: MeterEos = makeMeterEos(eos.name, eos)): FeedResult {
  const z = spec.composition;
  const b = spec.basis;
  // Z, density and phase at the meter's conditions for a metered feed, else at the stream's.
  const T = b.kind === 'meter' ? b.T : spec.T;
  const P = b.kind === 'meter' ? b.P : spec.P;
  const warnings: string[] = [];
  const st = meter.state(T, P, z);
  const Z = st.Z;
  const v = st.v;
  let phase = st.phase;
  if (st.model === 'ideal') {
    // The ideal-gas law has no liquid, so it calls every state a gas: a gas meter's reading is
    // checked with SRK over the same components instead (propane at 21 bar and 20 degC is a liquid).
    const srk = idealPhaseCheck(eos);
    if (srk) {
      phase = srk.state(T, P, z).phase;
      if (phase !== 'vapor') warnings.push(`feed \`${spec.name}\`: the ideal-gas law has no liquid; tested with SRK, this state is ${phase === 'dense' ? 'a dense fluid' : phase}`);
    }
  }
  let model = st.model;
  let fallback = st.fallback;
  const nearCritical = st.nearCritical;
  const dlnvdlnP = st.dlnvdlnP;
  const dlnvdlnT = st.dlnvdlnT;
  const outside = st.outsideNormalRange;
  const Tpc = st.Tpc;
  const vpc = st.vpc;
  const MW = mixtureMolarMass(eos, z);
  const rho = MW / v;
  let molarFlow: number;
  let idealMolarFlow: number | undefined;
  let reference: FeedResult['reference'];
  let densityCorrection: number | undefined;
  switch (b.kind) {
    case 'meter': {
      if (b.design) {
        let rhoD: number;
        let rhoDIdeal: number;
        if (b.design.density !== undefined) {
          rhoD = b.design.density;
          rhoDIdeal = rhoD;
        } else {
          const zc = b.design.composition ?? z;
          const Td = b.design.T!;
          const Pd = b.design.P!;
          const Md = mixtureMolarMass(eos, zc);
          rhoD = Md / meter.molarVolume(Td, Pd, zc);
          rhoDIdeal = (Md * Pd) / (R * Td);
        }
        densityCorrection = Math.sqrt(rhoD / rho);
        molarFlow = (b.flow * Math.sqrt(rhoD * rho)) / MW;
        const rhoIdeal = (MW * P) / (R * T);
        idealMolarFlow = (b.flow * Math.sqrt(rhoDIdeal * rhoIdeal)) / MW;
      } else {
        molarFlow = b.flow / v;
        idealMolarFlow = (b.flow * P) / (R * T);
      }
      if (phase === 'liquid' || phase === 'two-phase') {
        warnings.push(`feed \`${spec.name}\` is ${phase === 'liquid' ? 'liquid' : 'two-phase (gas and liquid)'} at the meter conditions (${fmt(T)} K, ${fmt(P)} Pa): a gas-meter reading is not valid there`);
      } else if (phase === 'dense') {
        warnings.push(`feed \`${spec.name}\` is a dense fluid at the meter conditions (${fmt(T)} K, ${fmt(P)} Pa): above its pseudo-critical temperature (${fmt(Tpc)} K) at ${fmt(rho)} kg/m3, denser than its pseudo-critical density (${fmt(MW / vpc)} kg/m3) and compressed like a liquid (1 % of pressure changes the density by ${fmt(Math.abs(dlnvdlnP))} %); a gas meter is not reading a gas here: check that the meter is rated and calibrated for this fluid`);
      }
      if (nearCritical) {
        warnings.push(`feed \`${spec.name}\`: the conversion is sensitive at the meter conditions (near the critical point): 1 % of pressure changes the density by ${fmt(Math.abs(dlnvdlnP))} %, 1 K by ${fmt((100 * Math.abs(dlnvdlnT)) / T)} % (flagged above 3 % and 1 %); the line pressure and temperature must be known closely`);
      }
      break;
    }
    case 'standard-flow': {
      const ref = b.reference;
      const vIdeal = (R * ref.T) / ref.P;
      let vRef = vIdeal;
      if (b.realGas) {
        const rs = meter.state(ref.T, ref.P, z);
        vRef = rs.v;
        model = rs.model;
        fallback = rs.fallback;
        if (rs.phase !== 'vapor') warnings.push(`feed \`${spec.name}\` would not be all gas at its standard reference (${ref.label}); its standard volume is not well defined`);
      }
      molarFlow = b.flow / vRef;
      idealMolarFlow = b.flow / vIdeal;
      reference = { name: ref.name, label: ref.label, T: ref.T, P: ref.P, basis: b.realGas ? 'real' : 'ideal' };
      break;
    }
    case 'molar-flow':
      molarFlow = b.flow;
      break;
    case 'mass-flow':
      molarFlow = b.flow / MW;
      break;
    case 'flows': {
      molarFlow = 0;
      for (let i = 0; i < b.flows.length; i++) molarFlow += b.flows[i];
      break;
    }
  }
  const converts = b.kind === 'meter' || (b.kind === 'standard-flow' && b.realGas);
  if (converts && fallback) {
    warnings.push(`feed \`${spec.name}\`: ${fallback}, so this reading is converted with ${model} (the file's equation of state) instead of ${meter.name}`);
  }
  if (converts && outside && model === 'GERG-2008' && b.kind === 'meter') warnings.push(gergRangeWarning(spec.name, meter, T, P, z));
  const flows = new Float64Array(z.length);
  if (b.kind === 'flows') flows.set(b.flows);
  else for (let i = 0; i < z.length; i++) flows[i] = molarFlow * z[i];
  return {
    name: spec.name, Z, molarVolume: v, molarFlow,
    idealMolarFlow,
    idealError: idealMolarFlow !== undefined ? (idealMolarFlow - molarFlow) / molarFlow : undefined,
    phase, model,
    // Every field set on every result (undefined where it does not apply): one object shape.
    fallback: converts && fallback ? fallback : undefined,
    sensitivity: b.kind === 'meter' ? { pressure: dlnvdlnP, temperature: dlnvdlnT, nearCritical } : undefined,
    uncertainty: b.kind === 'meter' ? b.uncertainty : undefined,
    flows, composition: z, T: spec.T, P: spec.P, conditions: { T, P }, molarMass: MW, density: rho, basis: b.kind, reference, densityCorrection, warnings,
  };
}

/** The warning for a GERG-2008 conversion outside its normal range, with the authors' figure there. */
function gergRangeWarning(name: string, meter: MeterEos, T: number, P: number, z: ArrayLike<number>): string {
  const u = meter.modelUncertainty(T, P, z);
  const figure = u.relative === null ? 'GERG-2008 states no uncertainty there' : `its uncertainty in density there is about ${fmt(200 * u.relative)} % (k = 2)`;
  return `feed \`${name}\`: the meter conditions (${fmt(T)} K, ${fmt(P)} Pa) are outside GERG-2008's normal range (90 K to 450 K, up to 35 MPa): ${figure}`;
}

function fmt(v: number): string {
  return Number(v.toPrecision(6)).toString();
}

/** The ways a feed's flow can be given; exactly one of them. */
export const FLOW_FORMS = ['meter', 'molar-flow', 'mass-flow', 'standard-flow', 'flows'] as const;

/**
 * The feed block: reads a feed's composition and flow, converts the reading to a molar flow
 * when it is built (computeFeed), and offers `feeds.NAME.{molar-flow,Z,ideal-error}`.
 */
export const feed: BlockDef<FeedSpec> & { result(rt: unknown): FeedResult } = {
  type: 'feed',
  description: 'a fresh feed: composition and one flow reading (meter, molar, mass, standard volume or per component)',
  keys: ['composition', 'mass-composition', 'normalize', ...FLOW_FORMS, 'T', 'P'],
  read: readFeed,
  build(spec, ctx) {
    const r = computeFeed(spec, ctx.eos, ctx.meter ?? meterEosFor(ctx.model.thermo.meterEos, ctx.eos));
    return Object.assign(
      {
        spec,
        compute(_ins: readonly Stream[], outs: Stream[]) {
          const o = outs[0];
          o.flows.set(r.flows);
          o.T = r.T;
          o.P = r.P;
          o.vf = r.phase === 'vapor' ? 1 : r.phase === 'liquid' ? 0 : Number.NaN;
          return null;
        },
        summary: () => feedSummary(r),
      },
      { feedResult: r },
    );
  },
  outputs: () => [
    { name: 'molar-flow', dimension: 'molarFlow', read: (u) => u.figures.find((f) => f.key === 'molarFlow')?.value ?? Number.NaN },
    { name: 'Z', dimension: 'dimensionless', read: (u) => u.figures.find((f) => f.key === 'Z')?.value ?? Number.NaN },
    { name: 'ideal-error', dimension: 'dimensionless', read: (u) => u.figures.find((f) => f.key === 'idealError')?.value ?? Number.NaN },
  ],
  structure: () => ({ passes: () => true }),
  edit(_name, settings, key, value) {
    // A mole fraction of a composition: the others keep their proportions, so the fractions
    // still add up to 1 (with `normalize: true` the block scales them anyway).
    if (key.length === 2 && (key[0] === 'composition' || key[0] === 'mass-composition') && settings.get('normalize') !== true) {
      const comp = getIn(settings, [key[0]]);
      if (isSettingMap(comp)) {
        const old = comp.get(key[1]) as number;
        const rest = 1 - old;
        if (!(value >= 0 && value <= 1)) return { error: `a fraction of \`${key[0]}\` must lie between 0 and 1, not ${value}` };
        if (rest <= 0 && value < 1) return { error: `\`${key[0]}.${key[1]}\` is the only component of the feed; it cannot change alone`, help: 'add the other components to the composition (at 0) first' };
        const next = new Map(comp);
        for (const [id, x] of comp) next.set(id, id === key[1] ? value : rest > 0 ? ((x as number) * (1 - value)) / rest : 0);
        return setIn(settings, [key[0]], next);
      }
    }
    return setIn(settings, key, value);
  },
  /** The converted reading of a built feed block. */
  result(rt: unknown): FeedResult {
    return (rt as { feedResult: FeedResult }).feedResult;
  },
};

/** A converted feed as a unit summary (what `feeds.NAME.*` report paths read). */
export function feedSummary(r: FeedResult): UnitSummary {
  return {
    figures: [
      { label: 'molar flow', value: r.molarFlow, kind: 'molarFlow', key: 'molarFlow' },
      { label: 'Z', value: r.Z, kind: 'fraction', key: 'Z' },
      { label: 'ideal-gas error', value: r.idealError ?? Number.NaN, kind: 'fraction', key: 'idealError' },
    ],
    notes: r.warnings,
  };
}

function readFeed(name: string, f: FieldReader): FeedSpec | undefined {
  const what = f.what;
  f.checkKeys(feed.keys);
  const forms = FLOW_FORMS.filter((k) => f.has(k));
  if (forms.length === 0) {
    if (f.strayNear(...FLOW_FORMS)) return undefined; // a misspelt flow key is reported already
    f.error(null, `${what} has no flow`, 'give one of `meter: { flow, pressure, temperature }`, `molar-flow`, `mass-flow`, `standard-flow` or `flows`');
    return undefined;
  }
  if (forms.length > 1) {
    f.errorAtKey(forms[1], `${what} gives its flow ${forms.length} ways (${forms.join(', ')})`, 'keep one of them');
    return undefined;
  }
  const form = forms[0];
  const normalize = f.boolean('normalize') ?? false;

  // Composition (mole fractions). A problem here is reported, and the rest is still read.
  let composition: Float64Array | undefined;
  let flowsSI: Float64Array | undefined;
  readComposition: {
    if (form === 'flows') {
      const ce = f.has('composition') ? 'composition' : f.has('mass-composition') ? 'mass-composition' : undefined;
      if (ce) f.errorAtKey(ce, `${what} gives \`flows\` per component, so it takes no composition`, 'remove the composition: it follows from the flows');
      const fl = f.componentValues('flows', { dimension: 'molarFlow', min: 0 });
      if (!fl) break readComposition;
      flowsSI = fl.values;
      const total = flowsSI.reduce((a, b) => a + b, 0);
      if (!(total > 0)) {
        f.errorAtKey('flows', `the flows of ${what} add up to zero`, 'give at least one positive component flow');
        break readComposition;
      }
      composition = flowsSI.map((v) => v / total);
    } else {
      if (f.has('composition') && f.has('mass-composition')) {
        f.errorAtKey('mass-composition', `${what} gives both \`composition\` and \`mass-composition\``, 'keep one of them');
        break readComposition;
      }
      const key = f.has('composition') ? 'composition' : f.has('mass-composition') ? 'mass-composition' : undefined;
      if (!key) {
        if (f.strayNear('composition', 'mass-composition')) break readComposition;
        f.error(null, `${what} has no composition`, 'add `composition: { H2: 0.985, N2: 0.015 }` (mole fractions) or `mass-composition`');
        break readComposition;
      }
      const frac = percentsOrFractions(f, key, normalize);
      if (!frac) break readComposition;
      const sum = frac.reduce((a, b) => a + b, 0);
      if (!(sum > 0)) {
        f.error(key, `the ${key} of ${what} is all zero`, 'give at least one positive fraction');
        break readComposition;
      }
      if (Math.abs(sum - 1) > 1e-6 && !normalize) {
        f.error(key, `${key} of ${what} sums to ${Number(sum.toPrecision(8))}, not 1`, 'give every component, or add `normalize: true` to scale the fractions to 1');
        break readComposition;
      }
      if (key === 'mass-composition') {
        const moles = frac.map((w, i) => w / f.components[i].MW);
        const t = moles.reduce((a, b) => a + b, 0);
        composition = moles.map((m) => m / t);
      } else composition = frac.map((v) => v / sum);
    }
  }

  // Flow basis.
  let basis: FeedBasis | undefined;
  let T: number | undefined;
  let P: number | undefined;
  if (form === 'meter') {
    const m = f.sub('meter');
    if (!m) return undefined;
    m.checkKeys(['flow', 'pressure', 'temperature', 'design', 'uncertainty']);
    const flow = m.quantity('flow', 'volumeFlow', { required: true, above: 0, example: '12.6 m3/h' });
    const Pm = m.quantity('pressure', 'pressure', { required: true, above: 0, example: '30 barg' });
    const Tm = m.quantity('temperature', 'temperature', { required: true, above: 0, example: '35 degC' });
    let design: MeterDesign | undefined;
    const d = m.sub('design');
    if (d) {
      d.checkKeys(['pressure', 'temperature', 'composition', 'density']);
      design = {};
      if (d.has('density') && (d.has('pressure') || d.has('temperature') || d.has('composition'))) {
        d.errorAtKey('density', `\`meter.design\` of ${what} gives a density and a design state`, 'give either `density`, or `pressure` and `temperature` (and optionally `composition`)');
      } else if (d.has('density')) {
        design.density = d.quantity('density', 'density', { above: 0, example: '2.5 kg/m3' });
      } else if (!d.has('pressure') || !d.has('temperature')) {
        d.error(null, `\`meter.design\` of ${what} needs \`pressure\` and \`temperature\` (or \`density\`)`, 'for example `design: { pressure: 28 barg, temperature: 30 degC }`');
      } else {
        design.P = d.quantity('pressure', 'pressure', { above: 0, example: '28 barg' });
        design.T = d.quantity('temperature', 'temperature', { above: 0, example: '30 degC' });
        if (d.has('composition')) {
          const c = d.componentValues('composition', { min: 0, max: 1 });
          if (c) {
            const sum = c.values.reduce((a, b) => a + b, 0);
            if (Math.abs(sum - 1) > 1e-6) d.error('composition', `the design composition of ${what} sums to ${Number(sum.toPrecision(8))}, not 1`, 'give mole fractions that sum to 1');
            else design.composition = c.values;
          }
        }
      }
    }
    const uncertainty = m.has('uncertainty') ? readUncertainty(m, what, Pm) : undefined;
    if (flow === undefined || Pm === undefined || Tm === undefined) return undefined;
    basis = { kind: 'meter', flow, T: Tm, P: Pm, design, ...(uncertainty ? { uncertainty } : {}) };
    T = Tm;
    P = Pm;
  } else if (form === 'molar-flow') {
    const v = f.quantity('molar-flow', 'molarFlow', { above: 0, example: '4.2 mol/s' });
    if (v === undefined) return undefined;
    basis = { kind: 'molar-flow', flow: v };
  } else if (form === 'mass-flow') {
    const v = f.quantity('mass-flow', 'massFlow', { above: 0, example: '120 kg/h' });
    if (v === undefined) return undefined;
    basis = { kind: 'mass-flow', flow: v };
  } else if (form === 'standard-flow') {
    let q: { value: number; reference: { name: string } } | undefined;
    let realGas = true;
    if (f.isMapping('standard-flow')) {
      const s = f.sub('standard-flow')!;
      s.checkKeys(['flow', 'reference', 'basis']);
      let ref;
      if (s.has('reference')) {
        ref = s.standardReference('reference');
        if (!ref) return undefined; // unknown (reported) or failed earlier (reported)
      }
      const b = s.string('basis');
      if (b !== undefined && b !== 'real' && b !== 'ideal') s.error('basis', '`basis` must be `real` (real-gas volume at the reference, ISO 13443) or `ideal`');
      else if (b !== undefined) realGas = b === 'real';
      if (!s.has('flow')) {
        s.error(null, `\`standard-flow\` of ${what} has no \`flow\``, 'for example `standard-flow: { flow: 120 m3/h, reference: plant }`');
        return undefined;
      }
      q = s.standardFlow('flow', ref);
    } else {
      q = f.standardFlow('standard-flow');
    }
    if (!q) return undefined;
    basis = { kind: 'standard-flow', flow: q.value, reference: q.reference as never, realGas };
  } else if (flowsSI) {
    basis = { kind: 'flows', flows: flowsSI };
  }
  if (form !== 'meter') {
    T = f.quantity('T', 'temperature', { above: 0, example: '35 degC' });
    P = f.quantity('P', 'pressure', { above: 0, example: '30 barg' });
    if (!f.has('T') && !f.strayNear('T')) f.error(null, `${what} has no temperature`, 'add `T: 35 degC` (the stream temperature)');
    if (!f.has('P') && !f.strayNear('P')) f.error(null, `${what} has no pressure`, 'add `P: 30 barg` (the stream pressure)');
  } else {
    // A metered feed enters at the meter's conditions unless T or P of the stream are given
    // (a meter upstream of a compressor or a heater, say).
    if (f.has('T')) T = f.quantity('T', 'temperature', { above: 0, example: '35 degC' });
    if (f.has('P')) P = f.quantity('P', 'pressure', { above: 0, example: '30 barg' });
  }
  if (T === undefined || P === undefined || !basis || !composition) return undefined;
  return { name, type: 'feed', inlets: [], outlets: [name], composition, basis, T, P };
}

/** Largest temperature uncertainty read as a difference; above it the value was written on an offset scale. */
const MAX_TEMPERATURE_UNCERTAINTY = 50;

/**
 * `meter.uncertainty: { flow: 1.5 %, pressure: 0.1 bar, temperature: 0.5 K, stated-as: standard }`:
 * the instrument uncertainties of a metered feed. flow: relative (`%` or a fraction); pressure and
 * temperature: differences (bar, kPa, psi; K). stated-as: `standard` (the default: standard
 * uncertainties, k = 1), `expanded` (k = 2, as calibration certificates state them) or `limits`
 * (plus or minus a, as data sheets state accuracies: a rectangular distribution, u = a / sqrt(3)).
 */
function readUncertainty(m: FieldReader, what: string, Pline: number | undefined): MeterUncertainty | undefined {
  const u = m.sub('uncertainty');
  if (!u) return undefined;
  u.checkKeys(['flow', 'pressure', 'temperature', 'stated-as']);
  const out: MeterUncertainty = { statedAs: 'standard' };
  const statedAs = u.string('stated-as', { oneOf: ['standard', 'expanded', 'limits'] });
  if (statedAs) out.statedAs = statedAs as MeterUncertainty['statedAs'];
  const flow = u.quantity('flow', 'dimensionless', { min: 0, max: 0.5, example: '1.5 %' });
  if (flow !== undefined) out.flow = flow;
  // A difference: a gauge unit (barg, psig), which would add the atmosphere, is refused.
  const p = u.quantity('pressure', 'pressure', { min: 0, example: '0.1 bar', difference: true });
  if (p !== undefined) {
    // An uncertainty above a tenth of the reading is no meter reading at all (a wrong unit, mbar
    // for bar, say).
    if (Pline !== undefined && p > 0.1 * Pline) {
      u.error('pressure', `the pressure uncertainty of ${what} reads as ${fmt(p)} Pa, more than a tenth of the line pressure (${fmt(Pline)} Pa absolute)`,
        'write it as a difference in bar, kPa or psi (`0.1 bar`), and check the number and the unit');
    } else out.pressure = p;
  }
  const t = u.quantity('temperature', 'temperature', { min: 0, example: '0.5 K' });
  if (t !== undefined) {
    if (t > MAX_TEMPERATURE_UNCERTAINTY) {
      u.error('temperature', `the temperature uncertainty of ${what} reads as ${fmt(t)} K: degC and degF are scales with an offset, not differences`,
        'write the difference in kelvin: `0.5 K` for plus or minus 0.5 degC');
    } else out.temperature = t;
  }
  if (out.flow === undefined && out.pressure === undefined && out.temperature === undefined && !u.has('flow') && !u.has('pressure') && !u.has('temperature')) {
    u.error(null, `\`meter.uncertainty\` of ${what} declares nothing`, 'give at least one of `flow: 1.5 %`, `pressure: 0.1 bar`, `temperature: 0.5 K`');
    return undefined;
  }
  return out;
}

/**
 * Mole (or mass) fractions; numbers that look like percentages (every value between 1 and 100
 * and a sum near 100) without `normalize: true` get one message that says so.
 */
function percentsOrFractions(f: FieldReader, key: string, normalize: boolean): Float64Array | undefined {
  if (!normalize) {
    const raw = f.componentValues(key, { min: 0 });
    if (!raw) return undefined;
    const vals = raw.given.map((i) => raw.values[i]);
    const sum = vals.reduce((a, b) => a + b, 0);
    if (vals.some((v) => v > 1)) {
      if (sum > 90 && sum < 110) {
        f.error(key, `the ${key} of ${f.what} looks like percentages (they add up to ${Number(sum.toPrecision(6))})`, 'add `normalize: true` to scale them to fractions, or write fractions (0.68 for 68 %)');
      } else {
        f.error(key, `the ${key} of ${f.what} holds values above 1 (they add up to ${Number(sum.toPrecision(6))})`, 'write mole fractions between 0 and 1, or add `normalize: true` to scale the values to 1');
      }
      return undefined;
    }
    return raw.values;
  }
  return f.componentValues(key, { min: 0 })?.values;
}
