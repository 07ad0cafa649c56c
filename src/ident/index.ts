/**
 * ident/: a logged bump test (CSV) -> fitted models -> a plant file to tune against.
 */
export { readCsv, readCsvHeader, parseNumber } from './csv.js';
export type { CsvTable, Delimiter, ReadCsvOptions, ReadCsvResult } from './csv.js';
export { decodeLogText } from './decode-text.js';
export type { DecodedText } from './decode-text.js';
export { parseIsoTimestamp } from './timestamp.js';
export type { ParsedTimestamp } from './timestamp.js';
export { formatLogDiagnostic, hasLogErrors, logDiagnostic } from './log-diagnostic.js';
export type { LogDiagnostic, LogDiagnosticCode, LogSeverity } from './log-diagnostic.js';
export { MIN_SAMPLES, prepareBumpData } from './bump-data.js';
export type { BumpData, PrepareOptions, PrepareResult } from './bump-data.js';
export { analyseSteps } from './step-analysis.js';
export type { InputStep, StepAnalysis } from './step-analysis.js';
export { readFirstStep, smithTwoPoint, sundaresanKrishnaswamy } from './two-point.js';
export type { StepReading, TwoPointEstimate } from './two-point.js';
export { FIT_KIND_INFO, FIT_KINDS, parseFitKind } from './fit-kinds.js';
export type { FitKind, FitKindInfo } from './fit-kinds.js';
export { ResponseSimulator } from './simulate-response.js';
export { fitModel } from './fit-model.js';
export type { FitContext, FittedParameter, ModelFit } from './fit-model.js';
export { identify, MIN_SIGNAL_TO_NOISE, POOR_RELATIVE_CI } from './identify.js';
export type { IdentifiedModel, IdentifyOptions, IdentifyResult } from './identify.js';
export { startingPi } from './starting-pi.js';
export type { StartingPi } from './starting-pi.js';
export { buildPlantFile } from './plant-file.js';
export type { PlantFileSource } from './plant-file.js';
export { fitStatistics } from './fit-statistics.js';
export type { FitStatistics } from './fit-statistics.js';
export { residualTests, RESIDUAL_LAGS } from './residual-tests.js';
export type { ChiSquareTest, ResidualTests } from './residual-tests.js';
export { plantReplay } from './replay-plant.js';
export type { PlantReplay } from './replay-plant.js';
export { validateModel } from './validate.js';
export type { Validation } from './validate.js';
export { fitPlantParameters } from './grey-box.js';
export type { GreyBoxFit, GreyBoxParameter } from './grey-box.js';
