/**
 * Plant data: does the plant close its balances within its meters' uncertainty, and if not,
 * which reading is wrong?
 *
 *   reconcile(problem, options, snapshot?)         weighted least squares under the balances,
 *                                                  classification, global and measurement tests
 *   prepareReconciliation(problem, options)        the same for many snapshots of one problem
 *     .solve(snapshot?)                            (work space allocated once)
 *   serialElimination(prepared, snapshot?, opts)   gross errors found one by one, with biases
 *   derivedEstimate(result, f)                     a quantity computed from the result, with
 *                                                  its uncertainty (e.g. per-pass conversion)
 *   closure(input, { coverageFactor })             raw (in - out) / in of readings, +- k u
 *
 * The method, its assumptions and references: reconcile.ts. A problem is plain data in SI;
 * results carry a status first (reconciled | not-redundant | not-converged | invalid) and never
 * a number for a variable the data do not determine.
 */
export { reconcile, prepareReconciliation, PreparedReconciliation, RECONCILE_DEFAULTS } from './reconcile.js';
export { serialElimination } from './serial.js';
export type { Suspect, SerialEliminationResult, SerialOptions, SerialStopReason } from './serial.js';
export { derivedEstimate } from './derived.js';
export type { DerivedEstimate } from './derived.js';
export { closure } from './closure.js';
export type { ClosureInput, ClosureQuantity, ClosureResult, ClosureTerm } from './closure.js';
export { chiSquareCritical, chiSquarePValue, normalCritical, pValueText, sidakLevel } from './statistics.js';
export type * from './types.js';
// Plant data on a flowsheet (instruments and readings of the file, its balances, one row at a time).
export { preparePlant, PlantReconciliation, PLANT_RECONCILE_DEFAULTS, readingProblem } from './plant.js';
export type { PlantOptions, PlantReport, PlantStatus, RowInput, RowReading, InstrumentReport, Estimate, ClosureEntry, GlobalTestReport } from './plant.js';
export { meterFlowBudget, meterMolarFlow, standardMolarFlow } from './budget.js';
export type { FlowBudget, FlowBudgetInput, FlowBudgetResult, BudgetTerm } from './budget.js';
export { buildNetwork } from './network.js';
export type { Network } from './network.js';
export type { InstrumentDecl, ReadingDecl, InstrumentKind } from './declarations.js';
