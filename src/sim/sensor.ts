/**
 * The measurement chain after the (separately delayed) plant output: first-order filter,
 * additive Gaussian noise, quantisation — in that order (the filter models transmitter damping
 * of the process signal; noise is added on the signal path; quantisation is the converter last).
 */
import type { SensorSpec } from '../model/types.js';
import { Rng } from '../num/index.js';

export class Sensor {
  private readonly a: number;
  private readonly slope: number;
  private readonly filtered: boolean;
  private readonly noiseStd: number;
  private readonly resolution: number;
  private readonly rng: Rng;
  private z = 0;
  private wPrev = 0;
  private started = false;

  /** @param sampleTime controller sample time, s (the filter is discretised at this period). */
  constructor(spec: SensorSpec, sampleTime: number) {
    if (!(spec.filterTime >= 0)) throw new RangeError('sensor filter time must be >= 0');
    if (!(spec.noiseStd >= 0)) throw new RangeError('sensor noise must be >= 0');
    if (!(spec.resolution >= 0)) throw new RangeError('sensor resolution must be >= 0');
    this.filtered = spec.filterTime > 0;
    // Exact discretisation of z' = (w − z)/T for an input w that is linear between samples
    // (first-order-hold equivalent; Åström & Wittenmark, Computer-Controlled Systems, 1997,
    // sec. 7.5, from memory; derived here): with a = exp(−Ts/T),
    //   z_k = a z_{k−1} + (1 − a) w_{k−1} + (w_k − w_{k−1}) (1 − (T/Ts)(1 − a)).
    this.a = this.filtered ? Math.exp(-sampleTime / spec.filterTime) : 0;
    this.slope = this.filtered ? 1 - (spec.filterTime / sampleTime) * (1 - this.a) : 1;
    this.noiseStd = spec.noiseStd;
    this.resolution = spec.resolution;
    this.rng = new Rng(spec.seed);
  }

  /** Filter pole a = exp(−Ts/T) (0 without a filter), for generators repeating `measure`. */
  get filterPole(): number {
    return this.a;
  }

  /** Filter slope coefficient 1 − (T/Ts)(1 − a) (1 without a filter). */
  get filterSlope(): number {
    return this.slope;
  }

  /** One sample of the measurement chain for the (delayed) plant output w. */
  measure(w: number): number {
    let v = w;
    if (this.filtered) {
      if (!this.started) {
        // The filter starts settled at the first measurement (the plant is assumed at rest).
        this.z = w;
        this.wPrev = w;
        this.started = true;
      } else {
        this.z = this.a * this.z + (1 - this.a) * this.wPrev + (w - this.wPrev) * this.slope;
        this.wPrev = w;
      }
      v = this.z;
    }
    if (this.noiseStd > 0) v += this.noiseStd * this.rng.nextGaussian();
    if (this.resolution > 0) v = this.resolution * Math.round(v / this.resolution);
    return v;
  }
}
