/**
 * The core's form conversion and unit parsing, in the shape the screen's reducer asks for. The
 * reducer takes them as an argument (it does no physics itself); the shell passes CORE_EDIT_MATH.
 */
import { toIdeal, tryParseDuration } from '../model/index.js';
import type { PidForm } from '../model/types.js';

/** The three time-domain parameters of a PID form, in that form's own meaning. */
export interface FormTriple {
  kc: number;
  ti: number;
  td: number;
}

/** What the reducer needs from the core (form conversion, unit parsing). */
export interface EditMath {
  /** Values as written in `form` (kc/ti/td or kp/ki/kd) -> ideal kc, ti, td (RangeError when the form cannot mean them). */
  toIdeal(form: PidForm, values: Readonly<Record<string, number>>): FormTriple;
  /** "90 s", "1.5 min", "90" -> seconds; NaN when the text is not a time. */
  parseSeconds(text: string): number;
}

/** Conversions from model/pid-forms (reference sheet section 13) and times from model/units. */
export const CORE_EDIT_MATH: EditMath = {
  toIdeal: (form, values) => toIdeal(form, values),
  parseSeconds: (text) => {
    const r = tryParseDuration(text);
    return r.ok ? r.value : NaN;
  },
};
