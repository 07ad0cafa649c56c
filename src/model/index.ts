/**
 * model/ public surface: the plant file (load, validate, save with comments kept), units, the
 * safe expression language and the plant compiler.
 */
export type * from './types.js';

export {
  DIAGNOSTIC_CODES,
  diagnostic,
  formatDiagnostic,
  visibleControls,
  hasErrors,
  type Diagnostic,
  type DiagnosticCode,
  type FormatOptions,
  type Severity,
} from './diagnostics.js';
export { loadPlant, MAX_PLANT_TEXT, type LoadResult } from './load.js';
export { formatDuration, parseDuration, TIME_UNITS, tryParseDuration, type DurationResult } from './units.js';
export { controllerEdits, gainNote, savePlantValues, type ControllerEditOptions, type ValueEdit } from './save.js';
export { lineColumn, type PlantDocument } from './yaml-doc.js';
// UTF-8 checking lives in num/ (no control words) so the CLI's Io can use it without loading the plant reader.
export { findEncodingProblem, type EncodingProblem } from '../num/index.js';

export { parseExpression, EXPR_LIMITS, type ExprError, type ExprErrorCode, type ParseOptions } from './expr/parser.js';
export { evaluateExpression, type ExprEnv } from './expr/interpret.js';
export { compileExpression, compileExpressionSource, numberLiteral, type ExprSlots } from './expr/compile.js';
export { CONSTANTS, FUNCTION_NAMES, FUNCTIONS, MATH_HELPERS, type FunctionInfo, type MathHelpers } from './expr/functions.js';

export { compilePlant, linearSources, odeSlots } from './compile-plant.js';
export { realizeLinear, realizeTransfer, type LinearModelSpec } from './realize.js';
export { structureLaw } from './structure-law.js';
export { FORM_TERMS, fromIdeal, seriesRealizable, toIdeal, type IdealTerms, type ParallelTerms } from './pid-forms.js';
export { DEFAULT_ACTUATOR } from './schema/actuator.js';
export { DEFAULT_SENSOR } from './schema/sensor.js';
export { DEFAULT_DERIVATIVE_FILTER } from './schema/controller.js';
export { LOAD_DISTURBANCE } from './schema/model-read.js';
export { plantJsonSchema, VALIDATOR_ONLY, type JsonSchema } from './schema/json-schema.js';
export { yamlJsonView } from './yaml-doc.js';
export { fieldSpan } from './field-span.js';
export { MAX_TIME, MIN_SAMPLE_TIME, MIN_STEP } from './schema/time-range.js';
export { durationPattern, type DurationPatternOptions } from './units.js';
export { PLANT_SCHEMA } from './schema/plant.js';
export type { FieldDef, FieldType, SectionDef, NameRule, FieldCase } from './schema/fields.js';
export { NO_UNITS, plantUnits, quantityLabel, withUnit, type PlantUnits } from './plant-units.js';
export { MAX_UNIT_LENGTH } from './schema/unit-label.js';
