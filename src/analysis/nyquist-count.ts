/**
 * Closed-loop stability of a sampled loop by the Nyquist criterion on the unit circle: the number
 * of closed-loop poles outside the unit circle is Z = P − W, P the open-loop poles outside it and W
 * the number of counter-clockwise turns of 1 + L(e^(jθ)) round the origin as θ goes once round
 * the circle, the circle bulging outwards round z = 1 so that integrators count as inside
 * (Åström & Wittenmark, Computer-Controlled Systems, 3rd ed. 1997, sec. 3.4 [from memory]; the
 * argument principle applied to det(zI − A_closed) = det(zI − A_open)(1 + L(z))).
 *
 * For a real loop the lower half circle mirrors the upper one, so W = (2Δ + arc)/2π, Δ the change
 * of arg(1 + L) from θ = θmin to θ = π and arc the change along the detour round z = 1, where
 * L ≈ K/(jθ)^q turns clockwise by qπ. Δ is accumulated exactly, without a dense grid: Im(1 + L) =
 * Im L, so between two consecutive crossings of the real axis by L, 1 + L stays in one half plane,
 * where the change of its argument is the difference of the endpoints' arguments taken in that
 * half plane. The caller reports every crossing of the real axis (arg L = kπ) in order, with
 * |L| at it (what the phase-crossover search finds anyway), and every grid point between them.
 */

/** Argument of a point of 1 + L taken in half plane σ (points on the real axis included). */
function argIn(re1: number, im: number, onAxis: boolean, sigma: number): number {
  if (!onAxis && im !== 0 && (im > 0) === (sigma > 0)) return Math.atan2(im, re1);
  return re1 > 0 ? 0 : sigma * Math.PI;
}

/** Accumulates arg(1 + L) along the upper half of the unit circle. */
export class NyquistCount {
  private change = 0;
  private phase: number;
  private re1: number;
  private im: number;
  private axis: boolean;
  private readonly startRe1: number;
  private readonly startIm: number;
  /** True when 1 + L passed through 0 (a closed-loop pole on the unit circle). */
  marginal = false;

  /** Start at θmin with L = re + j im of unwrapped phase `phase` (rad). */
  constructor(phase: number, re: number, im: number) {
    this.phase = phase;
    this.re1 = 1 + re;
    this.im = im;
    this.axis = false;
    this.startRe1 = 1 + re;
    this.startIm = im;
  }

  private step(phase: number, re1: number, im: number, onAxis: boolean): void {
    // Im L has the sign of sin(arg L) between the two points (no crossing lies between them).
    const sigma = Math.sin(0.5 * (this.phase + phase)) >= 0 ? 1 : -1;
    this.change += argIn(re1, im, onAxis, sigma) - argIn(this.re1, this.im, this.axis, sigma);
    this.phase = phase;
    this.re1 = re1;
    this.im = im;
    this.axis = onAxis;
  }

  /**
   * A grid point of L (unwrapped phase, rad). Report every one between the crossings: the half
   * plane of each stretch is read from the phases at its two ends, which is only right when the
   * stretch is short (L can leave the axis and come back to it between two crossings).
   */
  point(phase: number, re: number, im: number): void {
    this.step(phase, 1 + re, im, false);
  }

  /** L crosses the real axis at unwrapped phase kπ with magnitude m. */
  crossing(k: number, m: number): void {
    const re1 = k % 2 === 0 ? 1 + m : 1 - m;
    if (Math.abs(re1) <= 1e-12) this.marginal = true;
    this.step(k * Math.PI, re1, 0, true);
  }

  /** The end point θ = π, where L is real with unwrapped phase kπ and magnitude m. */
  end(k: number, m: number): void {
    this.crossing(k, m);
  }

  /**
   * Closed-loop poles outside the unit circle, given q (poles of L at z = 1, net of zeros there)
   * and P; null when the count is not a whole number (the grid did not start low enough).
   */
  unstablePoles(q: number, openLoopUnstable: number): number | null {
    const start = Math.atan2(this.startIm, this.startRe1);
    // The detour: from the mirror image −start to start, the value ≡ 2·start nearest −qπ.
    const arc = 2 * start - 2 * Math.PI * Math.round((2 * start + q * Math.PI) / (2 * Math.PI));
    const turns = (2 * this.change + arc) / (2 * Math.PI);
    const whole = Math.round(turns);
    if (Math.abs(turns - whole) > 0.05) return null;
    return openLoopUnstable - whole;
  }
}
