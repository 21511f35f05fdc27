/**
 * The `report` and `plot` commands as main.ts loads them: with import(), so that `solve` and
 * `meter` never load the drawing and plot code (elkjs, vega). The bundle builds this file as
 * dist/pictures.mjs, apart from dist/cli.mjs; a user's mistake therefore crosses back as plain
 * diagnostics (main.ts raises them as its own InputError), not as an object of another bundle's class.
 */
import { InputError, type Diagnostic } from '../diagnostics.js';
import { runPlot, type PlotCliOptions } from './plot.js';
import { runReport, type ReportCliOptions } from './report.js';

export type Outcome = { ok: true; text: string; code: number } | { ok: false; diagnostics: Diagnostic[] };

async function guard(f: () => Promise<{ text: string; code: number }>): Promise<Outcome> {
  try {
    return { ok: true, ...(await f()) };
  } catch (e) {
    if (e instanceof InputError) return { ok: false, diagnostics: e.diagnostics };
    throw e;
  }
}

export function report(file: string, o: ReportCliOptions): Promise<Outcome> {
  return guard(() => runReport(file, o));
}

export function plot(file: string, o: PlotCliOptions): Promise<Outcome> {
  return guard(async () => ({ text: await runPlot(file, o), code: 0 }));
}
