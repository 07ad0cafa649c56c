/**
 * Exact sampled response of a small linear system with dead time to a held (zero-order-hold)
 * input, on the data's own time grid.
 *
 * The dead time θ = (m + f)·dt is split into whole samples m and a fraction f ∈ [0, 1). Over
 * the interval [t_k, t_k+1) the delayed input is u[k−m−1] for the first f·dt and u[k−m] for
 * the remaining (1 − f)·dt, so each interval is two exact ZOH sub-steps. The sampled response
 * is then exact for a held input and continuous in θ, so the fit's cost is not stuck on the
 * sampling grid. A direct feed-through term (inverse response) is sampled as it is, D·u(t_k − θ):
 * u[k−m−1] when f > 0, u[k−m] when f = 0. That term alone jumps when θ crosses a sample instant
 * (by D·Δu at the one sample after each input move); inside each sample interval the cost is
 * smooth, and the fit starts from several delays. (Interpolating the feed-through input instead
 * would make the cost continuous but put an error of up to D·Δu/2 on that sample, which biased
 * the zero's time constant by several standard errors in our tests; it is offered as
 * `interpolateFeedthrough` for the first, basin-finding stage of a fit, whose cost must not
 * trap the delay in one sample interval.)
 *
 * Before the first sample the system is at rest with the input at its reference (du = 0).
 */
import { zohDiscretise } from '../num/index.js';
import type { SmallLti } from './fit-kinds.js';

/** Reusable work space for `simulate`; allocates nothing per call. */
export class ResponseSimulator {
  private readonly phi1 = new Float64Array(4);
  private readonly gam1 = new Float64Array(2);
  private readonly phi2 = new Float64Array(4);
  private readonly gam2 = new Float64Array(2);
  /** Feed-through sees f·u[k−m−1] + (1 − f)·u[k−m] instead of u(t_k − θ) (continuous in θ, not exact). */
  interpolateFeedthrough = false;

  /**
   * Write into `out[0..n)` the response y_k = C x(t_k) + D u_delayed of `sys` with dead time
   * `theta` (s) to the input deviations `du` (held over each interval dt).
   */
  simulate(sys: SmallLti, theta: number, dt: number, du: Float64Array, out: Float64Array, n: number = du.length): void {
    const q = theta / dt;
    let m = Math.floor(q);
    let f = q - m;
    if (f < 1e-12) f = 0;
    if (f > 1 - 1e-12) {
      m += 1;
      f = 0;
    }
    // Weights of the previous and current input in the feed-through term.
    const wPrev = this.interpolateFeedthrough ? f : f > 0 ? 1 : 0;
    const wCur = 1 - wPrev;
    const h1 = f * dt;
    const h2 = dt - h1;
    const d = sys.d;
    if (sys.n === 1) {
      const a = sys.a[0];
      const b = sys.b[0];
      const c = sys.c[0];
      // Scalar exact ZOH: Φ = e^{ah}, Γ = b (e^{ah} − 1)/a (→ b h as a → 0).
      const p1 = Math.exp(a * h1);
      const g1 = a === 0 ? b * h1 : (b * Math.expm1(a * h1)) / a;
      const p2 = Math.exp(a * h2);
      const g2 = a === 0 ? b * h2 : (b * Math.expm1(a * h2)) / a;
      let x = 0;
      for (let k = 0; k < n; k++) {
        const iPrev = k - m - 1;
        const iCur = k - m;
        const uPrev = iPrev >= 0 ? du[iPrev] : 0;
        const uCur = iCur >= 0 ? du[iCur] : 0;
        out[k] = c * x + d * (wPrev * uPrev + wCur * uCur);
        x = p2 * (p1 * x + g1 * uPrev) + g2 * uCur;
      }
      return;
    }
    const phi1 = this.phi1;
    const gam1 = this.gam1;
    const phi2 = this.phi2;
    const gam2 = this.gam2;
    zohDiscretise(sys.a, sys.b, 2, h1, phi1, gam1);
    zohDiscretise(sys.a, sys.b, 2, h2, phi2, gam2);
    // Fold the two sub-steps into one: x+ = Φ2 Φ1 x + Φ2 Γ1 uPrev + Γ2 uCur.
    const A00 = phi2[0] * phi1[0] + phi2[1] * phi1[2];
    const A01 = phi2[0] * phi1[1] + phi2[1] * phi1[3];
    const A10 = phi2[2] * phi1[0] + phi2[3] * phi1[2];
    const A11 = phi2[2] * phi1[1] + phi2[3] * phi1[3];
    const P0 = phi2[0] * gam1[0] + phi2[1] * gam1[1];
    const P1 = phi2[2] * gam1[0] + phi2[3] * gam1[1];
    const C0 = gam2[0];
    const C1 = gam2[1];
    const c0 = sys.c[0];
    const c1 = sys.c[1];
    let x0 = 0;
    let x1 = 0;
    for (let k = 0; k < n; k++) {
      const iPrev = k - m - 1;
      const iCur = k - m;
      const uPrev = iPrev >= 0 ? du[iPrev] : 0;
      const uCur = iCur >= 0 ? du[iCur] : 0;
      out[k] = c0 * x0 + c1 * x1 + d * (wPrev * uPrev + wCur * uCur);
      const n0 = A00 * x0 + A01 * x1 + P0 * uPrev + C0 * uCur;
      const n1 = A10 * x0 + A11 * x1 + P1 * uPrev + C1 * uCur;
      x0 = n0;
      x1 = n1;
    }
  }
}
