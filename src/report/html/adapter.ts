/**
 * The one place that reads a solver result for the HTML report: FlowsheetResult -> ReportInput.
 * When the result's shape changes, only this file changes.
 */
import type { FlowsheetResult } from '../../flowsheet/solve.js';
import { CAUTION, toJson } from '../format.js';
import { resultObject } from '../solve.js';
import type { FigureInfo, ReportInput } from './input.js';

export interface AdapterOptions {
  /** Display unit of molar flows (overrides the file's `display:`). */
  flowUnit?: string;
  generated?: string;
}

export function reportInputOf(r: FlowsheetResult, opts: AdapterOptions = {}): ReportInput {
  const m = r.model;
  const figures: Record<string, Record<string, FigureInfo>> = {};
  for (const [name, u] of r.units) {
    const byKey: Record<string, FigureInfo> = {};
    for (const f of u.figures) byKey[f.key] = { label: f.label, kind: f.kind };
    figures[name] = byKey;
  }
  return {
    ...(m.title ? { title: m.title } : {}),
    file: m.file,
    ...(opts.generated ? { generated: opts.generated } : {}),
    status: r.status,
    method: r.method,
    ...(r.message ? { message: r.message } : {}),
    eos: m.thermo.eos,
    display: {
      flowUnit: opts.flowUnit ?? m.display.flowUnit,
      pressureUnit: m.display.pressureUnit,
      temperatureUnit: m.display.temperatureUnit,
      atmosphere: m.thermo.atmosphere,
    },
    topology: {
      feeds: m.feeds.map((f) => f.name),
      units: m.units.map((u) => ({ name: u.name, type: u.type, inlets: [...u.inlets], outlets: [...u.outlets] })),
      products: [...r.products],
      tears: [...r.tears],
      loops: r.loops.map((l) => [...l]),
      recycles: [...r.loop.recycles],
    },
    figures,
    // The JSON text round trip makes the object exactly what `solve --json` prints.
    result: JSON.parse(toJson(resultObject(r), 0)) as Record<string, unknown>,
    caution: CAUTION,
  };
}
