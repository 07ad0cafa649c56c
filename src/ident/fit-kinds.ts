/**
 * The model families a bump test is fitted with, each as a small linear state-space system in
 * deviation variables (output − level, input − pre-step input) plus a dead time:
 *
 *   first_order       K e^{−θs}/(T s + 1)                     p = [K, T, θ, y0]
 *   second_order      K e^{−θs}/(r a² s² + a s + 1)           p = [K, a, r, θ, y0]
 *   integrating       Kv e^{−θs}/(s (T s + 1))                p = [Kv, T, θ, y0]    (T may be 0)
 *   inverse_response  K (−Tz s + 1) e^{−θs}/(T s + 1)         p = [K, T, Tz, θ, y0]
 *
 * The second-order family is written with the sum of the time constants a (= T1 + T2 = 2ζ/ωn)
 * and the shape r = T1·T2/a² (= 1/(4ζ²)): one parameter set covers two real lags (r ≤ 1/4,
 * T1,2 = a(1 ± √(1 − 4r))/2), an oscillating response (r > 1/4) and, at r = 0, the first-order
 * model (T = a) as an ordinary bound instead of ζ → ∞, so the search does not crawl along an
 * endless valley when the data show one lag only.
 */

/** Names of the fitted model families. */
export type FitKind = 'first_order' | 'second_order' | 'integrating' | 'inverse_response';

/** All families, simplest first (the order `--model auto` lists them). */
export const FIT_KINDS: readonly FitKind[] = ['first_order', 'integrating', 'second_order', 'inverse_response'];

/** Static description of one family. */
export interface FitKindInfo {
  kind: FitKind;
  /** Short label for tables. */
  label: string;
  /** Parameter names in vector order (the last one is always the output level y0). */
  params: readonly string[];
  /** Index of the gain (it enters the response linearly). */
  gainIndex: number;
  /** Index of the dead time. */
  delayIndex: number;
  /** True for families whose step response settles (all but integrating). */
  selfRegulating: boolean;
}

export const FIT_KIND_INFO: Record<FitKind, FitKindInfo> = {
  first_order: { kind: 'first_order', label: 'FOPDT', params: ['gain', 'time_constant', 'delay', 'level'], gainIndex: 0, delayIndex: 2, selfRegulating: true },
  second_order: { kind: 'second_order', label: 'SOPDT', params: ['gain', 'lag_sum', 'shape', 'delay', 'level'], gainIndex: 0, delayIndex: 3, selfRegulating: true },
  integrating: { kind: 'integrating', label: 'IPDT', params: ['gain', 'time_constant', 'delay', 'level'], gainIndex: 0, delayIndex: 2, selfRegulating: false },
  inverse_response: { kind: 'inverse_response', label: 'FOPDT+RHP zero', params: ['gain', 'time_constant', 'zero_time_constant', 'delay', 'level'], gainIndex: 0, delayIndex: 3, selfRegulating: true },
};

/** Accepted spellings of a family on the command line. */
export function parseFitKind(text: string): FitKind | null {
  const t = text.trim().toLowerCase().replace(/-/g, '_');
  switch (t) {
    case 'first_order':
    case 'fopdt':
      return 'first_order';
    case 'second_order':
    case 'sopdt':
      return 'second_order';
    case 'integrating':
    case 'ipdt':
      return 'integrating';
    case 'inverse_response':
    case 'inverse':
      return 'inverse_response';
    default:
      return null;
  }
}

/** A SISO linear system with at most two states: dx = A x + B u, y = C x + D u. */
export interface SmallLti {
  n: 1 | 2;
  /** Row-major n × n. */
  a: Float64Array;
  b: Float64Array;
  c: Float64Array;
  d: number;
}

/** A fresh, zeroed `SmallLti` to be filled by `kindSystem`. */
export function emptyLti(): SmallLti {
  return { n: 1, a: new Float64Array(4), b: new Float64Array(2), c: new Float64Array(2), d: 0 };
}

// Below this lag (relative to the sample interval) the integrating family drops its lag state.
const NEGLIGIBLE_LAG = 1e-6;

/**
 * Fill `sys` with the state-space realisation of family `kind` at parameters `p`, with the gain
 * replaced by `gain` (the fits evaluate unit-gain responses and scale them).
 */
export function kindSystem(kind: FitKind, p: ArrayLike<number>, gain: number, dt: number, sys: SmallLti): void {
  sys.a.fill(0);
  sys.b.fill(0);
  sys.c.fill(0);
  sys.d = 0;
  switch (kind) {
    case 'first_order': {
      const T = p[1];
      sys.n = 1;
      sys.a[0] = -1 / T;
      sys.b[0] = gain / T;
      sys.c[0] = 1;
      return;
    }
    case 'second_order': {
      const a1 = p[1];
      const a2 = p[2] * a1 * a1;
      if (a2 <= NEGLIGIBLE_LAG * NEGLIGIBLE_LAG * dt * dt) {
        sys.n = 1;
        sys.a[0] = -1 / a1;
        sys.b[0] = gain / a1;
        sys.c[0] = 1;
        return;
      }
      sys.n = 2;
      // x0 = y, x1 = dy/dt:  a2 y'' + a1 y' + y = K u
      sys.a[1] = 1;
      sys.a[2] = -1 / a2;
      sys.a[3] = -a1 / a2;
      sys.b[1] = gain / a2;
      sys.c[0] = 1;
      return;
    }
    case 'integrating': {
      const T = p[1];
      if (T <= NEGLIGIBLE_LAG * dt) {
        sys.n = 1;
        sys.a[0] = 0;
        sys.b[0] = gain;
        sys.c[0] = 1;
        return;
      }
      sys.n = 2;
      // x1 = lagged input, x0 = its integral times the gain
      sys.a[1] = gain;
      sys.a[3] = -1 / T;
      sys.b[1] = 1 / T;
      sys.c[0] = 1;
      return;
    }
    case 'inverse_response': {
      const T = p[1];
      const Tz = p[2];
      // K (1 − Tz s)/(T s + 1) = −K Tz/T + K (1 + Tz/T)/(T s + 1)
      sys.n = 1;
      sys.a[0] = -1 / T;
      sys.b[0] = (gain * (1 + Tz / T)) / T;
      sys.c[0] = 1;
      sys.d = (-gain * Tz) / T;
      return;
    }
  }
}
