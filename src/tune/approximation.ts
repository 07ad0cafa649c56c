/**
 * Low-order descriptions of a linear plant for the tuning rules, and the ultimate point of the
 * loop. The reductions are Skogestad's half rule as implemented in analysis/ (half-rule.ts: S.
 * Skogestad, J. Process Control 13 (2003) 291-309; reference sheet section 3, [mem]); this file
 * only feeds it the loop's other elements (the sensor's filter as one more lag, its delay added to
 * the plant's, half the controller sample time) and maps the result onto the rules' notation.
 */
import { halfRule, loopMargins, poleZeroSummary, type PlantFrequencyResponse } from '../analysis/index.js';
import type { GainSet, SensorSpec } from '../model/types.js';
import type { LinearModel } from '../sim/index.js';
import type { Fopdt, IntegratingDelay, Sopdt, UltimatePoint } from './low-order.js';

/** Loop elements besides the plant that the half rule folds in. */
export interface LoopElements {
  /** Controller sample time h, s (h/2 joins the delay); 0 = continuous. */
  sampleTime: number;
  /** Sensor delay and filter time, s. */
  sensor: Pick<SensorSpec, 'delay' | 'filterTime'>;
}

/** Result of `lowOrderOf`. */
export interface LowOrderModels {
  fopdt: Fopdt | null;
  sopdt: Sopdt | null;
  integrating: IntegratingDelay | null;
  notes: string[];
}

/** First/second order plus delay (or integrating plus delay) approximations of a linear plant in its loop. */
export function lowOrderOf(model: LinearModel, loop: LoopElements): LowOrderModels {
  const empty = (notes: string[]): LowOrderModels => ({ fopdt: null, sopdt: null, integrating: null, notes });
  const s = poleZeroSummary(model);
  if (s.identicallyZero) return empty(['the output does not respond to the input']);
  const hr = halfRule({
    gain: s.lowFrequencyGain,
    poles: s.poles,
    zeros: s.zeros,
    delay: model.delay + loop.sensor.delay,
    sampleTime: loop.sampleTime,
    extraLags: loop.sensor.filterTime > 0 ? [loop.sensor.filterTime] : [],
  });
  const notes = [...hr.notes];
  const f = hr.firstOrder;
  if (f === null) return empty(notes);
  if (hr.integrating) return { fopdt: null, sopdt: null, integrating: { kv: f.gain, theta: f.delay }, notes };
  if (!(f.timeConstant > 0)) {
    notes.push('no lag left: a pure delay (or static) plant; the lag-based rules do not apply');
    return empty(notes);
  }
  const fopdt: Fopdt = { k: f.gain, tau1: f.timeConstant, theta: f.delay };
  const so = hr.secondOrder;
  const sopdt: Sopdt | null =
    so !== null && so.timeConstants[1] > 0 ? { k: so.gain, tau1: so.timeConstants[0], tau2: so.timeConstants[1], theta: so.delay } : null;
  return { fopdt, sopdt, integrating: null, notes };
}

/** A proportional-only gain set of gain kc (for margin-based loop figures). */
export function proportionalGains(kc: number): GainSet {
  return { kc, ti: Infinity, td: 0, n: 10, b: 1, c: 1, antiWindup: 'none', trackingTime: NaN };
}

/**
 * Ultimate point of the loop from the linear model: the phase crossover of L = P (times the hold
 * and sensor when `loop` has them) under proportional control. Ku = 1/|L(i wu)| with the sign of
 * the plant's gain, Tu = 2 pi/wu; null when the phase never reaches -180 deg (infinite gain margin).
 * The margins are taken at a tiny probe gain, so that |L| < 1 at every phase crossover and the
 * gain margin is the smallest 1/|L| over all of them (at unit gain a plant with |P| > 1 at its
 * crossover would report it as a lower gain margin instead).
 */
export function ultimateFromModel(response: PlantFrequencyResponse, loop: LoopElements, plantSign: 1 | -1): UltimatePoint | null {
  let peak = 0;
  for (let i = 0; i < response.mag.length; i++) if (response.mag[i] > peak) peak = response.mag[i];
  if (!(peak > 0) || !Number.isFinite(peak)) return null;
  const probe = 1e-3 / peak;
  const m = loopMargins(response, proportionalGains(plantSign * probe), loop.sampleTime, loop.sensor);
  if (!Number.isFinite(m.gainMargin) || !(m.phaseCrossoverFrequency > 0)) return null;
  return { ku: plantSign * probe * m.gainMargin, tu: (2 * Math.PI) / m.phaseCrossoverFrequency };
}
