/**
 * The per-sample laws of the loop elements around the plant, written ONCE as JavaScript source
 * over named variables. The one-loop engine's `Actuator` and `Sensor` run functions compiled from
 * this text (generate-stepper.ts `compileElementLaw`), and the batch generator (batch-stepper.ts)
 * writes the same text inline for every copy, so both execute the same operations in the same
 * order and a batched run stays bit-identical to `runTrial`. A new element (stiction, backlash,
 * a valve characteristic) is added here once.
 *
 * Pure text, no user input: every name below is ours; numbers arrive as variables.
 */

/**
 * Actuator command for one sample of length `ts`: position limits, then the rate-limit ramp WITHIN
 * the sample (actuator.ts explains the model). Reads `uc` (command), `amin`, `amax`, `rate`, `ts`,
 * `end` (the position reached by the last sample); writes `start`, `end`, `sat` (at a limit, of
 * position or rate), `rampTime` (time into the sample at which the ramp arrives, 0 = no ramp) and
 * `rampSign`. Declares `tg` (the limited target).
 */
export function actuatorCommandLaw(rateLimited: boolean): string {
  return [
    'start = end;',
    'const tg = uc < amin ? amin : uc > amax ? amax : uc;',
    // At a limit counts as saturated even when the controller already clamped its own request to
    // the same limits (it usually does), otherwise position saturation would never show.
    'sat = uc <= amin || uc >= amax;',
    'rampTime = 0; rampSign = 0;',
    rateLimited
      ? 'if (tg === start) end = tg; else { const $df = tg - start; const $tr = Math.abs($df) / rate; rampSign = $df > 0 ? 1 : -1; ' +
        'if ($tr >= ts) { rampTime = ts; end = start + rampSign * rate * ts; sat = true; } else { rampTime = $tr; end = tg; } }'
      : 'end = tg;',
    // A NaN command is passed through so that the loop diverges visibly instead of hiding it.
    'if (uc !== uc) end = uc;',
  ].join('\n');
}

/**
 * ∫₀^s position dτ along the sample's ramp-then-hold path, as an expression: `s` time into the
 * sample, `tr` ramp time, `st` start position, `sg` ramp sign, `rl` rate limit, `en` end position.
 * The mean plant input over an integration step is the difference of two of these over h.
 */
export function actuatorPathIntegral(s: string, tr: string, st: string, sg: string, rl: string, en: string): string {
  return `(${s} <= ${tr} ? ${st} * ${s} + 0.5 * ${sg} * ${rl} * ${s} * ${s} : ${st} * ${tr} + 0.5 * ${sg} * ${rl} * ${tr} * ${tr} + ${en} * (${s} - ${tr}))`;
}

/** Valve characteristic: installed flow fraction as a function of the fraction of travel. */
export type ValveCharacteristic = 'linear' | 'equal_percentage' | 'quick_opening';

/** Which valve elements sit between the limited command and the plant input. */
export interface ValveShape {
  /** Stiction or backlash band present (state `xs`, the stem position). */
  sticky: boolean;
  /** First-order positioner/actuator lag present (state `xv`). */
  lagged: boolean;
  characteristic: ValveCharacteristic;
}

/**
 * Stiction, the two-parameter data-driven model of He, Wang, Pottmann & Qin (Ind. Eng. Chem. Res.
 * 46 (2007) 4549–4560, from memory), on the limited command `end` once per controller sample:
 * residual u_r = end − xs; when |u_r| > `fs` (static band) the stem slips to end − sign(u_r)·`fd`
 * (dynamic band), else it stays. Backlash of width w is fs = fd = w/2. Reads `end`, `fs`, `fd`;
 * updates `xs` (the stem, held until the next sample). A NaN command passes (divergence shows).
 */
export function stictionLaw(): string {
  return 'if (end !== end) xs = end; else { const $ur = end - xs; if ($ur > fs) xs = end - fd; else if ($ur < -fs) xs = end + fd; }';
}

/**
 * Largest |w| for which `valveStepLaw` takes e^w from its Taylor polynomial of degree 6 instead of
 * Math.exp: the remainder w^7/7! is below 5e-17 relative there, so the polynomial agrees with
 * e^w to within one unit in the last place (test/sim/valve.test.ts: at most 1 ulp from Math.exp),
 * at about a sixth of Math.exp's cost. The polynomial is evaluated in Estrin's form,
 * (1 + w) + w²((1/2 + w/6) + w²((1/24 + w/120) + w²/720)), not Horner's: its chain of dependent
 * operations is half as long, and the batched sweep, whose steps wait on it, ran about 8 % faster
 * with the valve (it rounds differently from Horner's in about one case in five, within the ulp).
 */
export const EXP_SERIES_LIMIT = 1 / 64;

/**
 * The valve's plant input for the stem held over a sample, once per controller sample: the
 * characteristic on the fraction of travel f = (xs − amin)/aspan: linear f; equal percentage
 * R^(f−1) = e^(rgl·(f−1)), rgl = ln R; quick opening √f (Seborg, Edgar & Mellichamp, Process
 * Dynamics and Control, 2nd ed. 2004, sec. 9.2, from memory). Reads `xs`, `amin`, `aspan`, `rgl`;
 * writes `ui` (the plant input while the valve rests at the stem) and, for equal percentage, `cb`
 * = aspan·e^(rgl·(f−1)) (ui = amin + cb), from which `valveStepLaw` scales the steps in between.
 * Both are worked out again only when the stem has moved since (`xc`, the stem they belong to,
 * NaN at the start): a sticky stem rests for most samples.
 */
export function valveSampleLaw(shape: ValveShape): string {
  if (shape.characteristic === 'equal_percentage') return 'if (xs !== xc) { xc = xs; cb = aspan * Math.exp(rgl * ((xs - amin) / aspan - 1)); ui = amin + cb; }';
  if (shape.characteristic === 'quick_opening') return 'if (xs !== xc) { xc = xs; const $fq = (xs - amin) / aspan; ui = amin + aspan * Math.sqrt($fq < 0 ? 0 : $fq); }';
  return 'ui = xs;';
}

/**
 * True when the plant input changes within a sample, so that `valveStepLaw` must run per
 * integration step: a positioner lag, or a rate-limit ramp seen through a curved characteristic.
 * Otherwise the plant input is `ui` of `valveSampleLaw` (or the ramp's mean, linear valve).
 */
export function valvePerStep(shape: ValveShape, rateLimited: boolean): boolean {
  return shape.lagged || (rateLimited && shape.characteristic !== 'linear');
}

/**
 * One integration step of the valve after the stem: `u` (the stem or the actuator's ramp path,
 * held over the step) through the first-order lag (state `xv`; `la` = e^(−h/T), `lm` =
 * (T/h)(1 − la), so `u` becomes the exact mean of the lag output over the step), then the
 * characteristic of `valveSampleLaw`. Equal percentage is taken relative to the stem `xs`:
 * amin + cb·e^(rga·(u − xs)), rga = rgl/aspan, the same function as R^(f−1), and e^w from its
 * series when |w| ≤ EXP_SERIES_LIMIT (the lag's last stretch towards a held stem, most steps of
 * a stick-slip cycle). Reads/writes `u`; reads `xs`, `amin`, `aspan`, `cb`, `rga`, `la`, `lm`.
 */
export function valveStepLaw(shape: ValveShape): string {
  const a: string[] = [];
  if (shape.lagged) a.push('{ const $vi = u; u = $vi + (xv - $vi) * lm; xv = $vi + (xv - $vi) * la; }');
  if (shape.characteristic === 'equal_percentage') {
    a.push(
      `{ const $w = rga * (u - xs), $w2 = $w * $w; u = amin + cb * ($w >= -${EXP_SERIES_LIMIT} && $w <= ${EXP_SERIES_LIMIT} ? ` +
        '(1 + $w) + $w2 * ((0.5 + $w * (1 / 6)) + $w2 * ((1 / 24 + $w * (1 / 120)) + $w2 * (1 / 720))) : Math.exp($w)); }',
    );
  } else if (shape.characteristic === 'quick_opening') a.push('{ const $fq = (u - amin) / aspan; u = amin + aspan * Math.sqrt($fq < 0 ? 0 : $fq); }');
  return a.join('\n');
}

/** Which parts of the measurement chain are present. */
export interface SensorShape {
  filtered: boolean;
  noisy: boolean;
  quantised: boolean;
  /** Transmitter range present (`rlo`, `rhi`). */
  ranged: boolean;
}

/**
 * The measurement chain on `ym` (the delayed plant output on entry, the measurement on exit):
 * first-order-hold filter (sensor.ts gives the discretisation; state `z`, `wPrev`, pole `fa`,
 * slope `fslope`, settled at the first sample where `first` is true), additive noise
 * `noise * deviate` (one standard Gaussian deviate per sample), clip to the transmitter range
 * [`rlo`, `rhi`], quantisation to `res`.
 * @param first source of a boolean: this is the first measurement
 * @param deviate source of this sample's standard Gaussian deviate
 */
export function sensorLaw(shape: SensorShape, first: string, deviate: string): string {
  const a: string[] = [];
  if (shape.filtered) {
    a.push(`if (${first}) { z = ym; wPrev = ym; } else { z = fa * z + (1 - fa) * wPrev + (ym - wPrev) * fslope; wPrev = ym; }`, 'ym = z;');
  }
  if (shape.noisy) a.push(`ym += noise * ${deviate};`);
  // The transmitter's span: the reading clips at its ends (NaN passes so divergence shows).
  if (shape.ranged) a.push('if (ym < rlo) ym = rlo; else if (ym > rhi) ym = rhi;');
  if (shape.quantised) a.push('ym = res * Math.round(ym / res);');
  return a.join('\n');
}

/** The variable each quantity of the PID law is held in: locals in the batch, fields in PidController. */
export interface PidNames {
  kc: string;
  b: string;
  c: string;
  bi: string;
  ad: string;
  bd: string;
  ar: string;
  omin: string;
  omax: string;
  /** Integral term. */
  I: string;
  /** Filtered derivative term. */
  D: string;
  rPrev: string;
  yPrev: string;
  /** Error of the last update (for the integral update after it). */
  e: string;
  /** Unlimited output of the last update. */
  v: string;
}

/**
 * Bumpless start of the discrete PID law of control/pid.ts (which explains the discretisation):
 * the integral set so that the output at setpoint `r0` and measurement `y` is `u0`.
 */
export function pidInitLaw(n: PidNames, r0: string, y: string, u0: string): string {
  return `${n.I} = ${u0} - ${n.kc} * (${n.b} * ${r0} - ${y}); ${n.D} = 0; ${n.rPrev} = ${r0}; ${n.yPrev} = ${y}; ${n.e} = ${r0} - ${y}; ${n.v} = ${u0};`;
}

/**
 * One update of the PID law at setpoint `r`, measurement `y`: declares `pp` (proportional term),
 * `dn` (derivative term, which `adjust` may change: a bumpless gain change), `vv` (unlimited
 * output) and `uc` (output within [omin, omax]); stores D, e, v, rPrev, yPrev. The integral is
 * updated afterwards by `pidTrackLaw`.
 */
export function pidUpdateLaw(n: PidNames, r: string, y: string, adjust = ''): string {
  return [
    `const pp = ${n.kc} * (${n.b} * ${r} - ${y});`,
    `let dn = ${n.ad} * ${n.D} + ${n.bd} * (${n.c} * ${r} - ${y} - (${n.c} * ${n.rPrev} - ${n.yPrev}));`,
    adjust,
    `${n.D} = dn;`,
    `const vv = pp + ${n.I} + dn;`,
    `${n.e} = ${r} - ${y}; ${n.v} = vv; ${n.rPrev} = ${r}; ${n.yPrev} = ${y};`,
    `const uc = vv < ${n.omin} ? ${n.omin} : vv > ${n.omax} ? ${n.omax} : vv;`,
  ].join('\n');
}

/**
 * The integral update after the output `ua` the actuator delivered is known, with anti-windup:
 * none; clamp (conditional integration: hold while limited and the error pushes further in);
 * back-calculation (tracking gain `ar` = h / tracking time).
 */
export function pidTrackLaw(n: PidNames, antiWindup: 'none' | 'clamp' | 'back_calculation', ua: string): string {
  const inc = `const inc = ${n.bi} * ${n.e};`;
  if (antiWindup === 'none') return `${inc} ${n.I} += inc;`;
  if (antiWindup === 'clamp') return `${inc} if (!((${n.v} > ${ua} && inc > 0) || (${n.v} < ${ua} && inc < 0))) ${n.I} += inc;`;
  if (antiWindup === 'back_calculation') return `${inc} ${n.I} += inc + ${n.ar} * (${ua} - ${n.v});`;
  throw new RangeError(`unknown anti-windup ${String(antiWindup)}`);
}
