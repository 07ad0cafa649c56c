/**
 * Frequency response of the PID law the loop runs. With a sample time h > 0 it is control/pid.ts's
 * discrete law itself (coefficients from `pidCoefficients`, the one definition of its
 * discretisation), from the measurement to the output with the sign reversed (setpoint weights do
 * not enter the loop):
 *
 *   C(z) = kc + bi z⁻¹/(1 − z⁻¹) + bd (1 − z⁻¹)/(1 − ad z⁻¹)
 *
 * (proportional; forward-Euler integral updated after the output, hence the z⁻¹; filtered
 * backward-difference derivative), at z = e^(jθ), θ = ωh, in closed form:
 *   z⁻¹/(1 − z⁻¹) = −1/2 − (j/2) cot(θ/2),
 *   (1 − z⁻¹)/(1 − ad z⁻¹) = ((1 − cos θ)(1 + ad) + j sin θ (1 − ad))/(1 − 2 ad cos θ + ad²).
 * With h = 0 it is the continuous law of freq-response.ts's `controllerResponse` (the limit).
 */
import { pidCoefficients } from '../control/index.js';
import type { GainSet } from '../model/types.js';
import { controllerResponse } from './freq-response.js';

/** Writes C(jω) (or C(e^(jωh))) to out[0..1] and returns its phase, rad: principal value of C/kc, plus π when kc < 0. */
export type LawResponse = (w: number, out: Float64Array) => number;

/** The response of gain set `g` run at sample time h (s; 0 = the continuous law). */
export function pidLawResponse(g: GainSet, h: number): LawResponse {
  if (!(h > 0)) return (w, out) => controllerResponse(g, w, out);
  const kc = g.kc;
  const q = pidCoefficients(g, h);
  // Coefficients per unit kc (all three are proportional to kc), so the phase is defined at kc = 0 too.
  const biN = Number.isFinite(g.ti) ? h / g.ti : 0;
  const bdN = kc !== 0 ? q.bd / kc : g.td > 0 ? (g.n === Infinity ? g.td / h : g.n * q.ad) : 0;
  const ad = q.ad;
  const flip = kc < 0 ? Math.PI : 0;
  const adDen = 1 + ad * ad;
  return (w, out) => {
    const half = 0.5 * w * h;
    const sh = Math.sin(half);
    const ch = Math.cos(half);
    const oneMinusCos = 2 * sh * sh;
    const sin = 2 * sh * ch;
    let re = 1 - 0.5 * biN;
    let im = sh !== 0 ? (-0.5 * biN * ch) / sh : -Infinity;
    if (bdN !== 0) {
      const den = adDen - 2 * ad * (1 - oneMinusCos);
      re += (bdN * oneMinusCos * (1 + ad)) / den;
      im += (bdN * sin * (1 - ad)) / den;
    }
    out[0] = kc * re;
    out[1] = kc * im;
    return Math.atan2(im, re) + flip;
  };
}
