/**
 * The edited gain set as changes to the plant file's text. Only fields that differ from the
 * file are touched, so every other byte (comments, layout, the way a value was written) stays.
 *
 * The values are written in the FILE's form: the loader reads one form per controller block and
 * the text editor changes values in place, it does not delete fields, so a form switched on the
 * screen is converted back for writing (and the screen says so).
 */
import { controllerEdits, fromIdeal, savePlantValues, type ValueEdit } from '../model/index.js';
import type { PidForm } from '../model/types.js';
import { frameId, type GainEdit } from './gain-edit.js';
import { formParams } from './param-meta.js';

/** Significant digits written for each value (nudges make long binary fractions). */
export const SAVE_DIGITS = 6;

export type SavePlan =
  | { ok: true; text: string; changed: string[]; formNote: string | null }
  | { ok: false; error: string };

const AW_WORDS = { none: 'none', clamp: 'clamp', back_calculation: 'back_calculation' } as const;

/**
 * Plan writing `edit` into `text`, whose controller block was loaded as `file`.
 * @param text current file text (the loaded one, or the one now on disk after a conflict)
 * @param file the gain set the file holds (as loaded)
 * @param edit the gain set to write
 * @param fileForm the form the file uses
 * @param note record comment written beside each changed value (e.g. from `gainNote`), or none
 */
export function planSave(text: string, file: GainEdit, edit: GainEdit, fileForm: PidForm, note?: string, options: { structure?: boolean } = {}): SavePlan {
  // Only the file's own controller block is written: a comparison candidate's structure needs
  // fields the file does not have. Another law (a rule's PID over the file's PI) is written only
  // when asked to change loop.controller.structure too (the screen asks first).
  if (frameId(edit) !== frameId(file)) return { ok: false, error: `'${edit.frame?.candidate ?? edit.frame?.named}' is not the file's controller` };
  const restructure = edit.structure !== file.structure;
  if (restructure && options.structure !== true) return { ok: false, error: `the file's controller is a ${file.structure.toUpperCase()}, not a ${edit.structure.toUpperCase()}` };
  const converted = fromIdeal(fileForm, { kc: edit.gains.kc, ti: edit.gains.ti, td: edit.gains.td });
  if (converted === null) {
    return { ok: false, error: `the file uses the ${fileForm} form, which cannot hold these gains (series needs Ti >= 4 Td)` };
  }
  const before = fromIdeal(fileForm, { kc: file.gains.kc, ti: file.gains.ti, td: file.gains.td }) ?? {};
  const values: Record<string, number> = {};
  const changed: string[] = [];
  for (const k of formParams(edit.structure, fileForm)) {
    const fileValue = file.form === fileForm ? file.values[k] : before[k];
    if (!sameAtDigits(converted[k], fileValue)) {
      values[k] = converted[k];
      changed.push(k);
    }
  }
  // A derivative term the new structure lacks is written as 0 where the file has it (absent stays absent).
  if (restructure) {
    for (const k of formParams('pid', fileForm)) {
      if (k in values || formParams(edit.structure, fileForm).includes(k)) continue;
      if (k === 'td' || k === 'kd') values[k] = 0;
    }
  }
  if (edit.gains.n !== file.gains.n) {
    values.derivative_filter = edit.gains.n;
    changed.push('derivative_filter');
  }
  // A tracking time set on the screen is written; one left to its default (NaN) writes nothing.
  if (!Object.is(edit.gains.trackingTime, file.gains.trackingTime) && !Number.isNaN(edit.gains.trackingTime)) {
    values.tracking_time = edit.gains.trackingTime;
    changed.push('tracking_time');
  }
  let edits: ValueEdit[];
  try {
    edits = controllerEdits(text, values, { digits: SAVE_DIGITS, note });
    if (edit.gains.antiWindup !== file.gains.antiWindup) {
      edits.push({ path: ['loop', 'controller', 'anti_windup'], value: AW_WORDS[edit.gains.antiWindup], note });
      changed.push('anti_windup');
    }
    if (edit.gains.b !== file.gains.b || edit.gains.c !== file.gains.c) {
      if (!/\bsetpoint_weight\s*:/.test(text)) {
        return { ok: false, error: 'the file has no setpoint_weight field to write b and c into; add setpoint_weight: { p: 1, d: 0 } under loop.controller' };
      }
      if (edit.gains.b !== file.gains.b) edits.push({ path: ['loop', 'controller', 'setpoint_weight', 'p'], value: edit.gains.b, note });
      if (edit.gains.c !== file.gains.c) edits.push({ path: ['loop', 'controller', 'setpoint_weight', 'd'], value: edit.gains.c, note });
      changed.push('setpoint_weight');
    }
    if (restructure) {
      edits.push({ path: ['loop', 'controller', 'structure'], value: edit.structure, note });
      changed.push('structure');
    }
    const out = savePlantValues(text, edits);
    const formNote = edit.form !== fileForm ? `written in the file's ${fileForm} form (the screen showed ${edit.form})` : null;
    return { ok: true, text: out, changed, formNote };
  } catch (error) {
    if (error instanceof RangeError) return { ok: false, error: error.message };
    throw error;
  }
}

function sameAtDigits(a: number, b: number | undefined): boolean {
  if (b === undefined) return false;
  if (a === b) return true;
  if (!Number.isFinite(a) || !Number.isFinite(b)) return false;
  return Number(a.toPrecision(SAVE_DIGITS)) === Number(b.toPrecision(SAVE_DIGITS));
}
