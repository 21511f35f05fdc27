/** `loopclose solve`: the steady state of a flowsheet file. */
import { InputError } from '../diagnostics.js';
import { ParametricFlowsheet } from '../study/params.js';
import { parseTarget, solvePoint, type TargetReport } from '../study/point.js';
import { fileTargets } from '../study/file-targets.js';
import { solveFlowsheet, type FlowsheetResult } from '../flowsheet/solve.js';
import { solveCsv, solveJson, solveText } from '../report/solve.js';
import type { MethodName } from '../solve/types.js';
import { parseQuantity, UnitError } from '../units/index.js';

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
    if (!['direct', 'wegstein', 'newton', 'auto'].includes(o.method)) errs.push(`--method: unknown method \`${o.method}\` (use direct, wegstein, newton or auto)`);
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
      parseQuantity(`1 ${o.flowUnit}`, 'molarFlow');
    } catch (e) {
      if (e instanceof UnitError) errs.push(`--flow-unit: ${e.message}; ${e.help}`);
      else throw e;
    }
  }
  if (o.json && o.csv) errs.push('give --json or --csv, not both');
  if (errs.length) throw new InputError(errs.map((message) => ({ severity: 'error' as const, message })));
  const cliTargets = o.target ?? [];
  if ((o.by ?? []).length !== cliTargets.length) errs.push(`give one --by for each --target (${cliTargets.length} targets, ${(o.by ?? []).length} --by)`);
  if ((o.within ?? []).length > cliTargets.length) errs.push('more --within than --target');
  if (errs.length) throw new InputError(errs.map((message) => ({ severity: 'error' as const, message })));
  const p = new ParametricFlowsheet(file);
  const targets = [...fileTargets(p), ...cliTargets.map((t, j) => parseTarget(p, t, o.by![j], o.within?.[j]))];
  let result: FlowsheetResult;
  let targetReports: TargetReport[] | undefined;
  if (targets.length === 0) {
    result = solveFlowsheet(p.base.model, { method, maxPasses, rtol });
  } else {
    const pr = solvePoint(p, [], { targets, method, maxPasses });
    if (!pr.result) throw new InputError([{ severity: 'error', message: pr.message ?? 'the targets cannot be set up' }]);
    result = pr.result;
    targetReports = pr.targets;
  }
  result.targets = targetReports;
  const text = o.json ? solveJson(result) : o.csv ? solveCsv(result, { flowUnit: o.flowUnit }) : solveText(result, { flowUnit: o.flowUnit });
  return { text, result };
}
