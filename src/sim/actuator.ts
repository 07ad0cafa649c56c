/**
 * The actuator between controller and plant: position limits and a rate limit, then the valve as
 * it is: stiction or backlash on the stem (once per controller sample, the stem held between
 * samples), a first-order positioner lag and the characteristic (per integration step). Order:
 * controller output → limits → rate limit → stiction/backlash → lag → characteristic → plant.
 * With stiction the stem is held over the sample (it moves in slips, not along the rate ramp);
 * the rate limit still bounds the command the stem follows.
 *
 * The rate limit is applied as a ramp WITHIN the sample: after a new command at t_k the position
 * moves towards the (position-limited) command at the rate limit and stops when it arrives, so
 * the plant sees ramp-then-hold rather than a jump. The plant input handed to the integrator is
 * the exact mean of that path over each integration step (see `fillSteps`), so the ramp is
 * resolved at integration-step resolution. Without a rate limit the output is a zero-order hold.
 * The laws themselves are element-laws.ts (`actuatorCommandLaw`, `actuatorPathIntegral`), shared
 * with the batch generator.
 */
import type { ActuatorSpec } from '../model/types.js';
import { actuatorCommandLaw, actuatorPathIntegral, stictionLaw, valvePerStep, valveSampleLaw, valveStepLaw, type ValveShape } from './element-laws.js';
import { compileElementLaw } from './generate-stepper.js';

/**
 * Lag coefficients for integration step h, s: la = e^(−h/T) and lm = (T/h)(1 − la), the exact
 * step-end and step-mean weights of a first-order lag with a held input (T = 0: none, 0 and 0).
 */
export function lagCoefficients(lag: number, h: number): { la: number; lm: number } {
  if (!(lag > 0)) return { la: 0, lm: 0 };
  const la = Math.exp(-h / lag);
  return { la, lm: (lag / h) * (1 - la) };
}

/** The stiction/backlash band the engine runs (backlash w is stiction w/2, w/2); null when it has none. */
export function valveBand(spec: ActuatorSpec): { static: number; dynamic: number } | null {
  if (spec.backlash !== undefined && spec.backlash > 0) return { static: spec.backlash / 2, dynamic: spec.backlash / 2 };
  return spec.stiction !== undefined && spec.stiction.static > 0 ? spec.stiction : null;
}

/** The shape of the valve after the limits, and its band (`valveBand`). */
export function valveOf(spec: ActuatorSpec): { shape: ValveShape; fs: number; fd: number; aspan: number; rgl: number } {
  const band = valveBand(spec);
  const sticky = band !== null;
  const characteristic = spec.characteristic ?? 'linear';
  return {
    shape: { sticky, lagged: (spec.lag ?? 0) > 0, characteristic },
    fs: band !== null ? band.static : 0,
    fd: band !== null ? band.dynamic : 0,
    aspan: spec.max - spec.min,
    rgl: Math.log(spec.rangeability ?? 50),
  };
}

/**
 * The plant input a valve at rest at `travel` delivers: its characteristic (lag settled, no band),
 * from the engine's own law. Identity for a linear characteristic.
 */
export function valveInput(spec: ActuatorSpec, travel: number): number {
  if ((spec.characteristic ?? 'linear') === 'linear' || !Number.isFinite(spec.max - spec.min)) return travel;
  const a = new Actuator({ min: spec.min, max: spec.max, rateLimit: Infinity, characteristic: spec.characteristic, rangeability: spec.rangeability }, travel);
  a.command(travel, 1);
  return a.input;
}

/**
 * The travel at which the valve delivers plant input `input` (the inverse of `valveInput`, by
 * bisection on the monotone characteristic); the nearest end of travel when out of its reach.
 */
export function valveTravel(spec: ActuatorSpec, input: number): number {
  if ((spec.characteristic ?? 'linear') === 'linear' || !Number.isFinite(spec.max - spec.min)) return input;
  let lo = spec.min;
  let hi = spec.max;
  if (!(input > valveInput(spec, lo))) return lo;
  if (!(input < valveInput(spec, hi))) return hi;
  for (let i = 0; i < 80 && hi - lo > 1e-15 * (spec.max - spec.min); i++) {
    const mid = 0.5 * (lo + hi);
    if (valveInput(spec, mid) < input) lo = mid;
    else hi = mid;
  }
  return 0.5 * (lo + hi);
}

export class Actuator {
  readonly min: number;
  readonly max: number;
  readonly rateLimit: number;
  /** Position at the start of the current sample. */
  start = 0;
  /** Position reached by the end of the current sample (what the controller is told). */
  end = 0;
  /** Stem position after stiction/backlash (= `end` without them), held over the sample. */
  stem = 0;
  /** The plant input while the valve rests at the stem: its characteristic there (= `stem` when linear). */
  input = 0;
  /** Equal percentage: input − min at the stem (element-laws.ts valveSampleLaw). */
  private cb = 0;
  /** The stem `input` and `cb` belong to (NaN: not worked out yet). */
  private xc = NaN;
  /** Lag output at the end of the last integration step (the valve position). */
  private xv = 0;
  /** True when the last command hit a position or rate limit. */
  saturated = false;
  /** Time into the sample at which the ramp arrives (0 = no ramp), s. */
  private rampTime = 0;
  private rampSign = 0;

  /** The command law (element-laws.ts), compiled once per shape. */
  private readonly commandLaw: (s: Actuator, uc: number, ts: number) => void;
  /** Stiction on the command (element-laws.ts), null without a band. */
  private readonly stickLaw: ((s: Actuator) => void) | null;
  /** The characteristic at the stem, once per sample (element-laws.ts), null when linear. */
  private readonly sampleLaw: ((s: Actuator) => void) | null;
  /** Lag and characteristic over the steps of a sample (element-laws.ts), null when the input is held. */
  private readonly stepLaw: ((s: Actuator, out: Float64Array, off: number, n: number, la: number, lm: number) => void) | null;
  private readonly fs: number;
  private readonly fd: number;
  private readonly aspan: number;
  private readonly rgl: number;
  private readonly rga: number;
  private readonly lag: number;
  private readonly lagged: boolean;
  private lagStep = NaN;
  private la = 0;
  private lm = 0;
  /** ∫₀^s position dτ along the sample's path (element-laws.ts). */
  private readonly pathLaw: (s: number, tr: number, st: number, sg: number, rl: number, en: number) => number;

  constructor(spec: ActuatorSpec, initial: number) {
    if (!(spec.min <= spec.max)) throw new RangeError('actuator min must not exceed max');
    if (!(spec.rateLimit > 0)) throw new RangeError('actuator rate limit must be positive (Infinity for none)');
    this.min = spec.min;
    this.max = spec.max;
    this.rateLimit = spec.rateLimit;
    this.start = this.end = this.stem = this.input = this.xv = this.clamp(initial);
    const valve = valveOf(spec);
    this.fs = valve.fs;
    this.fd = valve.fd;
    this.aspan = valve.aspan;
    this.rgl = valve.rgl;
    this.rga = valve.rgl / valve.aspan;
    this.lag = spec.lag ?? 0;
    this.lagged = valve.shape.lagged;
    this.stickLaw = valve.shape.sticky
      ? compileElementLaw(['s'], `const end = s.end, fs = s.fs, fd = s.fd; let xs = s.stem;\n${stictionLaw()}\ns.stem = xs; s.rampTime = 0;`)
      : null;
    this.sampleLaw =
      valve.shape.characteristic === 'linear'
        ? null
        : compileElementLaw(['s'], `const amin = s.min, aspan = s.aspan, rgl = s.rgl, xs = s.stem; let cb = s.cb, ui = s.input, xc = s.xc;\n${valveSampleLaw(valve.shape)}\ns.cb = cb; s.input = ui; s.xc = xc;`);
    this.stepLaw = !valvePerStep(valve.shape, this.rateLimit !== Infinity)
      ? null
      : compileElementLaw(
          ['s', 'out', 'off', 'n', 'la', 'lm'],
          `const amin = s.min, aspan = s.aspan, cb = s.cb, rga = s.rga, xs = s.stem; let xv = s.xv;\n` +
            `for (let i = 0; i < n; i++) { let u = out[off + i];\n${valveStepLaw(valve.shape)}\nout[off + i] = u; }\ns.xv = xv;`,
        );
    this.commandLaw = compileElementLaw(
      ['s', 'uc', 'ts'],
      'const amin = s.min, amax = s.max, rate = s.rateLimit;\n' +
        'let start = s.start, end = s.end, sat = false, rampTime = 0, rampSign = 0;\n' +
        `${actuatorCommandLaw(this.rateLimit !== Infinity)}\n` +
        's.start = start; s.end = end; s.saturated = sat; s.rampTime = rampTime; s.rampSign = rampSign;',
    );
    this.pathLaw = compileElementLaw(['s', 'tr', 'st', 'sg', 'rl', 'en'], `return ${actuatorPathIntegral('s', 'tr', 'st', 'sg', 'rl', 'en')};`);
  }

  /** Position limits only. */
  clamp(v: number): number {
    return v < this.min ? this.min : v > this.max ? this.max : v;
  }

  /** True when the plant input varies within the current sample (a rate ramp, or the valve's lag); else it is `input`. */
  get ramping(): boolean {
    return this.rampTime > 0 || this.lagged;
  }

  /** Take the command for a sample of length `ts`; sets `end`, `stem`, `input` and `saturated` (element-laws.ts). */
  command(uc: number, ts: number): void {
    this.commandLaw(this, uc, ts);
    if (this.stickLaw !== null) this.stickLaw(this);
    else this.stem = this.end;
    if (this.sampleLaw !== null) this.sampleLaw(this);
    else this.input = this.stem;
  }

  /** out[off + i] = mean plant input over integration step i of the sample (n steps of h). */
  fillSteps(out: Float64Array, off: number, n: number, h: number): void {
    const law = this.stepLaw;
    if (this.rampTime === 0) {
      // Held: the stem for the per-step law to shape, else already the plant input.
      const v = law === null ? this.input : this.stem;
      for (let i = 0; i < n; i++) out[off + i] = v;
    } else {
      let prev = 0;
      const path = this.pathLaw;
      for (let i = 0; i < n; i++) {
        const next = path((i + 1) * h, this.rampTime, this.start, this.rampSign, this.rateLimit, this.end);
        out[off + i] = (next - prev) / h;
        prev = next;
      }
    }
    if (law === null) return;
    if (h !== this.lagStep) {
      // Once per step length, not per sample: the inner loop allocates nothing.
      const c = lagCoefficients(this.lag, h);
      this.lagStep = h;
      this.la = c.la;
      this.lm = c.lm;
    }
    law(this, out, off, n, this.la, this.lm);
  }
}
