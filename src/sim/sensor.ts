/**
 * The measurement chain after the (separately delayed) plant output: first-order filter,
 * additive Gaussian noise, the transmitter range, quantisation — in that order (the filter models
 * transmitter damping of the process signal; noise is added on the signal path; the reading clips
 * at the transmitter's span; quantisation is the converter last).
 */
import type { SensorSpec } from '../model/types.js';
import { Rng } from '../num/index.js';
import { sensorLaw } from './element-laws.js';
import { compileElementLaw } from './generate-stepper.js';

/**
 * The measurement filter's coefficients at sample time Ts: the one definition of how the filter
 * is discretised, used by `Sensor` and by the sampled-loop analysis. Exact discretisation of
 * z' = (w − z)/T for an input w that is linear between samples (first-order-hold equivalent;
 * Åström & Wittenmark, Computer-Controlled Systems, 1997, sec. 7.5, from memory; derived here):
 * with a = exp(−Ts/T),
 *   z_k = a z_{k−1} + (1 − a) w_{k−1} + (w_k − w_{k−1}) (1 − (T/Ts)(1 − a)),
 * i.e. Z(z)/W(z) = (slope + (1 − a − slope) z⁻¹)/(1 − a z⁻¹). No filter (T = 0): pole 0, slope 1.
 * @param filterTime T, s; @param sampleTime Ts, s
 */
export function sensorFilterCoefficients(filterTime: number, sampleTime: number): { pole: number; slope: number } {
  if (!(filterTime > 0)) return { pole: 0, slope: 1 };
  const a = Math.exp(-sampleTime / filterTime);
  return { pole: a, slope: 1 - (filterTime / sampleTime) * (1 - a) };
}

export class Sensor {
  private readonly a: number;
  private readonly slope: number;
  private readonly filtered: boolean;
  private readonly noiseStd: number;
  private readonly resolution: number;
  private readonly rangeLo: number;
  private readonly rangeHi: number;
  private readonly rng: Rng;
  private z = 0;
  private wPrev = 0;
  private started = false;
  /** The chain's law for this shape (element-laws.ts), compiled once per shape. */
  private readonly law: (s: Sensor, w: number, g: number) => number;

  /** @param sampleTime controller sample time, s (the filter is discretised at this period). */
  constructor(spec: SensorSpec, sampleTime: number) {
    if (!(spec.filterTime >= 0)) throw new RangeError('sensor filter time must be >= 0');
    if (!(spec.noiseStd >= 0)) throw new RangeError('sensor noise must be >= 0');
    if (!(spec.resolution >= 0)) throw new RangeError('sensor resolution must be >= 0');
    this.filtered = spec.filterTime > 0;
    const f = sensorFilterCoefficients(spec.filterTime, sampleTime);
    this.a = f.pole;
    this.slope = f.slope;
    this.noiseStd = spec.noiseStd;
    this.resolution = spec.resolution;
    this.rng = new Rng(spec.seed);
    this.rangeLo = spec.range ? spec.range[0] : -Infinity;
    this.rangeHi = spec.range ? spec.range[1] : Infinity;
    const shape = { filtered: this.filtered, noisy: this.noiseStd > 0, quantised: this.resolution > 0, ranged: spec.range !== undefined };
    this.law = compileElementLaw(
      ['s', 'w', 'g'],
      'const fa = s.a, fslope = s.slope, noise = s.noiseStd, res = s.resolution, rlo = s.rangeLo, rhi = s.rangeHi;\n' +
        'let ym = w, z = s.z, wPrev = s.wPrev;\n' +
        `${sensorLaw(shape, '!s.started', 'g')}\n` +
        's.z = z; s.wPrev = wPrev; s.started = true; return ym;',
    );
  }

  /** Filter pole a = exp(−Ts/T) (0 without a filter), for generators repeating `measure`. */
  get filterPole(): number {
    return this.a;
  }

  /** Filter slope coefficient 1 − (T/Ts)(1 − a) (1 without a filter). */
  get filterSlope(): number {
    return this.slope;
  }

  /** One sample of the measurement chain for the (delayed) plant output w (element-laws.ts). */
  measure(w: number): number {
    // One deviate per sample when noisy: the batch runner replays the same sequence per seed.
    return this.law(this, w, this.noiseStd > 0 ? this.rng.nextGaussian() : 0);
  }
}
