/**
 * What the HTML report and the flowsheet drawing are made from: plain data, no solver types.
 * `adapter.ts` builds it from a solver result; everything else in this folder reads only this.
 */

/** How one numeric unit figure is shown: its label and what kind of quantity it is (SI inside). */
export interface FigureInfo {
  label: string;
  /**
   * molarFlow (mol/s), temperature (K), pressure (Pa), power (W), fraction, count, or number
   * (a plain SI number shown as it is).
   */
  kind: 'molarFlow' | 'temperature' | 'pressure' | 'power' | 'fraction' | 'count' | 'number';
}

export interface ReportUnit {
  name: string;
  type: string;
  inlets: string[];
  outlets: string[];
}

export interface ReportTopology {
  /** Feed names; each is also the name of the stream it makes. */
  feeds: string[];
  /** Units in the file's order (the drawing keeps this order: same input, same picture). */
  units: ReportUnit[];
  /** Streams no unit takes. */
  products: string[];
  /** Tear streams chosen by the solver. */
  tears: string[];
  /** Units of each recycle loop. */
  loops: string[][];
  /** Recycle streams (closing a loop into a unit that also takes fresh material). */
  recycles: string[];
}

export interface ReportInput {
  title?: string;
  /** The flowsheet file, as given on the command line. */
  file: string;
  /** When the report was made (left out in tests: no clock in a reproducible output). */
  generated?: string;
  status: 'converged' | 'not-converged' | 'infeasible' | 'invalid';
  method: string;
  message?: string;
  eos: string;
  display: {
    flowUnit: string;
    pressureUnit: string;
    temperatureUnit: string;
    /** Local atmosphere, Pa, for gauge pressure units. */
    atmosphere: number;
  };
  topology: ReportTopology;
  /** Labels and kinds of unit figures by unit name and key, where the solver gives them. */
  figures: Record<string, Record<string, FigureInfo>>;
  /** Exactly what `loopclose solve FILE --json` prints (SI). */
  result: Record<string, unknown>;
  caution: string;
}
