/**
 * Reading the ultimate point off a relay-feedback oscillation with the describing function.
 *
 * The first harmonic of a relay square wave of height d is 4d/pi, so an ideal relay has the
 * describing function N(a) = 4d/(pi a) and the loop oscillates where G(i w) = -1/N(a):
 *   Ku ~ 4 d/(pi a),  Tu ~ the measured period.
 * With hysteresis eps, -1/N(a) = -(pi/(4d)) (sqrt(a^2 - eps^2) + i eps): the point found has
 * |G| = pi a/(4d) and arg G = -pi + arcsin(eps/a), not exactly the phase crossover.
 * Source: Åström & Hägglund, Automatica 20(5) (1984) 645-651; reference sheet section 8 ([2+] for
 * the method, [math] for the formulas). Harmonics are neglected, so this is an approximation:
 * small error for strongly low-pass plants, larger for delay-dominant ones.
 */

/** Result of `relayEstimate`. */
export interface RelayEstimate {
  /** Half peak-to-peak amplitude a of the measured output over the analysed cycles. */
  amplitude: number;
  /** Mean oscillation period over the analysed cycles, s. */
  period: number;
  /** Describing-function estimate 4d/(pi a) of the ultimate gain (sign: the relay direction). */
  ku: number;
  /** Estimate of the ultimate period, s (= period). */
  tu: number;
  /** Phase of G at the identified point, deg: -180 + asin(eps/a). */
  phaseDeg: number;
  /** Number of whole cycles analysed. */
  cycles: number;
  /** True when the last two cycles agree within `tolerance` in period and amplitude. */
  converged: boolean;
  /** Relative change of period and amplitude between the last two cycles. */
  lastChange: number;
}

/** Options of `relayEstimate`. */
export interface RelayEstimateOptions {
  /** Relay amplitude d. */
  amplitude: number;
  /** Relay hysteresis eps (default 0). */
  hysteresis?: number;
  /** Whole cycles to analyse at the end of the record (default 4). */
  cycles?: number;
  /** Cycles dropped at the start as transient, at least (default 2). */
  skipCycles?: number;
  /** Convergence tolerance on the last two cycles, relative (default 0.02). */
  tolerance?: number;
}

/**
 * Estimate the ultimate point from a recorded relay oscillation (t, y: time and the measured
 * output, same length). Returns null when fewer than skipCycles + 2 whole cycles are present.
 * Cycles are cut at the upward crossings of the output through the midline of the last part of
 * the record, located by linear interpolation between samples (the relay itself only switches at
 * samples, so its switch instants are coarser than this).
 */
export function relayEstimate(
  t: ArrayLike<number>,
  y: ArrayLike<number>,
  options: RelayEstimateOptions,
): RelayEstimate | null {
  const n = Math.min(t.length, y.length);
  const d = options.amplitude;
  if (!(d > 0)) throw new RangeError('relay amplitude must be > 0');
  const eps = options.hysteresis ?? 0;
  const wanted = Math.max(1, options.cycles ?? 4);
  const skip = Math.max(0, options.skipCycles ?? 2);
  const tol = options.tolerance ?? 0.02;
  if (n < 4) return null;

  // Midline from the last half of the record, where the transient has died out.
  let lo = Infinity;
  let hi = -Infinity;
  for (let i = n >> 1; i < n; i++) {
    if (y[i] < lo) lo = y[i];
    if (y[i] > hi) hi = y[i];
  }
  if (!(hi > lo)) return null;
  const mid = 0.5 * (hi + lo);

  const ups: number[] = [];
  for (let i = 1; i < n; i++) {
    if (y[i - 1] < mid && y[i] >= mid) {
      const f = (mid - y[i - 1]) / (y[i] - y[i - 1]);
      ups.push(t[i - 1] + f * (t[i] - t[i - 1]));
    }
  }
  const whole = ups.length - 1;
  if (whole < skip + 2) return null;
  const cycles = Math.min(wanted, whole - skip);
  const first = ups.length - 1 - cycles;

  const cycleStats = (a: number, b: number): { amp: number; per: number } => {
    let mn = Infinity;
    let mx = -Infinity;
    for (let i = 0; i < n; i++) {
      if (t[i] < a || t[i] > b) continue;
      if (y[i] < mn) mn = y[i];
      if (y[i] > mx) mx = y[i];
    }
    return { amp: 0.5 * (mx - mn), per: b - a };
  };
  const whole0 = cycleStats(ups[first], ups[ups.length - 1]);
  const last = cycleStats(ups[ups.length - 2], ups[ups.length - 1]);
  const prev = cycleStats(ups[ups.length - 3], ups[ups.length - 2]);
  const lastChange = Math.max(Math.abs(last.per - prev.per) / prev.per, Math.abs(last.amp - prev.amp) / prev.amp);

  const a = whole0.amp;
  const period = whole0.per / cycles;
  const phaseDeg = -180 + (eps < a ? (Math.asin(eps / a) * 180) / Math.PI : 90);
  return {
    amplitude: a,
    period,
    ku: (4 * d) / (Math.PI * a),
    tu: period,
    phaseDeg,
    cycles,
    converged: lastChange <= tol,
    lastChange,
  };
}
