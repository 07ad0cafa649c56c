/**
 * The limit cycle a sticky valve (or backlash) causes, predicted by the describing-function method
 * (Gelb & Vander Velde, Multiple-Input Describing Functions and Nonlinear System Design, 1968,
 * ch. 2, from memory): a sinusoid A sin ωt at the element's input sustains itself when
 * 1 + N(A) L(jω) = 0, with N(A) the ratio of the element output's first harmonic to the input, and
 * L the rest of the loop seen from the element's output back to its input (plant, sensor, PID law).
 *
 * N(A) is computed from its definition on the element the engine runs (sim's Actuator, the one
 * written law), in the continuous limit: two periods of A sin θ on a fine grid, the first harmonic
 * of the second period by the rectangle rule (exact for a periodic function up to the grid's
 * resolution). L is analysis' one composition of the loop (loop-frequency-response.ts
 * loopResponse: the exact sampled loop path times the PID law) on the point's model, which carries
 * the valve lag 1/(1 + jωT) and the characteristic's local slope (loop/'s operating points; our
 * approximation: the lag acts on the held stem, here it is part of the continuous plant).
 *
 * Beside it, the stick-slip balance (`stickSlipCycle`) for a self-regulating loop under integral
 * action, and `valveCycle`, the one prediction that picks between them.
 */
import type { ActuatorSpec, GainSet } from '../model/types.js';
import { solve } from '../num/index.js';
import { Actuator, valveBand, valveInput, type LinearModel } from '../sim/index.js';
import { wrapAngle, type PlantFrequencyResponse } from './freq-response.js';
import { loopPath, type LoopSensor } from './loop-path.js';
import { loopResponse } from './loop-frequency-response.js';

/** The band the element is made from: sim's own reading of the actuator (one definition). */
export { valveBand };

/** A memory element stepped on its input: returns its output (state kept inside). */
export type ElementStep = (u: number) => number;

/** A fresh element for the input A sin θ (a hysteretic element may start where the cycle puts it). */
export type ElementFactory = (A: number) => ElementStep;

/** Points per period of the describing-function quadrature. */
const DF_POINTS = 8192;

/**
 * Describing function N(A) = (b1 + j a1)/A of an element on the input A sin θ, from its
 * definition: b1, a1 the sine and cosine coefficients of the output's first harmonic over the
 * second of two periods (the first lets a hysteretic element reach its periodic state).
 * @param make a fresh element for amplitude A
 */
export function describingFunction(make: ElementFactory, A: number, points = DF_POINTS): { re: number; im: number } {
  const el = make(A);
  let b1 = 0;
  let a1 = 0;
  for (let i = 0; i < 2 * points; i++) {
    const th = (2 * Math.PI * i) / points;
    const s = Math.sin(th);
    const y = el(A * s);
    if (i >= points) {
      b1 += y * s;
      a1 += y * Math.cos(th);
    }
  }
  b1 *= 2 / points;
  a1 *= 2 / points;
  return { re: b1 / A, im: a1 / A };
}

/**
 * The engine's stiction element (sim's Actuator without limits). For amplitude A the stem starts
 * where a slip at the input's lowest point leaves it, −(A − dynamic): started at 0, an input that
 * never leaves the static band round 0 would never show the cycle that amplitudes above
 * (static + dynamic)/2 sustain once the stem has moved.
 */
export function stictionElement(band: { static: number; dynamic: number }): ElementFactory {
  const spec: ActuatorSpec = { min: -Infinity, max: Infinity, rateLimit: Infinity, stiction: band };
  return (A: number) => {
    const a = new Actuator(spec, -(A - band.dynamic));
    return (u: number) => {
      a.command(u, 1);
      return a.stem;
    };
  };
}

/** A predicted limit cycle. */
export interface LimitCycle {
  /** Amplitude of the controller output's cycle (the element's input), input units. */
  amplitude: number;
  /** Period, s. */
  period: number;
  /** Frequency, rad/s. */
  frequency: number;
  /** Amplitude of the measurement's cycle (first harmonic), output units. */
  outputAmplitude: number;
}

/**
 * What the prediction needs besides the element: the plant at the operating point (whose linear
 * model already carries the valve's lag and characteristic slope: loop/'s operating points) and
 * the loop.
 */
export interface CycleLoop {
  plant: PlantFrequencyResponse;
  gains: GainSet;
  sampleTime: number;
  sensor: LoopSensor;
}

/**
 * The limit cycle of the loop with the element, or null when 1 + N(A) L(jω) = 0 has no stable
 * solution. `band`: the smallest amplitude that moves the element ((static + dynamic)/2 for
 * stiction). Along a grid of amplitudes (from there to 1000 times it), every frequency where L's
 * phase equals that of −1/N(A) is found on a frequency grid (an integrating loop under PI meets a
 * phase twice: once where the PI zero lifts its phase, once where the delay pulls it down), and
 * on each such branch the magnitudes compared; a sign change of their log ratio g = ln|N L| is
 * refined by bisection. A solution is kept only when the cycle is stable in amplitude (Loeb's
 * criterion, Gelb & Vander Velde 1968, ch. 2, from memory): a slightly larger amplitude must see
 * a loop gain |N L| below 1 where L's phase falls with frequency, above 1 where it rises (the
 * point −1/N leaves the region L encircles). Of several stable solutions the largest amplitude
 * is reported (our choice: the outermost is the one a cycle grows into from small disturbances).
 */
export function predictLimitCycle(make: ElementFactory, band: number, loop: CycleLoop): LimitCycle | null {
  const path = loopPath(loop.plant, loop.sampleTime, loop.sensor);
  const loopAt = loopResponse(loop.plant, loop.gains, loop.sampleTime, loop.sensor);
  const wMax = path.w[path.w.length - 1];
  const wMin = path.w[0];
  const tmp = new Float64Array(2);
  /** L(jω) into [re, im] (analysis' one composition of the loop). */
  const L = (w: number): [number, number] => {
    loopAt(w, tmp);
    return [tmp[0], tmp[1]];
  };
  const lnBand = Math.log(band);
  // −1/N(A) moves fast just above the smallest moving amplitude: the amplitude grid is dense there.
  const nA = 200;
  const lnAs: number[] = [];
  for (let j = 0; j < nA; j++) lnAs.push(lnBand + Math.log1p(1e-3 * Math.pow(1e6, j / (nA - 1))));
  const nW = 600;
  const wLo = Math.max(wMin, wMax * 1e-6);
  const lnW: number[] = [];
  const lnMag: number[] = [];
  const phase: number[] = [];
  for (let i = 0; i < nW; i++) {
    const w = wLo * Math.pow(wMax / wLo, i / (nW - 1));
    const [lr, li] = L(w);
    const p = Math.atan2(li, lr);
    lnW.push(Math.log(w));
    lnMag.push(Math.log(Math.hypot(lr, li)));
    phase.push(i === 0 ? p : phase[i - 1] + wrapAngle(p - phase[i - 1]));
  }
  /** A frequency where L's phase meets −1/N(A)'s: g = ln|L| − ln|1/N| there (0 on a limit cycle), `rising` L's phase with ω. */
  interface Meet {
    g: number;
    lnW: number;
    rising: boolean;
  }
  /** Every meeting point for amplitude e^lnA, by frequency; empty when N = 0 or the phases never meet. */
  const meetings = (lnA: number): Meet[] => {
    const n = describingFunction(make, Math.exp(lnA));
    const nn = n.re * n.re + n.im * n.im;
    if (!(nn > 1e-18)) return [];
    const target = Math.atan2(n.im / nn, -n.re / nn);
    const out: Meet[] = [];
    for (let i = 0; i + 1 < nW; i++) {
      for (const k of [-2, -1, 0, 1]) {
        const t = target + 2 * Math.PI * k;
        const a = phase[i] - t;
        const b = phase[i + 1] - t;
        if (a === 0 || a * b < 0) {
          const f = a === 0 ? 0 : a / (a - b);
          out.push({ g: lnMag[i] + f * (lnMag[i + 1] - lnMag[i]) + 0.5 * Math.log(nn), lnW: lnW[i] + f * (lnW[i + 1] - lnW[i]), rising: phase[i + 1] > phase[i] });
        }
      }
    }
    return out;
  };
  /** The meeting point of `ms` on the branch of `near` (the same direction, nearest in frequency). */
  const onBranch = (ms: Meet[], near: Meet): Meet | null => {
    let best: Meet | null = null;
    for (const m of ms) if (m.rising === near.rising && (best === null || Math.abs(m.lnW - near.lnW) < Math.abs(best.lnW - near.lnW))) best = m;
    return best;
  };
  const found: LimitCycle[] = [];
  let prevLnA = NaN;
  let prev: Meet[] = [];
  for (const lnA of lnAs) {
    const here = meetings(lnA);
    for (const m of here) {
      const before = onBranch(prev, m);
      if (before === null || before.g * m.g > 0) continue;
      // Stable in amplitude: g falls with A where L's phase falls with ω, rises where it rises.
      if (m.rising ? !(m.g > before.g) : !(m.g < before.g)) continue;
      // Bisection on ln A between the grid points where the mismatch changes sign.
      let lo = prevLnA;
      let hi = lnA;
      let gLo = before.g;
      let best = m;
      for (let it = 0; it < 30; it++) {
        const mid = 0.5 * (lo + hi);
        const mm = onBranch(meetings(mid), best);
        if (mm === null) break;
        best = mm;
        if (gLo * mm.g <= 0) hi = mid;
        else {
          lo = mid;
          gLo = mm.g;
        }
      }
      const a = Math.exp(0.5 * (lo + hi));
      const w = Math.exp(best.lnW);
      const nv = describingFunction(make, a);
      // The measurement's first harmonic: the stem's (A |N|) through the loop path G = L/C (the
      // whole-sample delay has unit magnitude).
      path.evaluate(w, tmp);
      const outputAmplitude = a * Math.hypot(nv.re, nv.im) * Math.hypot(tmp[0], tmp[1]);
      found.push({ amplitude: a, frequency: w, period: (2 * Math.PI) / w, outputAmplitude });
    }
    prevLnA = lnA;
    prev = here;
  }
  if (found.length === 0) return null;
  return found.reduce((best, c) => (c.amplitude > best.amplitude ? c : best));
}


/**
 * Local slope d(plant input)/d(travel) of the actuator's valve characteristic at `travel` (1 for a
 * linear one), by a central difference on the engine's own law (sim's valveInput).
 */
export function characteristicSlope(spec: ActuatorSpec, travel: number): number {
  if ((spec.characteristic ?? 'linear') === 'linear' || !Number.isFinite(spec.max - spec.min)) return 1;
  const d = 1e-6 * (spec.max - spec.min);
  const lo = Math.max(spec.min, travel - d);
  const hi = Math.min(spec.max, travel + d);
  return (valveInput(spec, hi) - valveInput(spec, lo)) / (hi - lo);
}

/**
 * The stick-slip cycle of a self-regulating loop under integral action, from the balance of one
 * stuck stretch (our derivation, no published source; checked against the engine in
 * test/analysis/stiction-cycle.test.ts). While the stem sticks, the measurement settles and the
 * integral ramps the controller output at kc·e/ti; the stem slips when the output has crossed the
 * stick band S = static + dynamic from where the last slip left it, and each slip moves it by the
 * slip jump J = static − dynamic, alternately up and down round the steady travel (x* ± J/2, so
 * the settled error is ±K·J/2 with K the static gain from travel to measurement). Over a half
 * period the output must cross S: kc·K·J of it comes from the proportional term as the measurement
 * moves by K·J, the rest, S − kc·K·J, from the integral of the error, which after a slip reaches
 * its settled value K·J/2 only after the loop's mean residence time T_ar (the integral falls
 * 2·T_ar·K·J/2 short). Hence the half period (S − kc·K·J)·2ti/(kc·K·J) + 2·T_ar, the measurement
 * swing ±K·J/2, the output swing ±(S/2 + kc·K·J·θ/(2ti)) (the integral keeps ramping over the
 * dead time θ before the slip shows). T_ar = −G′(0)/G(0) of the model (C A⁻²B/G(0)) plus its
 * delay, the sensor's delay and filter time and h/2 for the hold.
 *
 * Valid when the stem rests long enough for the measurement to settle: the stuck stretch beyond
 * the transient at least T_ar, J > 0 (backlash alone has no slip jump: no such cycle), and
 * kc·K·J < S (a larger proportional kick slips the stem straight back: no stuck stretch). Null
 * otherwise, and for a model without a finite static gain (an integrating plant).
 */
export function stickSlipCycle(model: LinearModel, band: { static: number; dynamic: number }, loop: Omit<CycleLoop, 'plant'>): LimitCycle | null {
  const n = model.nx;
  const jump = band.static - band.dynamic;
  const stickBand = band.static + band.dynamic;
  if (!(jump > 0) || !Number.isFinite(loop.gains.ti) || !(loop.gains.ti > 0)) return null;
  // −A⁻¹B and A⁻²B: G(0) = D − C A⁻¹ B, −G′(0) = C A⁻² B.
  const negA = Float64Array.from(model.a, (v) => -v);
  const v1 = n > 0 ? solve(negA, n, model.b) : new Float64Array(0);
  const v2 = v1 !== null && n > 0 ? solve(negA, n, v1) : new Float64Array(0);
  if (v1 === null || v2 === null) return null;
  let gain = model.d;
  let moment = 0;
  for (let i = 0; i < n; i++) {
    gain += model.c[i] * v1[i];
    moment += model.c[i] * v2[i];
  }
  const h = loop.sampleTime > 0 ? loop.sampleTime : 0;
  const dead = model.delay + loop.sensor.delay + h / 2;
  const residence = moment / gain + dead + loop.sensor.filterTime;
  const kick = loop.gains.kc * gain * jump;
  if (!(kick > 0) || !(kick < stickBand) || !(residence >= 0)) return null;
  const stuck = (2 * loop.gains.ti * (stickBand - kick)) / kick;
  if (!(stuck >= residence)) return null;
  const period = 2 * stuck + 4 * residence;
  return {
    amplitude: stickBand / 2 + (kick * dead) / (2 * loop.gains.ti),
    period,
    frequency: (2 * Math.PI) / period,
    outputAmplitude: (Math.abs(gain) * jump) / 2,
  };
}

/** The predicted cycle of a sticky valve and the method that gave it. */
export interface ValveCycle {
  cycle: LimitCycle;
  method: 'stick_slip_balance' | 'describing_function';
}

/**
 * THE prediction of the cycle a stiction/backlash band sustains at an operating point (`model` the
 * point's linear model through the valve, `loop.plant` its frequency response): the stick-slip
 * balance where its assumptions hold (within 4 % of the settled simulated cycle on the test cases),
 * else the describing function (12–20 % there, and it covers integrating plants and cycles without
 * a stuck stretch). Null when neither predicts one.
 */
export function valveCycle(model: LinearModel, band: { static: number; dynamic: number }, loop: CycleLoop): ValveCycle | null {
  const balanced = stickSlipCycle(model, band, loop);
  if (balanced !== null) return { cycle: balanced, method: 'stick_slip_balance' };
  const df = predictLimitCycle(stictionElement(band), (band.static + band.dynamic) / 2, loop);
  return df === null ? null : { cycle: df, method: 'describing_function' };
}
