/**
 * The core's unit parsing, in the shape the screen's reducer asks for. The reducer takes it as an
 * argument (it does no physics itself); the shell passes CORE_EDIT_MATH. Form conversions are
 * the gain-edit model's (gain-edit.ts `makeEdit`, from model/pid-forms).
 */
import { tryParseDuration } from '../model/index.js';

/** What the reducer needs from the core. */
export interface EditMath {
  /** "90 s", "1.5 min", "90" -> seconds; NaN when the text is not a time. */
  parseSeconds(text: string): number;
}

/** Times from model/units. */
export const CORE_EDIT_MATH: EditMath = {
  parseSeconds: (text) => {
    const r = tryParseDuration(text);
    return r.ok ? r.value : NaN;
  },
};
