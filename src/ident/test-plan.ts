/**
 * A bump-test plan before any data exists, from rough figures of the plant: gain, dominant time
 * constant (or an integrating slope), dead time, output noise σ and the actuator's limits.
 *
 * Step test (common practice, no single source, numbers our choice unless cited):
 * - size: the response should reach MIN_SIGNAL_TO_NOISE noise deviations (the figure `fit`
 *   judges a log by), |K| Δu ≥ 10 σ; moved towards the side of the operating point with more room;
 * - sample interval: about a tenth of the time constant and at most half the dead time (unless
 *   the dead time is below a fiftieth of the time constant), so the rise is covered by ten or
 *   more samples and the delay is placed to within half a sample
 *   (from memory: Åström & Wittenmark, Computer-Controlled Systems, 3rd ed. 1997, section 7.2,
 *   recommend 4-10 samples per rise time; we take the finer end), rounded down to 1, 2 or 5 × 10^k;
 * - timing: 20 samples at rest first (the noise and drift are read there), then the step held for
 *   1.5 × (dead time + 4 T) (98 % settled plus half again as margin), then the step back, held as
 *   long (a second step shows whether the plant responds alike both ways). An integrating plant
 *   gets a pulse instead (up, back after long enough to move the output 10 σ, and held after it);
 * - PRBS alternative: the guideline of D. E. Rivera & K. S. Jun, "An integrated identification
 *   and control design methodology for multivariable process system applications", IEEE Control
 *   Systems Magazine 20(3) (2000) 25-37 (from memory): clock period T_sw ≤ 2.8 τ_L/α and period
 *   N T_sw ≥ 2π β τ_H with N = 2^n − 1, α = 2 (the closed loop twice as fast as the plant) and
 *   β = 3 (95 % settling); with one rough τ, τ_L = τ_H = τ. The test runs two periods (the first
 *   lets the transient die out). Amplitude as for the step.
 */
import { MIN_SIGNAL_TO_NOISE } from './identify.js';
import { PRBS_MAX_BITS, PRBS_MIN_BITS, prbsSequence } from './prbs.js';

/** What is known about the plant before the test. */
export interface PlanFigures {
  /** Static gain (output units per input unit); for an integrating plant the slope per input unit, 1/s. */
  gain: number;
  /** Dominant time constant, s (ignored when integrating). */
  timeConstant: number;
  /** Dead time, s. */
  delay: number;
  integrating: boolean;
  /** Output noise standard deviation (output units). */
  noiseStd: number;
  /** Actuator position now and its limits (null = unknown). */
  operatingInput: number;
  inputMin: number | null;
  inputMax: number | null;
  /** Signal-to-noise target (default MIN_SIGNAL_TO_NOISE). */
  signalToNoise?: number;
}

/** One scheduled input move: hold `output` from `at` s on. */
export interface PlanMove {
  at: number;
  output: number;
}

/** A pseudo-random binary test. */
export interface PrbsPlan {
  /** Register length n and period N = 2^n − 1 clock periods. */
  bits: number;
  period: number;
  /** Clock period, s (a multiple of the sample interval). */
  clock: number;
  /** Total duration (two periods), s. */
  duration: number;
  amplitude: number;
  moves: PlanMove[];
}

/** The plan. */
export interface TestPlan {
  /** Signed input step (towards the side with more room). */
  step: number;
  /** Response the step should produce and its ratio to the noise. */
  expectedResponse: number;
  signalToNoise: number;
  sampleInterval: number;
  /** Rest before the first move, s. */
  rest: number;
  /** Each step held this long, s. */
  hold: number;
  duration: number;
  moves: PlanMove[];
  prbs: PrbsPlan;
  /** Problems with the figures (e.g. the limits do not leave room for the step). */
  warnings: string[];
}

/** Alpha and beta of the PRBS guideline. */
const ALPHA = 2;
const BETA = 3;

/** Plan a step (or pulse) test and a PRBS alternative for `f`. */
export function planBumpTest(f: PlanFigures): TestPlan {
  if (!(f.gain !== 0 && Number.isFinite(f.gain))) throw new RangeError('planBumpTest: the gain must be a non-zero number');
  if (!f.integrating && !(f.timeConstant > 0)) throw new RangeError('planBumpTest: the time constant must be positive');
  if (!(f.delay >= 0)) throw new RangeError('planBumpTest: the dead time must be zero or positive');
  if (!(f.noiseStd >= 0)) throw new RangeError('planBumpTest: the noise σ must be zero or positive');
  const warnings: string[] = [];
  const snr = f.signalToNoise ?? MIN_SIGNAL_TO_NOISE;
  const lo = f.inputMin ?? -Infinity;
  const hi = f.inputMax ?? Infinity;
  const roomUp = hi - f.operatingInput;
  const roomDown = f.operatingInput - lo;
  const sign = roomUp >= roomDown ? 1 : -1;
  const room = Math.max(roomUp, roomDown);
  const span = hi - lo;
  // Time scale of the response: the lag, or for an integrating plant the dead time (at least a bit).
  const tau = f.integrating ? Math.max(f.delay, 1e-9) : f.timeConstant;
  // A dead time below a fiftieth of the lag hardly matters to the loop: it does not set the interval.
  const h = niceDown(Math.min(tau / 10, f.integrating ? tau / 2 : Math.max(f.delay / 2, tau / 50)));
  const rest = 20 * h;
  let size: number;
  let hold: number;
  let pulse = 0;
  if (!f.integrating) {
    size = (snr * f.noiseStd) / Math.abs(f.gain);
    hold = roundUp(1.5 * (f.delay + 4 * f.timeConstant), h);
  } else {
    // Pulse width: 4 dead times (at least 20 samples); the output then ramps for that long.
    pulse = roundUp(Math.max(4 * f.delay, 20 * h), h);
    size = (snr * f.noiseStd) / (Math.abs(f.gain) * pulse);
    hold = pulse;
  }
  if (Number.isFinite(span) && span > 0) size = Math.max(size, 0.01 * span);
  if (!(size > 0)) {
    size = Number.isFinite(span) && span > 0 ? 0.05 * span : 1;
    warnings.push(`no noise figure (σ = 0): the step size ${g(size)} is a guess (5 % of the actuator range, or 1); give the noise σ for a step sized to it`);
  }
  size = niceUp(size);
  if (size > room) {
    warnings.push(`the actuator leaves room for a move of ${g(room)} only, and the response needs ${g(size)} to reach ${snr} noise deviations: expect a noisier fit, or test at another operating point`);
    size = room;
  }
  const step = sign * size;
  const moves: PlanMove[] = [
    { at: 0, output: f.operatingInput },
    { at: rest, output: f.operatingInput + step },
    { at: rest + hold, output: f.operatingInput },
  ];
  const settleBack = f.integrating ? roundUp(1.5 * (f.delay + 10 * h), h) : hold;
  const duration = rest + hold + settleBack;
  const expectedResponse = Math.abs(f.gain) * size * (f.integrating ? pulse : 1);
  const signalToNoise = f.noiseStd > 0 ? expectedResponse / f.noiseStd : Infinity;

  // PRBS: clock ≤ 2.8 τ/α, N clock ≥ 2π β τ.
  const clock = Math.max(h, Math.floor((2.8 * tau) / ALPHA / h) * h);
  let bits = PRBS_MIN_BITS;
  while (bits < PRBS_MAX_BITS && (2 ** bits - 1) * clock < 2 * Math.PI * BETA * tau) bits++;
  const seq = prbsSequence(bits);
  const period = seq.length;
  const prbsMoves: PlanMove[] = [{ at: 0, output: f.operatingInput }];
  const bothWays = Math.min(roomUp, roomDown);
  const amp = bothWays > 0 ? Math.min(size, bothWays) : size;
  for (let c = 0; c < 2 * period; c++) {
    const v = f.operatingInput + amp * seq[c % period];
    const at = rest + c * clock;
    if (prbsMoves[prbsMoves.length - 1].output !== v) prbsMoves.push({ at, output: v });
  }
  if (bothWays < size) {
    warnings.push(`a PRBS moves both ways around the operating point, and one side has room for ${g(bothWays)} only: its amplitude is ${g(amp)}`);
  }
  prbsMoves.push({ at: rest + 2 * period * clock, output: f.operatingInput });
  const prbs: PrbsPlan = { bits, period, clock, duration: rest + 2 * period * clock, amplitude: amp, moves: prbsMoves };
  return { step, expectedResponse, signalToNoise, sampleInterval: h, rest, hold, duration, moves, prbs, warnings };
}

/** Largest 1, 2 or 5 × 10^k not above x. */
function niceDown(x: number): number {
  const e = Math.floor(Math.log10(x));
  const b = 10 ** e;
  const m = x / b;
  return (m >= 5 ? 5 : m >= 2 ? 2 : 1) * b;
}

/** Smallest 1, 2 or 5 × 10^k not below x. */
function niceUp(x: number): number {
  const e = Math.floor(Math.log10(x));
  const b = 10 ** e;
  const m = x / b;
  return +((m <= 1 ? 1 : m <= 2 ? 2 : m <= 5 ? 5 : 10) * b).toPrecision(12);
}

/** x rounded up to a whole number of h. */
function roundUp(x: number, h: number): number {
  return Math.ceil(x / h - 1e-9) * h;
}

function g(x: number): string {
  return String(+x.toPrecision(4));
}
