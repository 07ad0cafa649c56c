/**
 * The one figure every ranking and flag by robustness reads: the sensitivity peak Ms of a loop,
 * or Infinity when that peak says nothing good about it. Ms = max |1/(1 + L)| is only a robustness
 * measure for a stable closed loop (the 1/Ms distance of the Nyquist curve to −1 presumes the
 * encirclements are right: Åström & Murray, Feedback Systems, 2008, section 9.3 [from memory]),
 * so an unstable loop ranks as the least robust, and so does a loop whose Ms could not be worked
 * out (no margins, or a NaN peak): a ranking must not prefer a loop it knows nothing about.
 */

/** What Ms is read from: analysis' Margins, or any margins record with the same two fields. */
export interface MsSource {
  /** Peak of |S| = |1/(1 + L)|. */
  maxSensitivity: number;
  /** Closed-loop stability; null when not checked (then the peak is taken as it is). */
  closedLoopStable: boolean | null;
}

/**
 * Ms of a loop, or Infinity when the loop is unstable or has no margins.
 * @param m the loop's margins; null or undefined = none could be computed
 * @returns Ms (>= 1 for any loop whose L goes to 0 at high frequency), or Infinity
 */
export function effectiveMs(m: MsSource | null | undefined): number {
  if (m === null || m === undefined) return Infinity;
  if (m.closedLoopStable === false || Number.isNaN(m.maxSensitivity)) return Infinity;
  return m.maxSensitivity;
}
