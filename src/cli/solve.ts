/** `loopclose solve`: the steady state of a flowsheet file. */
import { InputError } from '../diagnostics.js';
import { loadFlowsheet } from '../flowsheet/validate.js';
import { solveFlowsheet, type FlowsheetResult } from '../flowsheet/solve.js';
import { fileTargets } from '../study/file-targets.js';
import { parseTarget, solvePoint } from '../study/point.js';
import { solveCsv, solveJson, solveText } from '../report/solve.js';
import type { MethodName } from '../solve/types.js';
import { METHODS } from '../flowsheet/read-sections.js';
import { checkFlowDisplayUnit, UnitError } from '../units/index.js';

export interface SolveCliOptions {
  target?: string[];
  by?: string[];
  within?: string[];
  json?: boolean;
  csv?: boolean;
  method?: string;
  flowUnit?: string;
  maxPasses?: string;
  tolerance?: string;
}

export function runSolve(file: string, o: SolveCliOptions): { text: string; result: FlowsheetResult } {
  const errs: string[] = [];
  let method: MethodName | undefined;
  if (o.method !== undefined) {
    if (!(METHODS as readonly string[]).includes(o.method)) errs.push(`--method: unknown method \`${o.method}\` (use direct, wegstein, newton, anderson or auto)`);
    else method = o.method as MethodName;
  }
  let maxPasses: number | undefined;
  if (o.maxPasses !== undefined) {
    maxPasses = Number(o.maxPasses);
    if (!Number.isInteger(maxPasses) || maxPasses < 1) errs.push('--max-passes must be a whole number >= 1');
  }
  let rtol: number | undefined;
  if (o.tolerance !== undefined) {
    rtol = Number(o.tolerance);
    if (!(rtol > 0 && rtol < 0.1)) errs.push('--tolerance must be a number between 0 and 0.1');
  }
  if (o.flowUnit !== undefined) {
    try {
      checkFlowDisplayUnit(o.flowUnit);
    } catch (e) {
      if (e instanceof UnitError) errs.push(`--flow-unit: ${e.message}; ${e.help}`);
      else throw e;
    }
  }
  if (o.json && o.csv) errs.push('give --json or --csv, not both');
  const cliTargets = o.target ?? [];
  if ((o.by ?? []).length !== cliTargets.length) errs.push(`give one --by for each --target (${cliTargets.length} targets, ${(o.by ?? []).length} --by)`);
  if ((o.within ?? []).length > cliTargets.length) errs.push('more --within than --target');
  if (errs.length) throw new InputError(errs.map((message) => ({ severity: 'error' as const, message })));
  const { model } = loadFlowsheet(file);
  const targets = [...fileTargets(model), ...cliTargets.map((t, j) => parseTarget(model, t, o.by![j], o.within?.[j]))];
  let result: FlowsheetResult;
  if (targets.length === 0) {
    result = solveFlowsheet(model, { method, maxPasses, rtol });
  } else {
    const pr = solvePoint(model, [], { targets, method, maxPasses, rtol });
    if (!pr.result) throw new InputError([{ severity: 'error', message: pr.message ?? 'the targets cannot be set up' }]);
    result = pr.result;
  }
  const text = o.json ? solveJson(result) : o.csv ? solveCsv(result, { flowUnit: o.flowUnit }) : solveText(result, { flowUnit: o.flowUnit });
  return { text, result };
}
