/**
 * diagnose/: "is plain PID enough for this loop?" — flags with evidence and advice.
 */
export { diagnosePlant, trialOperatingPoint } from './diagnose-plant.js';
export type { DiagnoseOptions } from './diagnose-plant.js';
export { diagnosisJson, formatDiagnosis } from './report.js';
export { controllerNoise } from './noise.js';
export { THRESHOLDS } from './thresholds.js';
export type { Diagnosis, Flag, FlagKind, FlagSeverity, OperatingPoint, TrialFindings } from './types.js';
