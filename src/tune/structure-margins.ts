/**
 * Robustness figures of a structured loop from its linearisation: Ms = max |1/(1 + L)|, gain and
 * phase margins, with the loop broken at the actuator (the one point every structure shares).
 *
 * - PID-type structures (plain, 2-DOF weights, feedforward, the schedule at its starting gains):
 *   the feedback loop is the PID loop (setpoint weights and feedforward are outside it), so the
 *   analysis/ margins of that gain set are used as they are (with their closed-loop check).
 * - Smith predictor: the PID with the predictor is, seen from y to u, the controller
 *   C' = C/(1 + C M (1 − e^(−jωL_m))), M = k_m/(τ_m jω + 1) the internal model (with its
 *   mis-specification factors); L = C' · P · hold · sensor.
 * - Cascade: with both loops closed at the actuator, L = hold · C_i (G_m + C_o G_y · sensor),
 *   G_m the inner path (true measurement), G_y the controlled output's path.
 * The loop model otherwise follows analysis/freq-response.ts: continuous laws, the sample-hold as
 * e^(−jωh/2) sin(ωh/2)/(ωh/2), the grid up to the Nyquist frequency. For these two structures the
 * margins are read on the grid (crossings by linear interpolation between grid points) and the
 * closed-loop stability is not checked here (null: the trial shows it).
 */
import { controllerResponse, effectiveMs, rationalEvaluator } from '../analysis/index.js';
import type { Margins } from '../analysis/index.js';
import { applyStructure } from '../control/index.js';
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
  const nyq = Math.PI / h;
  const w = resp.w;
  let n = w.length;
  while (n > 2 && w[n - 1] > nyq) n--;
  const lre = new Float64Array(n);
  const lim = new Float64Array(n);
  const cw = new Float64Array(2);
  const sensorDelay = spec0.sensor.delay;
  const tf = spec0.sensor.filterTime;
  const notes: string[] = [];
  let gmEval: ((w: number, out: Float64Array) => void) | null = null;
  let gmDelay = 0;
  let cInner: ControllerSpec['gains'] | null = null;
  if (ext.kind === 'cascade') {
    if (ext.inner === null) throw new RangeError('structureMargins: resolve the cascade first');
    const gm = pathModel(ctx.dynamics, startState(ctx), { kind: 'input' }, { kind: 'measurement', name: ext.innerMeasurement });
    if (typeof gm === 'string') return null;
    gmEval = rationalEvaluator(gm);
    gmDelay = gm.delay;
    cInner = ext.inner;
  }
  const tmp = new Float64Array(2);
  for (let i = 0; i < n; i++) {
    const wi = w[i];
    // Hold: e^(−jωh/2) sinc(ωh/2); sensor: e^(−jωLs)/(1 + jω Tf).
    const x = 0.5 * wi * h;
    const hold = x > 0 ? Math.sin(x) / x : 1;
    const holdPh = -x;
    const sensMag = tf > 0 ? 1 / Math.sqrt(1 + wi * tf * (wi * tf)) : 1;
    const sensPh = -wi * sensorDelay - (tf > 0 ? Math.atan(wi * tf) : 0);
    // Plant path to y, with its delay.
    const pMag = Math.hypot(resp.re[i], resp.im[i]);
    const pPh = Math.atan2(resp.im[i], resp.re[i]) - wi * resp.delay;
    if (ext.kind === 'smith_pi') {
      if (ext.gain === null || ext.timeConstant === null || ext.delay === null) throw new RangeError('structureMargins: resolve the Smith predictor first');
      controllerResponse(g, wi, cw);
      const km = ext.gain * ext.gainFactor;
      const tm = ext.timeConstant * ext.timeConstantFactor;
      const lm = ext.delay * ext.delayFactor;
      // M = km/(1 + jω tm); (1 − e^(−jω lm))
      const md = 1 + wi * tm * (wi * tm);
      const mr = km / md;
      const mi = (-km * wi * tm) / md;
      const er = 1 - Math.cos(wi * lm);
      const ei = Math.sin(wi * lm);
      // q = C M (1 − e): complex products
      const qr1 = mr * er - mi * ei;
      const qi1 = mr * ei + mi * er;
      const qr = cw[0] * qr1 - cw[1] * qi1;
      const qi = cw[0] * qi1 + cw[1] * qr1;
      // C' = C/(1 + q)
      const dr = 1 + qr;
      const di = qi;
      const dd = dr * dr + di * di;
      const cr = (cw[0] * dr + cw[1] * di) / dd;
      const ci = (cw[1] * dr - cw[0] * di) / dd;
      const mag = Math.hypot(cr, ci) * pMag * hold * sensMag;
      const ph = Math.atan2(ci, cr) + pPh + holdPh + sensPh;
      lre[i] = mag * Math.cos(ph);
      lim[i] = mag * Math.sin(ph);
    } else {
      // Cascade at the actuator: hold · Ci (Gm + Co Gy sensor).
      gmEval!(wi, tmp);
      const gmr0 = tmp[0];
      const gmi0 = tmp[1];
      const dph = -wi * gmDelay;
      const gmr = gmr0 * Math.cos(dph) - gmi0 * Math.sin(dph);
      const gmi = gmr0 * Math.sin(dph) + gmi0 * Math.cos(dph);
      controllerResponse(g, wi, cw);
      const gyMag = pMag * sensMag;
      const gyPh = pPh + sensPh;
      const gyr = gyMag * Math.cos(gyPh);
      const gyi = gyMag * Math.sin(gyPh);
      const sr = gmr + (cw[0] * gyr - cw[1] * gyi);
      const si = gmi + (cw[0] * gyi + cw[1] * gyr);
      controllerResponse(cInner!, wi, cw);
      const lr0 = cw[0] * sr - cw[1] * si;
      const li0 = cw[0] * si + cw[1] * sr;
      lre[i] = hold * (lr0 * Math.cos(holdPh) - li0 * Math.sin(holdPh));
      lim[i] = hold * (lr0 * Math.sin(holdPh) + li0 * Math.cos(holdPh));
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
