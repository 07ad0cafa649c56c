/**
 * Everything `looprig run` computed for one file, before printing: shared by the command
 * (commands/run.ts) and the plot writer (run-svg.ts) without either importing the other.
 */
import type { RequirementResult, TrialMetrics } from '../analysis/index.js';
import type { PlantSpec } from '../model/types.js';
import type { TrialResult } from '../sim/types.js';

/** Everything `run` computed, before printing. */
export interface RunReport {
  file: string;
  plant: PlantSpec;
  result: TrialResult;
  metrics: TrialMetrics;
  requirements: RequirementResult[];
  warnings: string[];
}
