/**
 * The one place `looprig diff` gets a loop's figures from: the code path of `looprig check`
 * (checkPlant: the simulated trial, the requirement rows with their worst case over the
 * uncertainty box) and of `looprig run` (the headline metrics of that same trial), so that each
 * side of a diff prints exactly what `run` and `check` print for that revision.
 */
import { plantUnits } from '../model/index.js';
import type { PlantSpec } from '../model/types.js';
import { CHECKED_REQUIREMENTS, checkPlant, type PlantCheck } from './check-plant.js';
import { runMetrics, type RunMetric } from './run-report.js';

/** One frequency-domain figure of the nominal loop. */
export interface LoopFigure {
  name: string;
  value: number;
  unit: string;
  /** False when it could not be computed (the note says why). */
  available: boolean;
  note: string;
}

/** Everything a diff shows about one revision's loop. */
export interface RevisionEvaluation {
  check: PlantCheck;
  /** The trial's headline metrics, as `run --json` reports them. */
  metrics: RunMetric[];
  /** Gain and phase margins, Ms, bandwidth, dominant damping, as `check` measures them. */
  margins: LoopFigure[];
}

/** Evaluate one loaded plant file (throws tune's StructureUnavailable as `check` does). */
export function evaluateRevision(plant: PlantSpec): RevisionEvaluation {
  const check = checkPlant(plant, { allFigures: true });
  const margins: LoopFigure[] = [];
  for (const c of CHECKED_REQUIREMENTS) {
    if (c.domain !== 'frequency') continue;
    const f = check.figures.get(c.name);
    margins.push({ name: c.name, value: f?.measured ?? NaN, unit: c.unit, available: f?.available ?? false, note: f?.note ?? '' });
  }
  return { check, metrics: runMetrics(check.nominal.metrics, plantUnits(plant)), margins };
}
