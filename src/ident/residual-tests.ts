/**
 * Residual tests of model validation (L. Ljung, System Identification: Theory for the User,
 * 2nd ed. 1999, section 16.6):
 *
 * Whiteness: with R̂ε(τ) = (1/N) Σ_{t>τ} ε(t) ε(t−τ), the statistic
 *   ζ = N Σ_{τ=1..M} (R̂ε(τ)/R̂ε(0))²
 * is asymptotically χ²(M) when ε is white; a larger value says the residuals still carry
 * dynamics the model missed (or coloured noise).
 *
 * Independence of past inputs: with r = [R̂εu(0) … R̂εu(M−1)]ᵀ, R̂εu(τ) = (1/N) Σ ε(t) u(t−τ), and
 * P = R̂ε(0) R̂u (R̂u the M × M Toeplitz matrix of the input's autocovariance: the covariance of
 * √N r when ε is white), ζ = N rᵀ P⁻¹ r is asymptotically χ²(M); a larger value says part of the
 * output that follows the input is not explained by the model. Only τ ≥ 0 is tested: in closed
 * loop the input depends on past residuals by design.
 *
 * The means of ε and u are removed first (the input usually sits far from zero). Both tests at
 * the 95 % level.
 */
import { chiSquareQuantile, solve } from '../num/index.js';

/** One chi-square test. */
export interface ChiSquareTest {
  statistic: number;
  /** 95 % point of χ²(lags). */
  threshold: number;
  lags: number;
  passed: boolean;
}

/** Result of `residualTests`. */
export interface ResidualTests {
  /** R̂ε(τ)/R̂ε(0), τ = 1..M. */
  autocorrelation: number[];
  /** R̂εu(τ)/√(R̂ε(0) R̂u(0)), τ = 0..M−1 (at τ = 0 the sample correlation coefficient of ε and u). */
  crossCorrelation: number[];
  /** ±1.96/√N: the 95 % band of one normalised correlation of white residuals. */
  band: number;
  whiteness: ChiSquareTest;
  /** Null when the input does not move (nothing to correlate with). */
  inputIndependence: ChiSquareTest | null;
}

/** Default number of lags tested. */
export const RESIDUAL_LAGS = 20;

/** The two tests on residuals `e` and input `u` (same length) with `lags` lags. */
export function residualTests(e: ArrayLike<number>, u: ArrayLike<number>, lags = RESIDUAL_LAGS): ResidualTests {
  const n = e.length;
  const M = Math.max(1, Math.min(lags, Math.floor(n / 4)));
  const ec = centred(e);
  const uc = centred(u);
  const Re = covariances(ec, ec, M + 1);
  const Ru = covariances(uc, uc, M);
  const Reu = covariances(ec, uc, M);
  const autocorrelation: number[] = [];
  let zeta = 0;
  for (let tau = 1; tau <= M; tau++) {
    const rho = Re[0] > 0 ? Re[tau] / Re[0] : 0;
    autocorrelation.push(rho);
    zeta += rho * rho;
  }
  zeta *= n;
  const threshold = chiSquareQuantile(0.95, M);
  const whiteness: ChiSquareTest = { statistic: zeta, threshold, lags: M, passed: zeta <= threshold };
  const crossCorrelation: number[] = [];
  for (let tau = 0; tau < M; tau++) crossCorrelation.push(Re[0] > 0 && Ru[0] > 0 ? Reu[tau] / Math.sqrt(Re[0] * Ru[0]) : 0);
  let inputIndependence: ChiSquareTest | null = null;
  if (Ru[0] > 0 && Re[0] > 0) {
    const P = new Float64Array(M * M);
    for (let i = 0; i < M; i++) for (let j = 0; j < M; j++) P[i * M + j] = Re[0] * Ru[Math.abs(i - j)];
    const x = solve(P, M, Float64Array.from(Reu));
    if (x !== null) {
      let s = 0;
      for (let i = 0; i < M; i++) s += Reu[i] * x[i];
      const stat = n * s;
      inputIndependence = { statistic: stat, threshold, lags: M, passed: stat <= threshold };
    }
  }
  return { autocorrelation, crossCorrelation, band: 1.96 / Math.sqrt(n), whiteness, inputIndependence };
}

function centred(a: ArrayLike<number>): Float64Array {
  const n = a.length;
  let m = 0;
  for (let i = 0; i < n; i++) m += a[i];
  m /= n;
  const out = new Float64Array(n);
  for (let i = 0; i < n; i++) out[i] = a[i] - m;
  return out;
}

/** (1/N) Σ_{t ≥ τ} a(t) b(t − τ) for τ = 0..count−1. */
function covariances(a: Float64Array, b: Float64Array, count: number): number[] {
  const n = a.length;
  const out: number[] = [];
  for (let tau = 0; tau < count; tau++) {
    let s = 0;
    for (let t = tau; t < n; t++) s += a[t] * b[t - tau];
    out.push(s / n);
  }
  return out;
}
