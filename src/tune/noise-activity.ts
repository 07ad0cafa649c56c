/**
 * How much sensor noise alone moves the actuator, sample to sample, and how often that alone
 * drives it into its rate limit.
 *
 * Well above the loop's bandwidth the loop gain is small, S ≈ 1, so the controller passes the
 * measurement noise straight to its output: u ≈ −C(z) n (common practice, no source). The
 * simulated sensor adds white Gaussian noise of standard deviation σ once per sample, after its
 * filter (sim/sensor.ts), so the change Δu_k = u_k − u_{k−1} it causes is Gaussian with standard
 * deviation σ · ‖(1 − z⁻¹) C(z)‖₂, the 2-norm of the impulse response of the differenced law
 * (control's lawNoiseGains, from the discrete PID law itself).
 */
import { lawNoiseGains } from '../control/index.js';
import type { PidLaw } from '../sim/index.js';

/**
 * Complementary error function, |error| < 1.2e-7 everywhere: the Chebyshev-fitted form of
 * Press, Teukolsky, Vetterling & Flannery, Numerical Recipes, 3rd ed., 2007, section 6.2 (erfcc)
 * [from memory].
 */
export function erfc(x: number): number {
  const z = Math.abs(x);
  const t = 1 / (1 + 0.5 * z);
  const r =
    t *
    Math.exp(
      -z * z -
        1.26551223 +
        t * (1.00002368 + t * (0.37409196 + t * (0.09678418 + t * (-0.18628806 + t * (0.27886807 + t * (-1.13520398 + t * (1.48851587 + t * (-0.82215223 + t * 0.17087277)))))))),
    );
  return x >= 0 ? r : 2 - r;
}

/** The actuator's noise-driven activity under a gain set. */
export interface NoiseActivity {
  /** Standard deviation of the per-sample change of the controller output due to sensor noise. */
  stepStd: number;
  /** Largest change the rate limit allows in one sample (Infinity without one). */
  rateStep: number;
  /** Expected share of samples in which noise alone asks for more than `rateStep`, 0..1. */
  rateLimitedShare: number;
}

/** The finding in words, with its numbers and what to do about it. */
export function noiseMessage(n: NoiseActivity): string {
  return (
    `actuator rate-limited on ~${(100 * n.rateLimitedShare).toFixed(0)} % of samples by sensor noise alone ` +
    `(it moves ~${n.stepStd.toPrecision(2)} per sample, 1 sigma, against a rate limit of ${n.rateStep.toPrecision(2)}): ` +
    'lower kc, filter the measurement in the controller, or put a weight on output variation'
  );
}

/** Noise-driven actuator activity for a law, the sensor's noise σ and the actuator's rate limit (units/s). */
export function noiseActivity(law: PidLaw, noiseStd: number, rateLimit: number): NoiseActivity {
  const stepStd = noiseStd * lawNoiseGains(law).step;
  const rateStep = rateLimit * law.sampleTime;
  // P(|Δu| > R h) for Δu ~ N(0, stepStd²).
  const rateLimitedShare = !(stepStd > 0) || !Number.isFinite(rateStep) ? 0 : erfc(rateStep / (stepStd * Math.SQRT2));
  return { stepStd, rateStep, rateLimitedShare };
}
