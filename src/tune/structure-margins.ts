/**
 * Robustness figures of a structured loop from its linearisation: Ms = max |1/(1 + L)|, gain and
 * phase margins, with the loop broken at the actuator (the one point every structure shares).
 *
 * - PID-type structures (plain, 2-DOF weights, feedforward, the schedule at its starting gains):
 *   the feedback loop is the PID loop (setpoint weights and feedforward are outside it), so the
 *   analysis/ margins of that gain set are used as they are (with their closed-loop check).
 * - Smith predictor: the PID with the predictor is, seen from y to u, the controller
 *   C' = C/(1 + C M (1 − z^(−D))), M(z) = bm/(z − a) the internal model and z^(−D) its dead time
 *   as the predictor runs them (control's `smithCoefficients`, with the mis-specification
 *   factors); L = C' · G.
 * - Cascade: with both loops closed at the actuator, L = C_i (G_m + C_o G),
 *   G_m the inner path (true measurement, sampled as the engine reads it), G the controlled
 *   output's path through the sensor.
 * All of it is the sampled loop of analysis/ (loop-path.ts: G, exact ZOH plant, delays and the
 * simulated sensor filter; pid-law-response.ts: C of control/pid.ts's discrete law) at
 * z = e^(jωh) up to the Nyquist frequency. For these two structures the margins are read on the
 * grid (crossings by linear interpolation between grid points) and the closed-loop stability is
 * not checked here (null: the trial shows it).
 */
import { effectiveMs, loopPath, pidLawResponse, sampledEvaluator } from '../analysis/index.js';
import type { LawResponse, Margins } from '../analysis/index.js';
import { applyStructure, smithCoefficients } from '../control/index.js';
import { delayInSteps } from '../sim/index.js';
import type { ControllerSpec } from '../model/types.js';
import { gainMargins } from './gain-margins.js';
import { pathModel } from './path-models.js';
import { startState } from './structure-tuning.js';
import type { TuningContext } from './tuning-context.js';

/** The margins of one structure; `loop` says which loop they belong to. */
export interface StructureMargins {
  maxSensitivity: number;
  gainMargin: number;
  phaseMarginDeg: number;
  crossoverFrequency: number;
  /** true/false from analysis' closed-loop check (PID-type loops), null when not checked. */
  closedLoopStable: boolean | null;
  loop: 'pid' | 'actuator';
  notes: string[];
  /** The full analysis figures for PID-type loops. */
  margins: Margins | null;
}

/** Gain/phase margins and Ms of a loop given on a grid (complex L). */
export function gridMargins(w: Float64Array, re: Float64Array, im: Float64Array, n: number): Omit<StructureMargins, 'closedLoopStable' | 'loop' | 'notes' | 'margins'> {
  let ms = 0;
  let gm = Infinity;
  let pm = Infinity;
  let wc = NaN;
  for (let i = 0; i < n; i++) {
    const s = 1 / Math.hypot(1 + re[i], im[i]);
    if (s > ms) ms = s;
    if (i === 0) continue;
    const m0 = Math.hypot(re[i - 1], im[i - 1]);
    const m1 = Math.hypot(re[i], im[i]);
    if ((m0 - 1) * (m1 - 1) < 0) {
      const f = (1 - m0) / (m1 - m0);
      const xr = re[i - 1] + f * (re[i] - re[i - 1]);
      const xi = im[i - 1] + f * (im[i] - im[i - 1]);
      let p = (Math.atan2(xi, xr) * 180) / Math.PI + 180;
      if (p > 180) p -= 360;
      if (p < pm) {
        pm = p;
        wc = w[i - 1] + f * (w[i] - w[i - 1]);
      }
    }
    if (im[i - 1] * im[i] < 0) {
      const f = im[i - 1] / (im[i - 1] - im[i]);
      const xr = re[i - 1] + f * (re[i] - re[i - 1]);
      if (xr < 0 && -xr < 1) gm = Math.min(gm, -1 / xr);
    }
  }
  return { maxSensitivity: ms, gainMargin: gm, phaseMarginDeg: pm, crossoverFrequency: wc };
}

/** Margins of a resolved controller spec on the loop of `ctx`; null without a linear model. */
export function structureMargins(ctx: TuningContext, spec: ControllerSpec): StructureMargins | null {
  const ext = spec.extension;
  const g = applyStructure(spec.structure, spec.gains);
  if (ext === undefined || ext.kind === 'feedforward' || ext.kind === 'scheduled') {
    const m = gainMargins(ctx, g);
    if (m === null) return null;
    const notes = ext?.kind === 'scheduled' ? ['schedule: margins at the gains in force at the start'] : [];
    return {
      maxSensitivity: effectiveMs(m),
      gainMargin: m.gainMargin,
      phaseMarginDeg: m.phaseMarginDeg,
      crossoverFrequency: m.crossoverFrequency,
      closedLoopStable: m.closedLoopStable,
      loop: 'pid',
      notes,
      margins: m,
    };
  }
  const resp = ctx.response;
  if (resp === null) return null;
  const spec0 = ctx.spec;
  const h = spec0.loop.sampleTime;
  // The loop as the engine runs it: sampled plant path and sensor, the laws' own discretisations.
  const path = loopPath(resp, h, spec0.sensor);
  const w = path.w;
  const n = w.length;
  const lre = new Float64Array(n);
  const lim = new Float64Array(n);
  const cw = new Float64Array(2);
  const notes: string[] = [];
  const outer = pidLawResponse(g, h);
  let inner: LawResponse | null = null;
  let gmEval: ((w: number, out: Float64Array) => void) | null = null;
  let gmDelay = 0;
  let smith: ReturnType<typeof smithCoefficients> | null = null;
  if (ext.kind === 'cascade') {
    if (ext.inner === null) throw new RangeError('structureMargins: resolve the cascade first');
    const gm = pathModel(ctx.dynamics, startState(ctx), { kind: 'input' }, { kind: 'measurement', name: ext.innerMeasurement });
    if (typeof gm === 'string') return null;
    // The inner measurement is read as it is at t_k (no sensor): its own sampled path.
    const q = delayInSteps(gm.delay, h);
    gmEval = sampledEvaluator(gm, h, q - Math.floor(q), 0);
    gmDelay = Math.floor(q) * h;
    inner = pidLawResponse(ext.inner, h);
  } else {
    if (ext.gain === null || ext.timeConstant === null || ext.delay === null) throw new RangeError('structureMargins: resolve the Smith predictor first');
    smith = smithCoefficients(
      { gain: ext.gain * ext.gainFactor, timeConstant: ext.timeConstant * ext.timeConstantFactor, delay: ext.delay * ext.delayFactor },
      h,
    );
  }
  const tmp = new Float64Array(2);
  for (let i = 0; i < n; i++) {
    const wi = w[i];
    const th = wi * h;
    // Plant path to the measurement, with its whole-sample delay.
    const pPh = path.phase[i] - wi * path.delay;
    const gyr = path.mag[i] * Math.cos(pPh);
    const gyi = path.mag[i] * Math.sin(pPh);
    outer(wi, cw);
    if (smith !== null) {
      // M(z) = bm/(z − a); delay (1 − f) z^−m + f z^−(m+1); C' = C/(1 + C M (1 − delay)).
      const zr = Math.cos(th);
      const zi = Math.sin(th);
      const md = (zr - smith.a) * (zr - smith.a) + zi * zi;
      const mr = (smith.bm * (zr - smith.a)) / md;
      const mi = (-smith.bm * zi) / md;
      const m0 = smith.whole * th;
      const er = 1 - (1 - smith.fraction) * Math.cos(m0) - smith.fraction * Math.cos(m0 + th);
      const ei = (1 - smith.fraction) * Math.sin(m0) + smith.fraction * Math.sin(m0 + th);
      const qr1 = mr * er - mi * ei;
      const qi1 = mr * ei + mi * er;
      const qr = cw[0] * qr1 - cw[1] * qi1;
      const qi = cw[0] * qi1 + cw[1] * qr1;
      const dr = 1 + qr;
      const di = qi;
      const dd = dr * dr + di * di;
      const cr = (cw[0] * dr + cw[1] * di) / dd;
      const ci = (cw[1] * dr - cw[0] * di) / dd;
      lre[i] = cr * gyr - ci * gyi;
      lim[i] = cr * gyi + ci * gyr;
    } else {
      // Cascade broken at the actuator: Ci (Gm + Co Gy).
      gmEval!(wi, tmp);
      const dph = -wi * gmDelay;
      const gmr = tmp[0] * Math.cos(dph) - tmp[1] * Math.sin(dph);
      const gmi = tmp[0] * Math.sin(dph) + tmp[1] * Math.cos(dph);
      const sr = gmr + (cw[0] * gyr - cw[1] * gyi);
      const si = gmi + (cw[0] * gyi + cw[1] * gyr);
      inner!(wi, cw);
      lre[i] = cw[0] * sr - cw[1] * si;
      lim[i] = cw[0] * si + cw[1] * sr;
    }
  }
  const figs = gridMargins(w, lre, lim, n);
  notes.push(
    ext.kind === 'smith_pi'
      ? 'Smith predictor: loop broken at the actuator with the predictor inside the controller; closed-loop stability not checked from the model'
      : 'cascade: loop broken at the actuator with both loops closed; closed-loop stability not checked from the model',
  );
  return { ...figs, closedLoopStable: null, loop: 'actuator', notes, margins: null };
}
