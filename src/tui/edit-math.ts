/**
 * The core's form conversions and unit parsing, in the shape the screen reducer asks for.
 */
import { fromIdeal, toIdeal, tryParseDuration } from '../model/index.js';
import type { EditMath } from './state.js';

/** Conversions from model/pid-forms (reference sheet section 13) and times from model/units. */
export const CORE_EDIT_MATH: EditMath = {
  toIdeal: (form, values) => toIdeal(form, values),
  fromIdeal: (form, ideal) => fromIdeal(form, ideal),
  parseSeconds: (text) => {
    const r = tryParseDuration(text);
    return r.ok ? r.value : NaN;
  },
};
