/**
 * From a rule's result to a gain set the loop runs (ideal form) and to the values written in the
 * plant file's controller form.
 */
import { fromIdeal, toIdeal } from '../model/index.js';
import type { ControllerSpec, GainSet, PidForm } from '../model/types.js';
import type { RuleGains } from './low-order.js';

/**
 * The rule's gains in the ideal form, with the file's other controller settings (derivative
 * filter, setpoint weights, anti-windup, tracking time) kept. SIMC's series result is converted:
 * Kc = Kc'(1 + Td'/Ti'), Ti = Ti' + Td', Td = Ti' Td'/(Ti' + Td') (reference sheet sections 3, 13).
 */
export function ruleGainSet(rule: RuleGains, base: GainSet): GainSet {
  // toIdeal range-checks the terms (RangeError when a formula overflowed), in either form.
  const ideal = toIdeal(rule.form, { kc: rule.kc, ti: rule.ti, td: rule.td });
  return { ...base, kc: ideal.kc, ti: ideal.ti, td: ideal.td };
}

/**
 * The gain set's values in the file's form (kc/ti/td or kp/ki/kd); null when the form is series
 * and the controller has complex zeros (ti < 4 td), which no series controller reproduces.
 */
export function valuesInForm(form: PidForm, g: GainSet): Record<string, number> | null {
  return fromIdeal(form, { kc: g.kc, ti: g.ti, td: g.td });
}

/**
 * A resolved structure (Smith predictor, feedforward, cascade, schedule around a PID law) running
 * feedback gains `g` in place of its own; everything else of the structure is kept. A schedule
 * keeps the shape of its table: every row's terms are scaled by the ratio of `g` to the gains in
 * force at the start (`frame.gains`), so searching those gains moves the whole table.
 */
export function frameWithGains(frame: ControllerSpec, g: GainSet, structure = frame.structure): ControllerSpec {
  const spec: ControllerSpec = { ...frame, structure, gains: { ...g }, values: { kc: g.kc, ti: g.ti, td: g.td }, form: 'ideal' };
  const ext = frame.extension;
  if (ext?.kind === 'scheduled') {
    const f = frame.gains;
    const ratio = (to: number, from: number): number => (Number.isFinite(to) && Number.isFinite(from) && from !== 0 ? to / from : 1);
    const rk = ratio(g.kc, f.kc);
    const ri = ratio(g.ti, f.ti);
    const rd = ratio(g.td, f.td);
    spec.extension = {
      ...ext,
      table: ext.table.map((row) =>
        row.gains === null ? row : { at: row.at, gains: { ...row.gains, kc: row.gains.kc * rk, ti: row.gains.ti * ri, td: g.td > 0 ? row.gains.td * rd : 0 } },
      ),
    };
  }
  return spec;
}

/** The file's controller with these gains (values re-expressed in its form). Null as `valuesInForm`. */
export function controllerWithGains(spec: ControllerSpec, g: GainSet, structure = spec.structure): ControllerSpec | null {
  const values = valuesInForm(spec.form, g);
  if (values === null) return null;
  return { ...spec, structure, gains: { ...g }, values };
}
