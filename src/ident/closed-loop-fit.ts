/**
 * Identification from a log of the loop in automatic (setpoint moves, loads change): the direct
 * prediction-error method (L. Ljung, System Identification: Theory for the User, 2nd ed. 1999,
 * section 13.4; U. Forssell & L. Ljung, "Closed-loop identification revisited", Automatica 35
 * (1999) 1215-1241). The plant model is fitted to the logged controller output (input) and
 * process value (output) as if the loop were open, and the estimate is consistent in closed
 * loop provided the noise model is flexible enough to describe the true disturbance: the
 * feedback makes the input correlate with past noise, and a wrong noise model turns that
 * correlation into bias (Forssell & Ljung 1999, section 4).
 *
 * Two stages: (1) the output-error fit of every family (identify.ts: white noise model, the
 * families and BIC choice of the open-loop fit); (2) the chosen family again with a first-order
 * noise model, y = G(q) u + (1 + c q⁻¹)/(1 − a q⁻¹) e (the Box–Jenkins structure, Ljung 1999
 * section 4.2, with first-order C and D), whose prediction error is
 * ε(t) = w(t) − a w(t−1) − c ε(t−1), w = y − G u (ε(0) = w(0)). White measurement noise gives
 * a ≈ −c (the model cancels to H = 1) and the two stages agree; white noise plus a load that
 * steps or drifts is close to a = 1 (integrated noise) with c near −1, and the noise model
 * takes the load instead of biasing the plant. The refusal judges the plant parameters only
 * (the noise parameters of white noise are not separately determined, and need not be).
 *
 * Excitation: the setpoint is the only excitation independent of the noise, so a log whose
 * setpoint never moves (or moves less than MIN_SIGNAL_TO_NOISE noise deviations) is refused,
 * and so is a fit whose information matrix is singular or worse conditioned than
 * MAX_CONDITION (the data cannot separate the parameters).
 */
import { jacobianConditioning, leastSquaresCovariance, levenbergMarquardt } from '../num/index.js';
import type { BumpData } from './bump-data.js';
import { emptyLti, FIT_KIND_INFO, kindSystem } from './fit-kinds.js';
import type { FitKind } from './fit-kinds.js';
import { bounds, describeParameters, isAtBound } from './fit-model.js';
import type { FittedParameter } from './fit-model.js';
import { fitStatistics } from './fit-statistics.js';
import type { FitStatistics } from './fit-statistics.js';
import { identify, MIN_SIGNAL_TO_NOISE } from './identify.js';
import type { IdentifyResult } from './identify.js';
import { residualTests } from './residual-tests.js';
import type { ResidualTests } from './residual-tests.js';
import { ResponseSimulator } from './simulate-response.js';
import { analyseSteps } from './step-analysis.js';

/** Condition number of the scaled information matrix above which a fit is refused (our choice). */
export const MAX_CONDITION = 1e8;

/** How much the log excites the plant. */
export interface Excitation {
  /** Setpoint range over the window and number of setpoint changes. */
  setpointRange: number;
  setpointMoves: number;
  /** Controller output range and standard deviation. */
  inputRange: number;
  inputStd: number;
  /** Output noise σ estimate used for the judgement. */
  noiseStd: number;
  /** Setpoint range in noise deviations. */
  setpointToNoise: number;
  /** Condition number of the column-scaled information matrix of the final fit (Infinity: singular). */
  condition: number;
}

/** Result of `fitClosedLoop`. */
export interface ClosedLoopFit {
  excitation: Excitation;
  /** Null when the fit is supported; else one line saying why not and what would make it work. */
  refused: string | null;
  /** Stage 1: the output-error fits and the family chosen (null when refused before fitting). */
  outputError: IdentifyResult | null;
  /** Stage 2: the chosen family with the noise model (null when refused before fitting). */
  kind: FitKind | null;
  values: number[];
  parameters: FittedParameter[];
  /** The noise model (1 + c q⁻¹)/(1 − a q⁻¹): pole a, zero coefficient c. */
  noiseModel: { pole: number; zero: number } | null;
  /** Simulated plant output G u + level (the deterministic part), on the data grid. */
  response: Float64Array;
  /** Figures of the simulated output against the log. */
  statistics: FitStatistics | null;
  /** Residual tests on the prediction errors ε. */
  tests: ResidualTests | null;
  notes: string[];
}

/** Options of `fitClosedLoop`. */
export interface ClosedLoopOptions {
  models?: readonly FitKind[] | 'auto';
}

/** Direct prediction-error fit of `data` (input = controller output) logged with setpoint `setpoint`. */
export function fitClosedLoop(data: BumpData, setpoint: Float64Array, options: ClosedLoopOptions = {}): ClosedLoopFit {
  const n = data.n;
  let rLo = Infinity;
  let rHi = -Infinity;
  let moves = 0;
  for (let i = 0; i < n; i++) {
    rLo = Math.min(rLo, setpoint[i]);
    rHi = Math.max(rHi, setpoint[i]);
    if (i > 0 && setpoint[i] !== setpoint[i - 1]) moves++;
  }
  let uLo = Infinity;
  let uHi = -Infinity;
  let uMean = 0;
  for (let i = 0; i < n; i++) {
    uLo = Math.min(uLo, data.u[i]);
    uHi = Math.max(uHi, data.u[i]);
    uMean += data.u[i] / n;
  }
  let uVar = 0;
  for (let i = 0; i < n; i++) uVar += (data.u[i] - uMean) ** 2 / n;
  const excitation: Excitation = {
    setpointRange: rHi - rLo,
    setpointMoves: moves,
    inputRange: uHi - uLo,
    inputStd: Math.sqrt(uVar),
    noiseStd: analyseSteps(data).noiseStd,
    setpointToNoise: 0,
    condition: NaN,
  };
  excitation.setpointToNoise = excitation.noiseStd > 0 ? excitation.setpointRange / excitation.noiseStd : excitation.setpointRange > 0 ? Infinity : 0;
  const empty = (refused: string): ClosedLoopFit => ({
    excitation, refused, outputError: null, kind: null, values: [], parameters: [], noiseModel: null,
    response: new Float64Array(0), statistics: null, tests: null, notes: [],
  });
  if (!(excitation.setpointRange > 0)) {
    return empty('the setpoint never moves in this window, so nothing independent of the noise excites the plant: log a setpoint step (or two) while the loop is in automatic, or open the loop and fit a bump test without --setpoint');
  }
  if (excitation.setpointToNoise < MIN_SIGNAL_TO_NOISE) {
    return empty(`the setpoint moves by ${g(excitation.setpointRange)}, only ${g(excitation.setpointToNoise)} times the output noise (σ ≈ ${g(excitation.noiseStd)}): make setpoint steps of at least ${g(MIN_SIGNAL_TO_NOISE * excitation.noiseStd)}`);
  }
  if (!(excitation.inputRange > 0)) {
    return empty('the controller output never moves in this window: the log holds no information about the plant (was the loop in manual?)');
  }

  // ---- stage 1: output error
  const outputError = identify(data, { models: options.models });
  const chosen = outputError.models[outputError.chosen].fit;
  const kind = chosen.kind;
  const info = FIT_KIND_INFO[kind];

  // ---- stage 2: the chosen family with an AR(1) noise model
  const np = info.params.length;
  const du = new Float64Array(n);
  for (let i = 0; i < n; i++) du[i] = data.u[i] - chosen.u0;
  const [lo, hi] = bounds(kind, data.dt, n * data.dt);
  const lower = Float64Array.from([...lo, -0.99, -0.99]);
  const upper = Float64Array.from([...hi, 0.999, 0.99]);
  const sys = emptyLti();
  const sim = new ResponseSimulator();
  const yModel = new Float64Array(n);
  const simulate = (x: ArrayLike<number>): void => {
    kindSystem(kind, x, x[info.gainIndex], data.dt, sys);
    sim.simulate(sys, x[info.delayIndex], data.dt, du, yModel, n);
    const level = x[np - 1];
    for (let i = 0; i < n; i++) yModel[i] += level;
  };
  const residuals = (x: Float64Array, out: Float64Array): void => {
    simulate(x);
    const a = x[np];
    const c = x[np + 1];
    let prev = data.y[0] - yModel[0];
    out[0] = prev;
    for (let i = 1; i < n; i++) {
      const w = data.y[i] - yModel[i];
      out[i] = w - a * prev - c * out[i - 1];
      prev = w;
    }
  };
  const floors = new Float64Array(np + 2).fill(1e-4 * data.dt);
  floors[info.gainIndex] = 1e-9 * Math.max(Math.abs(chosen.values[info.gainIndex]), 1e-12);
  floors[np - 1] = 1e-9 * Math.max(excitation.setpointRange, 1e-12);
  floors[np] = floors[np + 1] = 1e-6;
  const res = levenbergMarquardt(residuals, [...chosen.values, 0, 0], n, { lower, upper, maxIterations: 60, minDifferenceStep: floors });
  const x = Array.from(res.x);
  const fixed = x.map((v, i) => isAtBound(v, lower[i], upper[i]));
  const notes: string[] = [];
  const plantOnly = fixed.map((f, i) => f || i >= np);
  const cond = jacobianConditioning(res.jacobian, n, np + 2, plantOnly);
  excitation.condition = cond.condition;
  const names = info.params;
  let refused: string | null = null;
  if (cond.singular !== null) {
    const partners = cond.partners.map((j) => names[j]);
    refused = `the log cannot determine ${names[cond.singular]}${partners.length ? ` apart from ${partners.join(', ')}` : ''} (singular information matrix): make larger or more setpoint steps, each held for at least the settling time`;
  } else if (cond.condition > MAX_CONDITION) {
    refused = `the problem is too ill-conditioned to trust (condition ${g(cond.condition)} > ${g(MAX_CONDITION)}): make larger or more setpoint steps, each held for at least the settling time`;
  }
  // The noise parameters stay free in the covariance when they are determined (coloured noise),
  // and are held when they are not (white noise: a and c cancel).
  const noiseFree = jacobianConditioning(res.jacobian, n, np + 2, fixed).singular === null;
  const held = noiseFree ? fixed : plantOnly;
  const cov = refused === null ? leastSquaresCovariance(res.jacobian, n, np + 2, res.sse, held) : null;
  // The plant part of the covariance, for the family's own parameter report.
  let plantCov: Float64Array | null = null;
  if (cov !== null) {
    plantCov = new Float64Array(np * np);
    for (let i = 0; i < np; i++) for (let j = 0; j < np; j++) plantCov[i * np + j] = cov[i * (np + 2) + j];
  }
  const values = x.slice(0, np);
  const parameters = describeParameters(kind, values, plantCov, fixed.slice(0, np), data);
  const a = x[np];
  const c = x[np + 1];
  if (Math.abs(a + c) > 0.2) notes.push(`the disturbance is coloured (noise model (1 + ${g(c)} q⁻¹)/(1 − ${g(a)} q⁻¹)): loads or drifts, described by the noise model rather than the plant`);
  simulate(res.x);
  const response = Float64Array.from(yModel);
  const eps = new Float64Array(n);
  residuals(res.x, eps);
  return {
    excitation,
    refused,
    outputError,
    kind,
    values,
    parameters,
    noiseModel: { pole: a, zero: c },
    response,
    statistics: fitStatistics(data.y, response),
    tests: residualTests(eps, data.u),
    notes,
  };
}

function g(x: number): string {
  if (!Number.isFinite(x)) return String(x);
  return String(+x.toPrecision(3));
}
