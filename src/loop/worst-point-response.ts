/**
 * The loop in the frequency domain at the operating point where a gain set is least robust: the
 * point of the largest Ms (point-margins.ts' worstPoint, the rule every requirement row and the
 * margins line use), named as `check` names it ("worst at level 1.4, inflow 0.2"), with L, S and T
 * on a log grid (analysis' loopFrequencyResponse). The frequency view of the screen and
 * `run --svg-frequency` draw this record; another gain set (the one in service) is evaluated at
 * the same point so the two curves compare like with like.
 */
import { loopFrequencyResponse, type LoopFrequencyResponse, type LoopGridOptions } from '../analysis/index.js';
import type { ControllerSpec, GainSet, PlantSpec } from '../model/types.js';
import type { PlantDynamics } from '../sim/index.js';
import { describePoint } from './operating-points.js';
import { pointFigures, worstPoint, type PreparedPoint } from './point-margins.js';

/**
 * The structure of a controller whose loop is not the plain PID loop (a Smith predictor, a
 * cascade: their margins come from tune's structureMargins, the loop broken at the actuator), or
 * null when this record describes its loop (plain laws, 2-DOF weights, feedforward, a schedule).
 */
export function notPlainPidLoop(controller: Pick<ControllerSpec, 'extension'>): string | null {
  const kind = controller.extension?.kind;
  return kind === 'smith_pi' || kind === 'cascade' ? kind : null;
}

/** The frequency response of a gain set at its worst operating point. */
export interface WorstPointResponse {
  /** Index of the point in the prepared list. */
  index: number;
  /** The point named as `check` names it ('' for a linear kind's single point). */
  label: string;
  response: LoopFrequencyResponse;
}

/**
 * L, S and T of `gains` at the operating point of the largest Ms; null when no point has a linear
 * model.
 */
export function worstPointResponse(
  prepared: readonly PreparedPoint[],
  gains: GainSet,
  spec: PlantSpec,
  dynamics: Pick<PlantDynamics, 'disturbanceNames' | 'd0'>,
  options: LoopGridOptions = {},
): WorstPointResponse | null {
  const figures = pointFigures(prepared, gains, spec);
  const usable: number[] = [];
  for (let i = 0; i < figures.length; i++) if (figures[i].margins !== null) usable.push(i);
  if (usable.length === 0) return null;
  const index = usable[worstPoint(usable.map((i) => figures[i]), 'maxSensitivity').index];
  const point = prepared[index];
  const where = prepared.length > 1 || !point.point.allLevels ? describePoint(point.point, dynamics.disturbanceNames, dynamics.d0) : '';
  const label = where === '' ? '' : `${prepared.length > 1 ? 'worst ' : ''}at ${where}`;
  const response = loopFrequencyResponse(point.response!, gains, spec.loop.sampleTime, spec.sensor, { ...options, margins: figures[index].margins! });
  return { index, label, response };
}

/** L, S and T of `gains` at one prepared point (another gain set at the worst point of the first); null without a linear model. */
export function pointResponseOf(point: PreparedPoint, gains: GainSet, spec: PlantSpec, options: LoopGridOptions = {}): LoopFrequencyResponse | null {
  if (point.response === null) return null;
  return loopFrequencyResponse(point.response, gains, spec.loop.sampleTime, spec.sensor, options);
}
