/** Units at the edges of loopclose: quantity parsing, display conversion, standard volume flows. */
export {
  parseQuantity,
  acceptedUnits,
  toUnit,
  fromUnit,
  clearUnitCache,
  standardOfFlowUnit,
  checkFlowDisplayUnit,
  UnitError,
  STANDARD_ATMOSPHERE,
} from './quantity.js';
export type { Dimension, Quantity, UnitContext, UnitErrorKind } from './quantity.js';
export {
  R_GAS,
  PSI,
  NORMAL,
  STANDARD_ISO,
  STANDARD_US,
  BUILTIN_STANDARDS,
  STANDARD_REFERENCES,
  REFERENCE_NAME,
  defineStandard,
  standardsWith,
  findStandard,
  idealMolarVolume,
  molarFlowFromStandard,
  standardFromMolarFlow,
  convertStandard,
  matchStandardSpelling,
  STANDARD_SPELLINGS,
} from './standard.js';
export type { StandardRef, StandardSpelling } from './standard.js';
