/**
 * The actuator between controller and plant: position limits and a rate limit.
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
import { actuatorCommandLaw, actuatorPathIntegral } from './element-laws.js';
import { compileElementLaw } from './generate-stepper.js';

export class Actuator {
  readonly min: number;
  readonly max: number;
  readonly rateLimit: number;
  /** Position at the start of the current sample. */
  start = 0;
  /** Position reached by the end of the current sample (what the controller is told). */
  end = 0;
  /** True when the last command hit a position or rate limit. */
  saturated = false;
  /** Time into the sample at which the ramp arrives (0 = no ramp), s. */
  private rampTime = 0;
  private rampSign = 0;

  /** The command law (element-laws.ts), compiled once per shape. */
  private readonly commandLaw: (s: Actuator, uc: number, ts: number) => void;
  /** ∫₀^s position dτ along the sample's path (element-laws.ts). */
  private readonly pathLaw: (s: number, tr: number, st: number, sg: number, rl: number, en: number) => number;

  constructor(spec: ActuatorSpec, initial: number) {
    if (!(spec.min <= spec.max)) throw new RangeError('actuator min must not exceed max');
    if (!(spec.rateLimit > 0)) throw new RangeError('actuator rate limit must be positive (Infinity for none)');
    this.min = spec.min;
    this.max = spec.max;
    this.rateLimit = spec.rateLimit;
    this.start = this.end = this.clamp(initial);
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

  /** True when the current sample moves along a rate-limited ramp. */
  get ramping(): boolean {
    return this.rampTime > 0;
  }

  /** Take the command for a sample of length `ts`; sets `end` and `saturated` (element-laws.ts). */
  command(uc: number, ts: number): void {
    this.commandLaw(this, uc, ts);
  }

  /** out[off + i] = mean position over integration step i of the sample (n steps of h). */
  fillSteps(out: Float64Array, off: number, n: number, h: number): void {
    if (this.rampTime === 0) {
      for (let i = 0; i < n; i++) out[off + i] = this.end;
      return;
    }
    let prev = 0;
    const path = this.pathLaw;
    for (let i = 0; i < n; i++) {
      const next = path((i + 1) * h, this.rampTime, this.start, this.rampSign, this.rateLimit, this.end);
      out[off + i] = (next - prev) / h;
      prev = next;
    }
  }
}
