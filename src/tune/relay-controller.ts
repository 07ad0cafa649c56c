/**
 * A relay with hysteresis, as a discrete controller: the controller law of the relay-feedback
 * experiment (Åström & Hägglund, "Automatic tuning of simple regulators with specifications on
 * phase and amplitude margins", Automatica 20(5) 1984 645-651).
 *
 * Output = bias + direction·d·s, s = ±1. With e = r − y, s becomes +1 when e > eps and −1 when
 * e < −eps; inside the band it keeps its last value (hysteresis eps >= 0, output units of y).
 */
import type { GainSet } from '../model/types.js';
import type { DiscreteController } from '../sim/index.js';

/** Settings of `RelayController`. */
export interface RelaySettings {
  /** Relay amplitude d (controller-output units, > 0). */
  amplitude: number;
  /** Hysteresis eps (measurement units, >= 0). */
  hysteresis: number;
  /** +1 for a plant whose output rises with its input (direct acting relay), −1 otherwise. */
  direction: 1 | -1;
  /** Centre of the relay output; null = the output at `initialize` (the operating point). */
  bias: number | null;
}

/**
 * Relay with hysteresis implementing the engine's `DiscreteController`. It has no gains:
 * `setGains` is ignored, and `initialize` cannot make the next output equal u0 (a relay jumps);
 * it takes u0 as the bias when no bias was given.
 */
export class RelayController implements DiscreteController {
  private readonly d: number;
  private readonly eps: number;
  private readonly dir: number;
  private readonly fixedBias: number | null;
  private bias = 0;
  private s = 1;
  /** Number of output switches so far. */
  switches = 0;

  constructor(settings: RelaySettings) {
    if (!(settings.amplitude > 0) || !Number.isFinite(settings.amplitude)) {
      throw new RangeError('relay amplitude must be > 0 and finite');
    }
    if (!(settings.hysteresis >= 0) || !Number.isFinite(settings.hysteresis)) {
      throw new RangeError('relay hysteresis must be >= 0 and finite');
    }
    if (settings.direction !== 1 && settings.direction !== -1) throw new RangeError('direction must be 1 or -1');
    this.d = settings.amplitude;
    this.eps = settings.hysteresis;
    this.dir = settings.direction;
    this.fixedBias = settings.bias;
    if (settings.bias !== null) this.bias = settings.bias;
  }

  initialize(r: number, y: number, u0: number): void {
    this.bias = this.fixedBias ?? u0;
    // Start by pushing the output towards the setpoint; at e = 0 push up, so the loop starts to move.
    this.s = r - y >= 0 ? 1 : -1;
    this.switches = 0;
  }

  update(r: number, y: number): number {
    const e = r - y;
    if (this.s > 0) {
      if (e < -this.eps) {
        this.s = -1;
        this.switches++;
      }
    } else if (e > this.eps) {
      this.s = 1;
      this.switches++;
    }
    return this.bias + this.dir * this.d * this.s;
  }

  track(_uApplied: number): void {
    // A relay keeps no integral state: nothing to correct.
  }

  setGains(_g: GainSet): void {
    // A relay has no gains.
  }
}
