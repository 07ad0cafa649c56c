/**
 * The resource budget of a simulation, worked out before anything is allocated: integration
 * steps, trace rows and bytes, delay-buffer bytes and an estimate of the time, from the
 * durations, the sample time, the step, the delays, the state count and the number of runs.
 *
 * Two kinds of limit:
 *  - the budget (`DEFAULT_BUDGET`): what a command runs without being asked, so a typing slip
 *    (`duration: 1e8`, `sample_time: 1e-6`) is refused in a moment instead of running for
 *    minutes and taking gigabytes; the caller may lift it explicitly;
 *  - the hard limits (`HARD_LIMITS`): what cannot be allocated at all (a typed array longer
 *    than the engine allows); these hold even when the budget is lifted.
 * Pure: no printing, no allocation beyond the result.
 */
import { roundStep } from './choose-step.js';
import { usableDelay } from './delay-line.js';
import { trialRows } from './event-schedule.js';

/** A quantity of the run that drives its cost; callers map it to the field or option it came from. */
export type BudgetCause = 'duration' | 'sample_time' | 'step' | 'input_delay' | 'sensor_delay' | 'runs';

/** The size of one simulation (or of `runs` alike). Times in s. */
export interface RunSize {
  /** Simulated time of one run, s (the live screen: its history window). */
  duration: number;
  /** Controller sample time, s. */
  sampleTime: number;
  /** Integration step, s. */
  step: number;
  /** Input dead time, s. */
  inputDelay: number;
  /** Sensor dead time, s. */
  sensorDelay: number;
  /** Plant states. */
  states: number;
  /** Disturbance channels recorded in the trace. */
  disturbances: number;
  /** Runs of this size (a sweep, a rule list); default 1. */
  runs?: number;
  /**
   * Delay lines hold only what a run of this length can read (sim/delay-line.ts usableDelay);
   * false for a live run that has no end (the screen): the whole delay is held.
   */
  bounded?: boolean;
  /** Whether the caller analyses the loop in frequency (margins) too; default true. */
  frequencyAnalysis?: boolean;
  /** Trace rows a run holds at most (a streamed run: loop/streamed-trial.ts); default every row. */
  heldRows?: number;
}

/** What a run of `RunSize` costs. */
export interface BudgetEstimate {
  /** Trace rows of one run (one per controller sample, t = 0 included). */
  rows: number;
  /** Integration steps per controller sample. */
  substeps: number;
  /** Integration steps of all runs together. */
  integrationSteps: number;
  /** Trace bytes one run holds. */
  traceBytes: number;
  /** Entries of the longer delay line. */
  delayEntries: number;
  /** Delay-line bytes of one run. */
  delayBytes: number;
  /** Bytes one run holds at once (trace, delay lines, per-sample buffers). */
  memoryBytes: number;
  /** Rough time of all runs, s (`SECONDS_PER_STATE_STEP` per state and integration step). */
  seconds: number;
  /**
   * Turns of the loop's phase below the Nyquist frequency π/Ts due to the dead times:
   * (input + sensor delay)·(π/Ts)/(2π). The frequency analysis (analysis/margins.ts) visits
   * every crossing of −180° on its way up, so its time and memory grow with this.
   */
  phaseTurns: number;
}

/** The limits a run is checked against. */
export interface BudgetLimits {
  /** Integration steps of all runs together. */
  integrationSteps: number;
  /** Bytes one run holds at once. */
  memoryBytes: number;
  /** Phase turns of the frequency analysis (`BudgetEstimate.phaseTurns`). */
  phaseTurns: number;
}

/**
 * The budget commands keep to unless lifted: 1e8 integration steps (about 8 s for a small plant,
 * SECONDS_PER_STATE_STEP), 512 MiB per run and 1e6 phase turns (about 5 s of frequency analysis).
 * The bundled plants stay far below (test/sim/budget.test.ts).
 */
export const DEFAULT_BUDGET: BudgetLimits = { integrationSteps: 1e8, memoryBytes: 512 * 1024 * 1024, phaseTurns: 1e6 };

/**
 * What cannot be allocated whatever the budget: one typed array of more than 2^30 entries
 * (8 GiB of doubles; V8 refuses larger buffers on most machines), integration step counts
 * past 2^53 (no longer counted exactly), and 2^24 phase turns (the frequency analysis keeps two
 * numbers per turn in a plain array; V8 stops the process, uncatchably, past about 2^27 entries).
 */
export const HARD_LIMITS = { arrayEntries: 2 ** 30, integrationSteps: 2 ** 53, phaseTurns: 2 ** 24 } as const;

/**
 * Time per integration step and state, s, as measured on this project's 2-core machine: a
 * first-order plant with a dead time, 6e7 RK4 steps in 4.9 s through `looprig run` (82 ns per
 * step, the delay line and per-step input included). Only used to say roughly how long a
 * refused run would have taken.
 */
export const SECONDS_PER_STATE_STEP = 8e-8;

/** Bytes per trace row: six channels of doubles, one per disturbance, one saturation byte (sim/trace.ts). */
function rowBytes(disturbances: number): number {
  return 8 * (6 + disturbances) + 1;
}

/** Work out what a run costs (no checks; see `checkBudget`). */
export function estimateBudget(size: RunSize): BudgetEstimate {
  const runs = size.runs ?? 1;
  const rows = trialRows(size.duration, size.sampleTime);
  const substeps = roundStep(size.sampleTime, size.step).substeps;
  const integrationSteps = (rows - 1) * substeps * runs;
  const traceBytes = Math.min(rows, size.heldRows ?? rows) * rowBytes(size.disturbances);
  const held = (delay: number): number => {
    if (!(delay > 0)) return 0;
    const d = size.bounded === false ? delay : usableDelay(delay, size.duration, size.sampleTime);
    return Math.floor(d / size.step) + 2;
  };
  const delayEntries = Math.max(held(size.inputDelay), held(size.sensorDelay));
  const delayBytes = 8 * (held(size.inputDelay) + held(size.sensorDelay));
  const memoryBytes = traceBytes + delayBytes + 16 * substeps + 8 * size.states;
  const seconds = integrationSteps * Math.max(1, size.states) * SECONDS_PER_STATE_STEP;
  const phaseTurns = (size.inputDelay + size.sensorDelay) / (2 * size.sampleTime);
  return { rows, substeps, integrationSteps, traceBytes, delayEntries, delayBytes, memoryBytes, seconds, phaseTurns };
}

/** One limit a run goes past. */
export interface BudgetExcess {
  /** The quantity to blame (the one to change). */
  cause: BudgetCause;
  /** What is over, and by how much, in words (no field position: the caller adds it). */
  message: string;
  /** True when no override can lift it (`HARD_LIMITS`). */
  hard: boolean;
}

/** 1.5e+9 -> "1.5e9", 3600 -> "3600": counts and sizes in messages. */
function count(x: number): string {
  if (!Number.isFinite(x)) return String(x);
  if (Math.abs(x) < 1e6) return String(Math.round(x));
  return x.toExponential(2).replace(/\.?0+e/, 'e').replace('e+', 'e');
}

function bytes(b: number): string {
  if (!Number.isFinite(b)) return String(b);
  const mib = b / (1024 * 1024);
  return mib >= 1024 ? `${count(mib / 1024)} GiB` : `${mib >= 10 ? Math.round(mib) : mib.toPrecision(2)} MiB`;
}

function secondsText(s: number): string {
  if (s < 120) return `${Math.max(1, Math.round(s))} s`;
  if (s < 7200) return `${Math.round(s / 60)} min`;
  return `${count(s / 3600)} h`;
}

/**
 * Which of duration and sample time to blame for too many rows: the sample time when it is
 * under a millisecond or when the duration is modest (a day at most), the duration otherwise.
 */
function rowsCause(size: RunSize): BudgetCause {
  return size.sampleTime < 1e-3 || size.duration <= 86400 ? 'sample_time' : 'duration';
}

/**
 * Check a run against the hard limits and, unless `limits` is null (lifted), against the budget.
 * Returns every limit exceeded (empty: the run may go ahead). `stepGiven` says whether the step
 * was written (then a tiny step is blamed on it) or chosen from the plant and the sample time.
 */
export function checkBudget(size: RunSize, limits: BudgetLimits | null = DEFAULT_BUDGET, stepGiven = true): BudgetExcess[] {
  const out: BudgetExcess[] = [];
  const e = estimateBudget(size);
  const runs = size.runs ?? 1;
  const stepCause: BudgetCause = stepGiven && size.step < size.sampleTime / 100 ? 'step' : rowsCause(size);
  const delayCause: BudgetCause = size.inputDelay >= size.sensorDelay ? 'input_delay' : 'sensor_delay';
  const stepsWhy = `${count(e.rows - 1)} samples x ${count(e.substeps)} steps${runs > 1 ? ` x ${count(runs)} runs` : ''}`;
  if (e.rows > HARD_LIMITS.arrayEntries) {
    out.push({ cause: rowsCause(size), hard: true, message: `${count(e.rows)} trace rows cannot be allocated (at most ${count(HARD_LIMITS.arrayEntries)})` });
  }
  if (e.substeps > HARD_LIMITS.arrayEntries) {
    out.push({ cause: stepCause, hard: true, message: `${count(e.substeps)} integration steps per sample cannot be allocated (at most ${count(HARD_LIMITS.arrayEntries)})` });
  }
  if (e.delayEntries > HARD_LIMITS.arrayEntries) {
    out.push({ cause: delayCause, hard: true, message: `a delay line of ${count(e.delayEntries)} entries cannot be allocated (at most ${count(HARD_LIMITS.arrayEntries)})` });
  }
  const turnsWhy = `${count(e.phaseTurns)} turns of the loop phase below the Nyquist frequency (dead time / 2 sample times) for the frequency analysis`;
  const frequency = size.frequencyAnalysis ?? true;
  if (frequency && e.phaseTurns > HARD_LIMITS.phaseTurns) {
    out.push({ cause: delayCause, hard: true, message: `the run's ${turnsWhy} cannot be followed (at most ${count(HARD_LIMITS.phaseTurns)})` });
  }
  if (!(e.integrationSteps <= HARD_LIMITS.integrationSteps)) {
    out.push({ cause: stepCause, hard: true, message: `${count(e.integrationSteps)} integration steps (${stepsWhy}) cannot be counted` });
  }
  if (out.length > 0 || limits === null) return out;
  if (e.integrationSteps > limits.integrationSteps) {
    const cause = runs > 1 && e.integrationSteps / runs <= limits.integrationSteps ? 'runs' : stepCause;
    out.push({
      cause,
      hard: false,
      message: `the run needs ${count(e.integrationSteps)} integration steps (${stepsWhy}, about ${secondsText(e.seconds)}), over the limit of ${count(limits.integrationSteps)}`,
    });
  }
  if (e.memoryBytes > limits.memoryBytes) {
    const delayHeavy = e.delayBytes > e.traceBytes;
    const cause: BudgetCause = delayHeavy ? delayCause : rowsCause(size);
    const what = delayHeavy ? `delay lines of ${bytes(e.delayBytes)}` : `a trace of ${count(e.rows)} rows (${bytes(e.traceBytes)})`;
    out.push({ cause, hard: false, message: `the run needs ${what}, over the limit of ${bytes(limits.memoryBytes)} per run` });
  }
  if (frequency && e.phaseTurns > limits.phaseTurns) {
    out.push({ cause: delayCause, hard: false, message: `the run needs ${turnsWhy}, over the limit of ${count(limits.phaseTurns)}` });
  }
  return out;
}
