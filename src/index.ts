/**
 * loopclose as a library: load, solve and report flowsheets; convert meter readings; move
 * parameters through the parameter layer for studies of your own.
 *
 *   const { model } = loadFlowsheet('loop.yaml');          // a frozen model
 *   const p = parameter(model, 'purge-split.out.purge');    // a typed parameter (SI value, unit, bounds)
 *   const m2 = withValues(model, [{ parameter: p, value: 0.03 }]);   // a new model
 *   const rt = createRuntime(model);                       // yours; reuse it across solves
 *   const r = solveFlowsheet(m2, { runtime: rt });
 */
export { loadFlowsheet, validateText } from './flowsheet/load.js';
export type { LoadedFile, Model, FeedSpec, UnitSpecBase, ThermoSpec, SolverSpec, DisplaySpec, TargetDecl } from './flowsheet/model.js';
export { solveFlowsheet, AUTO_ANDERSON_VARIABLES } from './flowsheet/solve.js';
export type { FlowsheetResult, StreamResult, SolveFlowsheetOptions, LoopFigures, TargetReport } from './flowsheet/solve.js';
export { createRuntime } from './flowsheet/runtime.js';
export type { Runtime, Condition } from './flowsheet/runtime.js';
export type { Balance } from './flowsheet/balance.js';
export { computeFeed } from './blocks/feed.js';
export type { FeedResult } from './blocks/feed.js';
export type { BlockDef, BlockRuntime, UnitSummary, OutputDecl, StructureRules } from './blocks/types.js';
export { makeEos } from './thermo/eos.js';
export { makeMeterEos, meterEosFor, MeterEos } from './thermo/meter-eos.js';
export { makeGerg2008, gergUnsupported, GERG2008_IDS } from './thermo/gerg2008/index.js';
export type { MeterEosName, MeterPhase, MeterState, ModelUncertainty } from './thermo/meter-eos.js';
export { meterBudget, standardUncertainty } from './thermo/meter-budget.js';
export type { BudgetReading, InstrumentUncertainty, BudgetLine, BudgetInput, MeterBudget } from './thermo/meter-budget.js';
export { flashTP } from './thermo/flash.js';
export { flashPH, flashPS } from './thermo/flash-ph.js';
export { streamState, phaseEnthalpy } from './thermo/enthalpy.js';
export { prepareEquilibrium, EquilibriumSolver, equilibriumConstant, lnKAt, reactionHeat } from './thermo/equilibrium.js';
export type { EquilibriumReaction, EquilibriumOptions, EquilibriumProblem, PreparedEquilibrium, EquilibriumState, EquilibriumResult, EquilibriumStatus, EquilibriumReason } from './thermo/equilibrium.js';
export { solveAdiabaticEquilibrium, newAdiabaticResult } from './thermo/equilibrium-adiabatic.js';
export type { AdiabaticOptions, AdiabaticResult, EnergyResidual } from './thermo/equilibrium-adiabatic.js';
export { COMPONENTS, findComponent } from './thermo/components.js';
export { parseQuantity, toUnit, fromUnit } from './units/index.js';
export { solveFixedPoint, solveRoot } from './solve/index.js';
export { InputError, formatDiagnostics } from './diagnostics.js';
export type { Diagnostic, SourceSpan } from './diagnostics.js';
export type * from './solve/types.js';
export type * from './thermo/types.js';
export { parameter, parameters, withValues, checkValue, toSI, fromSI } from './study/parameters.js';
export type { Parameter, ParameterValue } from './study/parameters.js';
export { solvePoint, parseTarget } from './study/point.js';
export type { PointResult, TargetSpec, PointOptions } from './study/point.js';
export { parseOutput, outputValue } from './study/outputs.js';
export type { OutputRef } from './study/outputs.js';
// Plant data: instruments and readings of a file reconciled against its balances (src/plant).
export * from './plant/index.js';
