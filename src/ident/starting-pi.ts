/**
 * A conservative starting PI for a fitted model: Skogestad's SIMC rule with τc = θ
 * (S. Skogestad, "Simple analytic rules for model reduction and PID controller tuning",
 * J. Process Control 13 (2003) 291-309): Kc = T/(K (τc + θ)), Ti = min(T, 4 (τc + θ)); for an
 * integrating plant Kc = 1/(Kv (τc + θ)), Ti = 4 (τc + θ). τc = θ gives, on the model itself,
 * gain margin ≈ 3.1, phase margin ≈ 61°, Ms ≈ 1.6 (as computed in the project's reference sheet).
 *
 * Lags and zeros the rule has no room for go into an effective delay by the same paper's half
 * rule: half of the second lag (the other half to the first lag), an inverse-response time
 * constant whole, the lag of an integrating model whole, and half of the controller sample
 * time (the zero-order hold). For an oscillating second-order fit the lag sum 2ζ/ωn stands in
 * for T (our approximation, no source).
 *
 * Floor: the dead time counted is at least one sample interval h. A fit cannot place a delay
 * shorter than about a sample (it often ends on its bound 0), and τc = θ → 0 would then ask for
 * a gain limited only by h/2 (a log sampled fast gave Kc ≈ 38 that way); one sample plus the
 * hold's h/2 keeps the start conservative, as the rule intends (our choice of floor).
 */
import { FIT_KIND_INFO } from './fit-kinds.js';
import type { FitKind } from './fit-kinds.js';

/** A PI in the ideal form with the model numbers it came from. */
export interface StartingPi {
  kc: number;
  /** Integral time, s. */
  ti: number;
  /** Effective delay used, s. */
  effectiveDelay: number;
  /** Closed-loop time constant τc chosen, s. */
  tauC: number;
  /** One line naming the rule and its inputs. */
  rule: string;
}

/**
 * SIMC PI for family `kind` with fitted vector `v` (order of `FIT_KIND_INFO`), controller sample
 * time `h` (s).
 */
export function startingPi(kind: FitKind, v: readonly number[], h: number): StartingPi {
  let K = v[0];
  let T: number;
  let theta: number;
  let integrating = false;
  switch (kind) {
    case 'first_order':
      T = v[1];
      theta = v[2];
      break;
    case 'second_order': {
      const a = v[1];
      const r = v[2];
      if (r <= 0.25) {
        const s = Math.sqrt(1 - 4 * r);
        const t1 = (a * (1 + s)) / 2;
        const t2 = (a * (1 - s)) / 2;
        T = t1 + t2 / 2;
        theta = v[3] + t2 / 2;
      } else {
        T = a;
        theta = v[3];
      }
      break;
    }
    case 'integrating':
      integrating = true;
      T = 0;
      theta = v[2] + v[1];
      break;
    case 'inverse_response':
      T = v[1];
      theta = v[3] + v[2];
      break;
  }
  const fitted = v[FIT_KIND_INFO[kind].delayIndex];
  const effectiveDelay = theta - fitted + Math.max(fitted, h) + h / 2;
  const tauC = effectiveDelay;
  if (integrating) {
    const kc = 1 / (K * (tauC + effectiveDelay));
    const ti = 4 * (tauC + effectiveDelay);
    return { kc, ti, effectiveDelay, tauC, rule: `SIMC (Skogestad 2003), integrating: Kc = 1/(Kv (τc + θ)), Ti = 4 (τc + θ), τc = θ = ${fmt(effectiveDelay)} s` };
  }
  K = K === 0 ? Number.MIN_VALUE : K;
  const kc = T / (K * (tauC + effectiveDelay));
  const ti = Math.min(T, 4 * (tauC + effectiveDelay));
  return {
    kc,
    ti,
    effectiveDelay,
    tauC,
    rule: `SIMC (Skogestad 2003): Kc = T/(K (τc + θ)), Ti = min(T, 4 (τc + θ)), τc = θ = ${fmt(effectiveDelay)} s, T = ${fmt(T)} s`,
  };
}

function fmt(x: number): string {
  return String(+x.toPrecision(4));
}
