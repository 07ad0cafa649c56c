/**
 * Validate a plant file against a log: simulate the file's model with the logged input on the
 * engine (replay-plant.ts) and judge the difference (fit-statistics.ts, residual-tests.ts).
 *
 * Every model kind: an ode model is in the log's own units (absolute input and output); a linear
 * kind is in deviation variables, so it is driven with the input minus its first logged value and
 * its output is placed on the level the log shows before the input first moves (the mean of
 * those samples, at most 50; the first sample when the input moves at once).
 */
import type { PlantDynamics } from '../sim/index.js';
import type { PlantSpec } from '../model/types.js';
import type { BumpData } from './bump-data.js';
import { fitStatistics } from './fit-statistics.js';
import type { FitStatistics } from './fit-statistics.js';
import { plantReplay } from './replay-plant.js';
import { residualTests } from './residual-tests.js';
import type { ResidualTests } from './residual-tests.js';

/** Result of `validateModel`. */
export interface Validation {
  statistics: FitStatistics;
  /** Time of the largest error on the log's clock, s. */
  maxErrorTime: number;
  tests: ResidualTests;
  /** Model output on the data grid (the log's units). */
  response: Float64Array;
  /** Deviation form: the input reference and output level the linear model was placed on (null for ode). */
  offsets: { input: number; output: number } | null;
  /** Sample index at which the model diverged, else null. */
  divergedAt: number | null;
  notes: string[];
}

/** Samples averaged for the starting level of a deviation model. */
const LEVEL_SAMPLES = 50;

/** Simulate `spec` (compiled as `dynamics`) on the log and judge the fit. */
export function validateModel(spec: PlantSpec, dynamics: PlantDynamics, data: BumpData): Validation {
  const linear = dynamics.linear !== null;
  const n = data.n;
  const uRef = linear ? data.u[0] : 0;
  const u = new Float64Array(n);
  for (let i = 0; i < n; i++) u[i] = data.u[i] - uRef;
  const replay = plantReplay(spec, dynamics, data.dt, u[0]);
  const response = new Float64Array(n);
  const done = replay.run(null, u, response);
  const notes = [replay.startNote];
  let offsets: Validation['offsets'] = null;
  if (linear) {
    let m = 0;
    while (m < Math.min(n, LEVEL_SAMPLES) && data.u[m] === data.u[0]) m++;
    m = Math.max(1, m);
    let level = 0;
    for (let i = 0; i < m; i++) level += data.y[i] - response[i];
    level /= m;
    for (let i = 0; i < n; i++) response[i] += level;
    offsets = { input: uRef, output: level };
    notes.push(`deviation model: input taken from ${g(uRef)}, output placed on the level ${g(level)} of the first ${m} sample${m === 1 ? '' : 's'}`);
  }
  const divergedAt = done < n ? done : null;
  if (divergedAt !== null) notes.push(`the model diverged at ${g(data.t0 + divergedAt * data.dt)} s: figures over the samples before it`);
  const upto = divergedAt ?? n;
  const y = data.y.subarray(0, upto);
  const yhat = response.subarray(0, upto);
  const statistics = fitStatistics(y, yhat);
  const e = new Float64Array(upto);
  for (let i = 0; i < upto; i++) e[i] = y[i] - yhat[i];
  const tests = residualTests(e, data.u.subarray(0, upto));
  return {
    statistics,
    maxErrorTime: data.t0 + statistics.maxErrorIndex * data.dt,
    tests,
    response,
    offsets,
    divergedAt,
    notes,
  };
}

function g(x: number): string {
  return String(+x.toPrecision(4));
}
