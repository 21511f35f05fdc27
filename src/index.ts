/** loopclose as a library: load, solve and report flowsheets; convert meter readings. */
export { loadFlowsheet, validateText } from './flowsheet/validate.js';
export { solveFlowsheet } from './flowsheet/solve.js';
export type { FlowsheetResult, StreamResult, SolveFlowsheetOptions } from './flowsheet/solve.js';
export { computeFeed } from './blocks/feed.js';
export type { FeedResult } from './blocks/feed.js';
export { makeEos } from './thermo/eos.js';
export { flashTP } from './thermo/flash.js';
export { COMPONENTS, findComponent } from './thermo/components.js';
export { parseQuantity, toUnit, fromUnit } from './units/index.js';
export { solveFixedPoint, solveRoot } from './solve/index.js';
export { InputError, formatDiagnostics } from './diagnostics.js';
export type { Diagnostic } from './diagnostics.js';
export type * from './solve/types.js';
export type * from './thermo/types.js';
export { ParametricFlowsheet } from './study/params.js';
export { solvePoint, parseTarget } from './study/point.js';
export type { PointResult, TargetSpec, InputValue } from './study/point.js';
export { parseOutput, outputValue } from './study/outputs.js';
