/**
 * The meter equation of state: the one place that decides which model turns a meter reading (or a
 * standard volume) into a molar volume, and how the state at the meter is classed.
 *
 * A meter EOS is made once per runtime (or per command) for the file's components and its own
 * equation of state (the "file's EOS": SRK, PR or ideal, which the loop's units keep using):
 *
 *   const meter = makeMeterEos('GERG-2008', eos);
 *   const s = meter.state(T, P, x);          // { Z, v, phase, model, fallback, dlnvdlnP, dlnvdlnT, ... }
 *   const u = meter.modelUncertainty(T, P, x);  // the model's share of a meter's uncertainty budget
 *
 * Which model answers. With the meter EOS set to GERG-2008 (Kunz and Wagner, J. Chem. Eng. Data 57
 * (2012) 3032; src/thermo/gerg2008), a reading whose gas holds only GERG-2008's 21 components is
 * converted with GERG-2008; a gas with any other component present (NH3, CH3OH...) falls back to the
 * file's EOS for that reading, and `fallback` says why. With the meter EOS set to SRK, PR or ideal,
 * that equation answers. A GERG-2008 density that does not converge also falls back, and says so.
 *
 * Phase class (this project's rules, the same whichever model gives the density):
 *   - 'two-phase': the mixture splits at T and P by the tangent-plane stability test of the file's
 *     cubic equation (Michelsen, Fluid Phase Equilib. 9 (1982) 1; src/thermo/stability.ts);
 *   - 'dense' (liquid-like): above the pseudo-critical temperature, denser than the pseudo-critical
 *     density, and less than half as compressible as an ideal gas (|d ln v / d ln P| < 0.5; an ideal
 *     gas has 1, a liquid a few hundredths). Pseudo-critical values by Kay's rule (W. B. Kay, Ind.
 *     Eng. Chem. 28 (1936) 1014, from memory): Tpc = sum x_i Tc_i, v_pc = sum x_i Zc_i R Tc_i / Pc_i
 *     with Zc_i = 0.291 - 0.080 omega_i (Pitzer's correlation of the critical compressibility; Reid,
 *     Prausnitz and Poling, The Properties of Gases and Liquids, 4th ed., chapter 2, from memory).
 *     Carbon dioxide at 150 barg and 40 degC (about 780 kg/m3 against a critical density of
 *     468 kg/m3, |d ln v / d ln P| = 0.30) is dense: not a gas to a gas meter. The density test
 *     alone would also take a natural gas at 150 barg and 0 degC (1.02 of its pseudo-critical
 *     density by GERG-2008, 0.97 by SRK, but as compressible as an ideal gas) and hydrogen at
 *     1000 bar and 300 K (nine times its critical temperature) for liquid-like; the compressibility
 *     test keeps them gases. Both tests use values that do not depend much on the equation (the
 *     cubics' own critical volume, Zc = 1/3 for SRK, would move the line). The half is this
 *     project's choice;
 *   - 'liquid': at or below Tpc on the liquid root (the file's cubic picks the stable root by its
 *     Gibbs energy; GERG-2008 is then asked for its liquid-like root, and a GERG-2008 result on its
 *     liquid-like branch counts as liquid too);
 *   - 'vapor' otherwise.
 *
 * Sensitivity of the conversion: d ln v / d ln P at constant T and d ln v / d ln T at constant P,
 * analytic for every model (GERG-2008 from its dP/drho and dP/dT; the cubics from
 * P = RT/(V - b) - a(T)/((V + d1 b)(V + d2 b)); -1 and 1 for the ideal gas). A state is called
 * near-critical (the conversion is sensitive) when 1 % of pressure changes the density by more than
 * 3 % (|d ln v / d ln P| > 3) or 1 K changes it by more than 1 % (|d ln v / d T| > 0.01 / K): three
 * times what an ideal gas at 300 K shows (1 % and 0.33 %). Past that, a typical pair of line
 * transmitters (0.25 % of pressure and 0.5 K, common practice, no source) alone puts 0.75 % or more
 * into the molar flow, as much as a good gas meter's own uncertainty: the line state, not the meter,
 * then decides the reading. This threshold is this project's choice.
 *
 * Nothing here keeps module state: a meter EOS holds its scratch (and its GERG-2008 model, which
 * keeps scratch of its own), so it belongs to one runtime on one thread. `state` allocates nothing
 * when given its `out` object (the stability test of a mixture returns a small result object).
 */
import { R } from './constants.js';
import { CubicEos, type EosModel } from './eos.js';
import { GERG2008_IDS, gergDensityUncertainty, makeGerg2008, type Gerg2008Model } from './gerg2008/index.js';
import { emptyDensityResult, emptyProperties } from './gerg2008/model.js';
import { stabilityTest } from './stability.js';
import type { Eos, EosName } from './types.js';

/** The equations a meter can be converted with. */
export type MeterEosName = EosName | 'GERG-2008';

/** Phase class of a state at a meter (see the file header). */
export type MeterPhase = 'vapor' | 'liquid' | 'two-phase' | 'dense';

/** |d ln v / d ln P| below which a supercritical state denser than its pseudo-critical density is liquid-like ('dense'). */
export const DENSE_COMPRESSIBILITY = 0.5;
/** |d ln v / d ln P| above which a state is near-critical (1 % of pressure moves the density by more than 3 %). */
export const SENSITIVE_PRESSURE = 3;
/** |d ln v / d T| (1/K) above which a state is near-critical (1 K moves the density by more than 1 %). */
export const SENSITIVE_TEMPERATURE = 0.01;

/** GERG-2008's normal range (Kunz and Wagner 2012): 90 K to 450 K, up to 35 MPa. */
export const GERG_NORMAL_RANGE = { Tmin: 90, Tmax: 450, Pmax: 35e6 } as const;

/** The meter EOS named in a file or on the command line, or undefined. Spellings: GERG-2008, GERG2008, gerg; SRK; PR, Peng-Robinson; ideal. */
export function matchMeterEos(v: string): MeterEosName | undefined {
  const s = v.trim().toLowerCase().replace(/[\s_-]/g, '');
  if (s === 'gerg2008' || s === 'gerg') return 'GERG-2008';
  if (s === 'srk' || s === 'soaveredlichkwong') return 'SRK';
  if (s === 'pr' || s === 'pengrobinson') return 'PR';
  if (s === 'ideal' || s === 'idealgas') return 'ideal';
  return undefined;
}

/** What a meter EOS says about a state. SI: m3/mol, K, Pa. */
export interface MeterState {
  /** 'not-converged' only when no model found a density (then Z and v are not a solution). */
  status: 'converged' | 'not-converged';
  /** The model that gave Z: the meter EOS, or the file's EOS when it fell back. */
  model: MeterEosName;
  /** Why the file's EOS answered instead of the meter EOS ('' when it did not fall back). */
  fallback: string;
  Z: number;
  /** Molar volume, m3/mol. */
  v: number;
  phase: MeterPhase;
  /** (d ln v / d ln P) at constant T: -1 for an ideal gas. */
  dlnvdlnP: number;
  /** (d ln v / d ln T) at constant P: 1 for an ideal gas. */
  dlnvdlnT: number;
  /** The conversion is sensitive (see SENSITIVE_PRESSURE, SENSITIVE_TEMPERATURE). */
  nearCritical: boolean;
  /** Kay's pseudo-critical temperature (K) and molar volume (m3/mol) of the composition. */
  Tpc: number;
  vpc: number;
  /** GERG-2008 answered outside its normal range (90 K to 450 K, up to 35 MPa). */
  outsideNormalRange: boolean;
  /** What went wrong when status is 'not-converged'. */
  message: string;
}

export function emptyMeterState(): MeterState {
  return {
    status: 'converged', model: 'SRK', fallback: '', Z: NaN, v: NaN, phase: 'vapor', dlnvdlnP: NaN, dlnvdlnT: NaN,
    nearCritical: false, Tpc: NaN, vpc: NaN, outsideNormalRange: false, message: '',
  };
}

/** The model's share of a meter's uncertainty: relative standard uncertainty of the molar volume. */
export interface ModelUncertainty {
  /** The model this figure is for (the one that converts the reading at this state). */
  model: MeterEosName;
  /** Relative standard uncertainty (k = 1) of the molar volume, or null when there is no figure. */
  relative: number | null;
  distribution: 'normal' | 'rectangular';
  /**
   * 'stated': the reference equation's authors' figure for the region; 'measured': the relative
   * difference from GERG-2008 at this gas and state; 'bound': a bound of this project's choosing,
   * named as such in `source`; 'none': no figure.
   */
  kind: 'stated' | 'measured' | 'bound' | 'none';
  /** For 'measured': (v_model - v_GERG) / v_GERG at this state. */
  deviation?: number;
  /** For 'measured': GERG-2008's own stated uncertainty (the reference is not exact either). */
  reference?: ModelUncertainty;
  /** How the figure was obtained, in words (source, distribution and why). */
  source: string;
  notes: string[];
}

const EMPTY = new Float64Array(0);

/** A meter equation of state for the components of `eos` (see the file header). */
export class MeterEos {
  readonly name: MeterEosName;
  /** The file's equation of state (phase split, root choice, fallback). */
  readonly eos: Eos;
  readonly n: number;
  readonly ids: readonly string[];
  private readonly cubic: CubicEos | undefined;
  /** Critical temperature and Pitzer critical volume of each component (Kay's rule). */
  private readonly Tc: Float64Array;
  private readonly vc: Float64Array;
  /** Position of each component in the GERG-2008 model's order, or -1 when GERG-2008 lacks it. */
  private readonly gergIndex: Int32Array;
  private readonly gergIds: string[];
  private gergModel: Gerg2008Model | null | undefined;
  private readonly xg: Float64Array;
  private readonly dens = emptyDensityResult();
  private readonly props = emptyProperties();
  private readonly aOut = new Float64Array(4);
  private readonly scratch = emptyMeterState();

  constructor(name: MeterEosName, eos: Eos) {
    if (name !== 'GERG-2008' && name !== eos.name) {
      throw new RangeError(`makeMeterEos: a meter EOS ${name} over a file EOS ${eos.name}: give the ${name} equation of state itself, or GERG-2008`);
    }
    this.name = name;
    this.eos = eos;
    this.n = eos.n;
    this.ids = eos.components.map((c) => c.id);
    this.cubic = eos instanceof CubicEos ? eos : undefined;
    this.Tc = Float64Array.from(eos.components, (c) => c.Tc);
    this.vc = Float64Array.from(eos.components, (c) => ((0.291 - 0.08 * c.omega) * R * c.Tc) / c.Pc);
    const covered = new Set(GERG2008_IDS);
    this.gergIds = this.ids.filter((id) => covered.has(id));
    let k = 0;
    this.gergIndex = Int32Array.from(this.ids, (id) => (covered.has(id) ? k++ : -1));
    this.xg = this.gergIds.length ? new Float64Array(this.gergIds.length) : EMPTY;
  }

  /** The GERG-2008 model over the file's components it covers (made on first use), or null when it covers none. */
  private gerg(): Gerg2008Model | null {
    if (this.gergModel === undefined) this.gergModel = this.gergIds.length ? makeGerg2008(this.gergIds) ?? null : null;
    return this.gergModel;
  }

  /** The first component present in x that GERG-2008 does not cover, or ''. */
  uncovered(x: ArrayLike<number>): string {
    for (let i = 0; i < this.n; i++) if (x[i] > 0 && this.gergIndex[i] < 0) return this.ids[i];
    return '';
  }

  /** x restricted to GERG-2008's components and normalized, in this.xg (call only when uncovered(x) is ''). */
  private gergComposition(x: ArrayLike<number>): Float64Array {
    const xg = this.xg;
    xg.fill(0);
    let s = 0;
    for (let i = 0; i < this.n; i++) {
      const k = this.gergIndex[i];
      if (k >= 0) {
        xg[k] = x[i];
        s += x[i];
      }
    }
    for (let k = 0; k < xg.length; k++) xg[k] /= s;
    return xg;
  }

  /**
   * Z, molar volume, phase class and the log-derivatives of the molar volume at T (K), P (Pa) for
   * mole fractions x (length n, summing to 1). `phase: false` skips the stability test (a standard
   * reference or a design state: only v is wanted). Without `out`, the result is the meter EOS's
   * own scratch object, overwritten by the next call.
   */
  state(T: number, P: number, x: ArrayLike<number>, out: MeterState = this.scratch, options?: { phase?: boolean }): MeterState {
    const n = this.n;
    let sx = 0;
    let Tpc = 0;
    let vpc = 0;
    let present = 0;
    for (let i = 0; i < n; i++) {
      const xi = x[i];
      if (xi > 0) {
        present++;
        sx += xi;
        Tpc += xi * this.Tc[i];
        vpc += xi * this.vc[i];
      }
    }
    out.Tpc = Tpc / sx;
    out.vpc = vpc / sx;
    out.fallback = '';
    out.message = '';
    out.status = 'converged';
    out.outsideNormalRange = false;
    const eos = this.eos;
    const cubic = this.cubic;
    // The file's EOS: the phase split, the stable root's label and, unless GERG-2008 answers, Z.
    let split = false;
    if (cubic !== undefined && present > 1 && options?.phase !== false) split = !stabilityTest(eos, T, P, x).stable;
    let label: 'vapor' | 'liquid' = 'vapor';
    let Z: number;
    if (cubic !== undefined) {
      Z = cubic.zValue(T, P, x, 'stable');
      label = cubic.lastRoot;
    } else Z = (eos as EosModel).zValue ? (eos as EosModel).zValue(T, P, x) : eos.z(T, P, x).Z;
    let gergLiquid = false;
    let answered = false;
    if (this.name === 'GERG-2008') {
      const missing = this.uncovered(x);
      const g = missing === '' ? this.gerg() : null;
      if (missing !== '') out.fallback = `${missing} is not one of GERG-2008's 21 components`;
      else if (g === null) out.fallback = 'GERG-2008 covers none of the components';
      else {
        const xg = this.gergComposition(x);
        const d = g.density(T, P, xg, label === 'liquid' ? LIQUID_ROOT : GAS_ROOT, this.dens);
        if (d.status === 'converged') {
          const p = g.properties(T, d.D, xg, this.props);
          out.model = 'GERG-2008';
          out.Z = d.Z;
          out.v = 1 / d.D;
          out.dlnvdlnP = -P / (d.D * p.dPdD);
          out.dlnvdlnT = (T * p.dPdT) / (d.D * p.dPdD);
          out.outsideNormalRange = T < GERG_NORMAL_RANGE.Tmin || T > GERG_NORMAL_RANGE.Tmax || P > GERG_NORMAL_RANGE.Pmax;
          gergLiquid = d.root === 'liquid' || d.phase === 'liquid-like';
          answered = true;
        } else {
          out.fallback = `GERG-2008 found no density here (${d.message})`;
        }
      }
    }
    if (!answered) {
      out.model = eos.name;
      out.Z = Z;
      out.v = (Z * R * T) / P;
      if (cubic !== undefined) this.cubicDerivatives(cubic, T, P, x, out);
      else {
        out.dlnvdlnP = -1;
        out.dlnvdlnT = 1;
      }
      if (!(Z > 0) || !Number.isFinite(Z)) {
        out.status = 'not-converged';
        out.message = `no molar volume at ${T} K and ${P} Pa`;
      }
    }
    if (split) out.phase = 'two-phase';
    else if (T > out.Tpc) out.phase = out.v < out.vpc && Math.abs(out.dlnvdlnP) < DENSE_COMPRESSIBILITY ? 'dense' : 'vapor';
    else out.phase = label === 'liquid' || gergLiquid ? 'liquid' : 'vapor';
    out.nearCritical = Math.abs(out.dlnvdlnP) > SENSITIVE_PRESSURE || Math.abs(out.dlnvdlnT) / T > SENSITIVE_TEMPERATURE;
    return out;
  }

  /** Molar volume (m3/mol) at T, P for x, by the same choice of model as `state` (no phase test). */
  molarVolume(T: number, P: number, x: ArrayLike<number>): number {
    return this.state(T, P, x, this.scratch, NO_PHASE).v;
  }

  /** d ln v / d ln P and d ln v / d ln T of the cubic's chosen root (v and Z already in out). */
  private cubicDerivatives(cubic: CubicEos, T: number, P: number, x: ArrayLike<number>, out: MeterState): void {
    const ad = cubic.aDerivatives(T, x, this.aOut);
    const a = ad[0];
    const da = ad[1];
    const b = ad[3];
    const d1 = cubic.params.delta1;
    const d2 = cubic.params.delta2;
    const V = out.v;
    const q = (V + d1 * b) * (V + d2 * b);
    const dPdV = (-R * T) / ((V - b) * (V - b)) + (a * (2 * V + (d1 + d2) * b)) / (q * q);
    const dPdT = R / (V - b) - da / q;
    out.dlnvdlnP = P / (V * dPdV);
    out.dlnvdlnT = -(T / V) * (dPdT / dPdV);
  }

  /**
   * The model's relative standard uncertainty in the molar volume at T, P for x (see
   * ModelUncertainty), for the meter's uncertainty budget:
   *   - GERG-2008 in its range: the authors' stated expanded (k = 2) figure for the region, halved
   *     (normal distribution, as the paper states k = 2);
   *   - SRK, PR or the ideal gas on a gas GERG-2008 covers: measured. The relative difference
   *     delta = (v - v_GERG) / v_GERG at this gas and state is a correction that is known and not
   *     applied (the reading is converted with the cubic); it is taken as the half-width of a
   *     rectangular distribution (JCGM 100:2008, 4.3.7), u = |delta| / sqrt(3), so that the
   *     expanded interval (k = 2, 1.15 |delta|) holds the reference value; GERG-2008's own stated
   *     figure is given beside it (`reference`), to be combined as a separate line;
   *   - a gas GERG-2008 does not cover (or a state where it found no density): no figure can be
   *     measured. Instead |1 - Z| of the equation used is taken as the half-width of a rectangular
   *     distribution: this project's bound (the cubic is taken to be no further from the truth than
   *     the ideal-gas law is from the cubic), not a measured figure; the result says so.
   */
  modelUncertainty(T: number, P: number, x: ArrayLike<number>, state?: MeterState): ModelUncertainty {
    // `state`: this.state(T, P, x) when the caller has just made it (the same figures, not made
    // again); made without the phase test it must have found a vapor (a split would change
    // nothing read here: the two-phase class and the vapor both take the gas root and the gas-like region).
    const s = state ?? this.state(T, P, x, emptyMeterState());
    if (s.model === 'GERG-2008') return this.gergStated(T, P, x, s);
    const notes: string[] = [];
    if (s.fallback) notes.push(`${this.name} was not used: ${s.fallback}; ${s.model} converted this reading`);
    const g = this.uncovered(x) === '' ? this.gerg() : null;
    if (g !== null) {
      const xg = this.gergComposition(x);
      const d = g.density(T, P, xg, s.phase === 'liquid' ? LIQUID_ROOT : GAS_ROOT, emptyDensityResult());
      if (d.status === 'converged') {
        const deviation = s.v * d.D - 1;
        const ref = this.gergStated(T, P, x, s);
        notes.push(`GERG-2008 covers this gas: converting with it (\`thermo: { meter-eos: GERG-2008 }\`, \`loopclose meter --eos GERG-2008\`) removes the ${pctText(deviation)} difference`);
        return {
          model: s.model, relative: Math.abs(deviation) / Math.sqrt(3), distribution: 'rectangular', kind: 'measured', deviation,
          reference: ref,
          source: `measured: ${s.model} differs from GERG-2008 by ${pctText(deviation)} in molar volume at this gas and state; `
            + 'a known correction not applied, taken as the half-width of a rectangular distribution (JCGM 100:2008, 4.3.7): u = |difference| / sqrt(3)',
          notes,
        };
      }
      notes.push(`GERG-2008 found no density at this state (${d.message}), so no figure could be measured`);
    } else {
      const missing = this.uncovered(x);
      notes.push(`no figure could be measured: ${missing ? `${missing} is not one of GERG-2008's 21 components` : 'GERG-2008 covers none of the components'}`);
    }
    const bound = Math.abs(1 - s.Z);
    return {
      model: s.model, relative: bound / Math.sqrt(3), distribution: 'rectangular', kind: 'bound',
      source: `not measured: |1 - Z| = ${pctText(bound, false)} of ${s.model} taken as the half-width of a rectangular distribution `
        + '(this project\'s bound: the equation is taken to be no further from the truth than the ideal-gas law is from it)',
      notes,
    };
  }

  /** GERG-2008's stated figure at a state it converted. */
  private gergStated(T: number, P: number, x: ArrayLike<number>, s: MeterState): ModelUncertainty {
    const rec: Record<string, number> = {};
    for (let i = 0; i < this.n; i++) if (x[i] > 0) rec[this.ids[i]] = x[i];
    const gp = s.phase === 'liquid' ? 'liquid-like' : s.phase === 'dense' ? 'dense' : 'gas-like';
    const u = gergDensityUncertainty(T, P, rec, gp);
    if (u.relative === null) {
      return { model: 'GERG-2008', relative: null, distribution: 'normal', kind: 'none', source: `GERG-2008: no stated uncertainty here (${u.source})`, notes: u.notes };
    }
    return {
      model: 'GERG-2008', relative: u.relative / 2, distribution: 'normal', kind: u.stated ? 'stated' : 'bound',
      source: `GERG-2008: ${u.stated ? 'stated' : 'not stated; this project\'s bound of'} ${pctText(u.relative, false)} (k = 2) in density for this region (${u.region}), halved; ${u.source}`,
      notes: u.notes,
    };
  }
}

const GAS_ROOT = { root: 'gas' } as const;
const LIQUID_ROOT = { root: 'liquid' } as const;
const NO_PHASE = { phase: false } as const;

/** A relative figure as a percentage to 3 significant figures, signed unless `sign` is false. */
export function pctText(v: number, sign = true): string {
  const s = (v * 100).toPrecision(3);
  return `${sign && v > 0 ? '+' : ''}${s} %`;
}

/**
 * A meter equation of state over the components of `eos` (the file's equation of state). `name`
 * is 'GERG-2008' or the name of `eos` itself (SRK, PR or ideal: the meters use the loop's equation).
 */
export function makeMeterEos(name: MeterEosName, eos: Eos): MeterEos {
  return new MeterEos(name, eos);
}

/**
 * The meter EOS a file asks for (`thermo.meter-eos`) over an equation of state made for it: GERG-2008
 * when the file names it, else the meters use `eos` itself (which may be one given in place of the
 * file's, e.g. by `loopclose meter --eos PR`).
 */
export function meterEosFor(meterEos: MeterEosName | undefined, eos: Eos): MeterEos {
  return new MeterEos(meterEos === 'GERG-2008' ? 'GERG-2008' : eos.name, eos);
}
