/**
 * Tiny DiscreteController implementations for engine tests (the engine never imports control/).
 */
import type { DiscreteController } from '../../src/sim/index.js';

/** Ignores r and y: always requests `value` (an open loop at constant input). */
export class ConstantController implements DiscreteController {
  calls = 0;
  tracked = NaN;
  constructor(public value: number) {}
  initialize(): void {}
  update(): number {
    this.calls++;
    return this.value;
  }
  track(u: number): void {
    this.tracked = u;
  }
  setGains(): void {}
}

/** u = u0 + k (r − y): a proportional law with an explicit bias, no state. */
export class ProportionalController implements DiscreteController {
  private bias = 0;
  constructor(public k: number) {}
  initialize(r: number, y: number, u0: number): void {
    this.bias = u0 - this.k * (r - y);
  }
  update(r: number, y: number): number {
    return this.bias + this.k * (r - y);
  }
  track(): void {}
  setGains(): void {}
}
