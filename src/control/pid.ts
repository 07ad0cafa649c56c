/**
 * The PID law, discrete time, positional form, in the ideal (ISA) parameterisation:
 *
 *   u = kc · ( b·r − y  +  (1/ti)∫(r − y)dt  +  td·d/dt (c·r − y) filtered by 1/(1 + s·td/n) )
 *
 * Discretisation at the sample time h (Åström & Hägglund, PID Controllers: Theory, Design and
 * Tuning, 2nd ed. 1995, ch. 3.7; Åström & Wittenmark, Computer-Controlled Systems, 3rd ed. 1997,
 * ch. 8 — both from memory; coefficients restated in published-checks.md section 14):
 *
 * - Proportional: P_k = kc (b r_k − y_k).
 * - Derivative: backward difference with filter, D_k = ad D_{k−1} + bd (w_k − w_{k−1}),
 *   w = c r − y, ad = td/(td + n h), bd = kc n ad. Chosen because 0 <= ad < 1 for every h:
 *   the filter is stable and never rings, where the Tustin version turns oscillatory
 *   (ad < 0) as soon as h > 2 td/n.
 * - Integral: forward Euler, I_{k+1} = I_k + (kc h/ti) e_k, updated AFTER the output is known.
 *   The output at k then does not depend on the integral's own update at k, and the update can
 *   use the saturated output the actuator actually delivered — exactly what the anti-windup
 *   schemes need (the same ordering as the textbooks' controller code).
 * - Output: v = P + I + D, limited to [outputMin, outputMax].
 *
 * Anti-windup ('none' | 'clamp' | 'back_calculation'), in `track(uApplied)`:
 * - clamp = conditional integration: skip the integral update while the output is limited
 *   (uApplied ≠ v) and the error would drive it further into the limit;
 * - back_calculation: I_{k+1} = I_k + (kc h/ti) e_k + (h/tt)(uApplied − v_k), tracking time tt
 *   (default sqrt(ti·td) for PID, ti/2 for PI; Åström & Hägglund 1995 ch. 3.5, from memory).
 *
 * Bumpless transfer is done by INTEGRAL STATE ADJUSTMENT:
 * - initialize(r, y, u0) sets I = u0 − P(r, y) and clears the derivative, so the next output
 *   at the same (r, y) is exactly u0 (manual → auto, start of a run);
 * - setGains(g) is applied at the next update: that update computes the output the OLD gains
 *   would have given at this sample and sets I so that the new gains give the same value.
 *   The output is therefore continuous at the switch to rounding, with any structure change.
 * Why not the velocity (incremental) form, which is bumpless by construction: it cannot hold a
 * P or PD controller's operating point (no integral state to carry the bias), its setpoint
 * weighting acts only on changes, and the explicit integral state is what the anti-windup
 * schemes and tests inspect. With ti = Infinity the integral term is a constant bias
 * ("manual reset"), which initialize() sets.
 *
 * update() allocates nothing: all state is numeric fields.
 */
import type { AntiWindup, GainSet } from '../model/types.js';
import { compileElementLaw, pidInitLaw, pidTrackLaw, pidUpdateLaw, type DiscreteController, type PidLaw, type PidNames } from '../sim/index.js';

/** Options of a PID controller besides its gains. */
export interface PidOptions {
  /** Controller sample time h, s. */
  sampleTime: number;
  /** Output limits (default −Infinity, Infinity). */
  outputMin?: number;
  outputMax?: number;
}

const AW_NONE = 0;
const AW_CLAMP = 1;
const AW_BACK = 2;

function awCode(a: AntiWindup): number {
  if (a === 'none') return AW_NONE;
  if (a === 'clamp') return AW_CLAMP;
  if (a === 'back_calculation') return AW_BACK;
  throw new RangeError(`unknown anti-windup ${String(a)}`);
}

/**
 * The law itself is sim's element-laws.ts text (also generated inline by the batch runner, so the
 * two stay bit-identical), compiled here over this class's fields. The bumpless gain change
 * (integral state adjustment, see above) is this class's own addition to the update.
 */
const FIELDS: PidNames = {
  kc: 's.kc',
  b: 's.b',
  c: 's.c',
  bi: 's.bi',
  ad: 's.ad',
  bd: 's.bd',
  ar: 's.ar',
  omin: 's.outputMin',
  omax: 's.outputMax',
  I: 's.i',
  D: 's.d',
  rPrev: 's.rPrev',
  yPrev: 's.yPrev',
  e: 's.e',
  v: 's.v',
};
const RETUNE =
  'if (s.retune) { const pOld = s.kcOld * (s.bOld * r - y); ' +
  'const dOld = s.adOld * s.d + s.bdOld * (s.cOld * r - y - (s.cOld * s.rPrev - s.yPrev)); ' +
  'const vOld = pOld + s.i + dOld; dn = s.bd !== 0 ? dOld : 0; s.i = vOld - pp - dn; s.retune = false; }';
const INIT = compileElementLaw<(s: PidController, r: number, y: number, u0: number) => void>(['s', 'r', 'y', 'u0'], pidInitLaw(FIELDS, 'r', 'y', 'u0'));
const UPDATE = compileElementLaw<(s: PidController, r: number, y: number) => number>(['s', 'r', 'y'], `${pidUpdateLaw(FIELDS, 'r', 'y', RETUNE)}\nreturn uc;`);
const TRACK = (['none', 'clamp', 'back_calculation'] as const).map((aw) =>
  compileElementLaw<(s: PidController, ua: number) => void>(['s', 'ua'], pidTrackLaw(FIELDS, aw, 'ua')),
);

/** Check a gain set; throws RangeError. */
export function checkGains(g: GainSet): void {
  if (!Number.isFinite(g.kc)) throw new RangeError(`kc must be finite, got ${g.kc}`);
  if (!(g.ti > 0)) throw new RangeError(`ti must be > 0 (Infinity = no integral), got ${g.ti}`);
  if (!(g.td >= 0) || !Number.isFinite(g.td)) throw new RangeError(`td must be finite and >= 0, got ${g.td}`);
  if (!(g.n > 0)) throw new RangeError(`derivative filter n must be > 0, got ${g.n}`);
  if (!Number.isFinite(g.b) || !Number.isFinite(g.c)) throw new RangeError('setpoint weights must be finite');
  if (!(Number.isNaN(g.trackingTime) || g.trackingTime > 0)) throw new RangeError('tracking time must be > 0 or NaN');
  awCode(g.antiWindup);
}

/** Tracking time used for back-calculation: given, else sqrt(ti td) (PID) or ti/2 (PI). */
export function defaultTrackingTime(g: GainSet): number {
  if (!Number.isNaN(g.trackingTime)) return g.trackingTime;
  return g.td > 0 && g.ti !== Infinity ? Math.sqrt(g.ti * g.td) : g.ti / 2;
}

/** The law's difference-equation coefficients at sample time h (see the file comment). */
export interface PidCoefficients {
  /** Integral increment per unit error, kc·h/ti (0 without integral action). */
  bi: number;
  /** Derivative filter pole td/(td + n·h), 0 <= ad < 1 (0 without filter or derivative). */
  ad: number;
  /** Derivative gain on the difference of c·r − y, kc·n·ad (kc·td/h without filter). */
  bd: number;
}

/**
 * The coefficients the law runs with: the one definition of the discretisation, used by the
 * controller itself and by anything that must describe the loop as it runs (the sampled-loop
 * margins in analysis/).
 */
export function pidCoefficients(g: GainSet, h: number): PidCoefficients {
  const bi = g.ti === Infinity ? 0 : (g.kc * h) / g.ti;
  if (!(g.td > 0)) return { bi, ad: 0, bd: 0 };
  if (g.n === Infinity) return { bi, ad: 0, bd: (g.kc * g.td) / h };
  const ad = g.td / (g.td + g.n * h);
  return { bi, ad, bd: g.kc * g.n * ad };
}

/** Discrete PID law in ideal form; see the file comment for the discretisation. */
export class PidController implements DiscreteController {
  readonly sampleTime: number;
  readonly outputMin: number;
  readonly outputMax: number;

  // Gains and coefficients (current).
  private kc = 0;
  private b = 1;
  private c = 0;
  private bi = 0;
  private ad = 0;
  private bd = 0;
  private ar = 0;
  private aw = AW_NONE;
  /** The integral update of the anti-windup in force (sim's element-laws.ts `pidTrackLaw`). */
  private trackLaw: (s: PidController, ua: number) => void = TRACK[AW_NONE];
  private gainsNow: GainSet;

  // Coefficients in force before a pending gain change.
  private retune = false;
  private kcOld = 0;
  private bOld = 1;
  private cOld = 0;
  private adOld = 0;
  private bdOld = 0;

  // State.
  private i = 0;
  private d = 0;
  private rPrev = 0;
  private yPrev = 0;
  private e = 0;
  private v = 0;
  private pending = false;

  constructor(gains: GainSet, options: PidOptions) {
    const h = options.sampleTime;
    if (!(h > 0) || !Number.isFinite(h)) throw new RangeError('sampleTime must be positive and finite');
    this.sampleTime = h;
    this.outputMin = options.outputMin ?? -Infinity;
    this.outputMax = options.outputMax ?? Infinity;
    if (!(this.outputMin <= this.outputMax)) throw new RangeError('outputMin must not exceed outputMax');
    checkGains(gains);
    this.gainsNow = { ...gains };
    this.load(gains);
  }

  /** The gain set in force (a copy). */
  get gains(): GainSet {
    return { ...this.gainsNow };
  }

  /** Integral term I (output units), for inspection. */
  get integral(): number {
    return this.i;
  }

  /** Derivative term D (output units), for inspection. */
  get derivative(): number {
    return this.d;
  }

  /** The unlimited output v = P + I + D of the last update. */
  get lastRequest(): number {
    return this.v;
  }

  /**
   * The coefficients in force, for engines that generate this law inline (sim's batch runner).
   * A subclass may change the law, so it gets null (and is then run as an object).
   */
  pidLaw(): PidLaw | null {
    if (Object.getPrototypeOf(this) !== PidController.prototype) return null;
    return {
      sampleTime: this.sampleTime,
      kc: this.kc,
      b: this.b,
      c: this.c,
      bi: this.bi,
      ad: this.ad,
      bd: this.bd,
      ar: this.ar,
      antiWindup: this.gainsNow.antiWindup,
      outputMin: this.outputMin,
      outputMax: this.outputMax,
    };
  }

  private load(g: GainSet): void {
    const h = this.sampleTime;
    const q = pidCoefficients(g, h);
    this.kc = g.kc;
    this.b = g.b;
    this.c = g.c;
    this.bi = q.bi;
    this.ad = q.ad;
    this.bd = q.bd;
    this.aw = awCode(g.antiWindup);
    this.trackLaw = TRACK[this.aw];
    this.ar = g.ti === Infinity ? 0 : h / defaultTrackingTime(g);
  }

  private limit(v: number): number {
    return v < this.outputMin ? this.outputMin : v > this.outputMax ? this.outputMax : v;
  }

  initialize(r: number, y: number, u0: number): void {
    INIT(this, r, y, u0);
    this.pending = false;
    this.retune = false;
  }

  update(r: number, y: number): number {
    // The previous sample's integral update is still owed if track() was not called.
    if (this.pending) this.integrate(this.limit(this.v));
    const uc = UPDATE(this, r, y);
    this.pending = true;
    return uc;
  }

  track(uApplied: number): void {
    if (!this.pending) return;
    this.integrate(uApplied);
  }

  private integrate(ua: number): void {
    this.pending = false;
    this.trackLaw(this, ua);
  }

  setGains(g: GainSet): void {
    checkGains(g);
    this.beginRetune();
    this.gainsNow = { ...g };
    this.load(g);
  }

  /**
   * Change only kc, ti and td (every other setting kept), bumplessly as `setGains` does, without
   * allocating: for laws that move the gains every sample (a gain schedule).
   */
  setTerms(kc: number, ti: number, td: number): void {
    const g = this.gainsNow;
    if (!Number.isFinite(kc)) throw new RangeError(`kc must be finite, got ${kc}`);
    if (!(ti > 0)) throw new RangeError(`ti must be > 0 (Infinity = no integral), got ${ti}`);
    if (!(td >= 0) || !Number.isFinite(td)) throw new RangeError(`td must be finite and >= 0, got ${td}`);
    if (kc === g.kc && ti === g.ti && td === g.td) return;
    this.beginRetune();
    g.kc = kc;
    g.ti = ti;
    g.td = td;
    this.load(g);
  }

  private beginRetune(): void {
    if (this.pending) this.integrate(this.limit(this.v));
    if (!this.retune) {
      // Keep the coefficients that produced the last output, even if gains change twice.
      this.kcOld = this.kc;
      this.bOld = this.b;
      this.cOld = this.c;
      this.adOld = this.ad;
      this.bdOld = this.bd;
      this.retune = true;
    }
  }
}
