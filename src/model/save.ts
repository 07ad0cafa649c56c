/**
 * Writing values back into a plant file's text with every comment and untouched line kept
 * byte for byte. The file write itself (temp file + rename) belongs to cli/.
 */
import { FORM_TERMS } from './pid-forms.js';
import { formatDuration, tryParseDuration } from './units.js';
import { parsePlantYaml, setValueInText, type ValueEdit, type YNode } from './yaml-doc.js';

export type { ValueEdit };

/**
 * Apply edits in order and return the new text. Throws RangeError when a path cannot be edited
 * (it names a mapping or list, or a parent that is absent) or the text has YAML errors.
 */
export function savePlantValues(text: string, edits: readonly ValueEdit[]): string {
  let out = text;
  for (const e of edits) out = setValueInText(out, e);
  return out;
}

export interface ControllerEditOptions {
  /** Round written values to this many significant digits (default: exact, shortest form). */
  digits?: number;
  /**
   * Record which method produced the values, and when, as the end-of-line comment of every
   * written line (see `ValueEdit.note`). Build it with `gainNote(date, method)`.
   */
  note?: string;
}

/**
 * The record comment for written gains: "2026-12-02 optimize (IAE, Ms<=1.6)". The date is given
 * by the caller (the core does not read the clock) as YYYY-MM-DD; the method is one line of text.
 * Throws RangeError for a malformed date or a method with line breaks or nothing in it.
 */
export function gainNote(date: string, method: string): string {
  if (!/^\d{4}-(0[1-9]|1[0-2])-(0[1-9]|[12]\d|3[01])$/.test(date)) throw new RangeError(`date must be YYYY-MM-DD, got '${date}'`);
  if (/[\r\n]/.test(method) || method.trim() === '') throw new RangeError('method must be one non-empty line of text');
  return `${date} ${method.trim()}`;
}

const TIME_TERMS = new Set(['ti', 'td', 'tracking_time']);

/**
 * Edits that write `newValues` (keys as in the file's form: kc/ti/td or kp/ki/kd, plus
 * derivative_filter) into loop.controller of `text`. A time is written with the unit the file
 * used for that field ("42.5 s", "0.75 min"); a field written as a bare number, or absent, gets
 * a bare number of seconds. An absent ti = Infinity or td = 0 is left absent (that is the default).
 * With `options.note`, each written line gets that record as its end-of-line comment.
 */
export function controllerEdits(
  text: string,
  newValues: Readonly<Record<string, number>>,
  options: ControllerEditOptions = {},
): ValueEdit[] {
  const { root } = parsePlantYaml(text);
  const controller = child(child(root, 'loop'), 'controller');
  if (!controller || controller.kind !== 'map') throw new RangeError('the file has no loop.controller mapping');
  const formNode = child(controller, 'form');
  const form = formNode?.kind === 'scalar' && typeof formNode.value === 'string' ? formNode.value : 'ideal';
  if (form !== 'ideal' && form !== 'parallel' && form !== 'series') throw new RangeError(`unknown form '${form}'`);
  const allowed = new Set([...FORM_TERMS[form], 'derivative_filter', 'tracking_time']);
  const edits: ValueEdit[] = [];
  for (const [key, value] of Object.entries(newValues)) {
    if (!allowed.has(key)) throw new RangeError(`'${key}' is not a field of a ${form}-form controller`);
    const existing = child(controller, key);
    if (!existing && ((key === 'ti' && value === Infinity) || (key === 'td' && value === 0))) continue;
    let written: number | string = options.digits ? Number(value.toPrecision(options.digits)) : value;
    if (TIME_TERMS.has(key) && existing?.kind === 'scalar' && typeof existing.value === 'string') {
      const parsed = tryParseDuration(existing.value);
      const unit = parsed.ok ? parsed.unit : null;
      written = formatDuration(value, unit ?? 's', options.digits);
    }
    edits.push(
      options.note === undefined
        ? { path: ['loop', 'controller', key], value: written }
        : { path: ['loop', 'controller', key], value: written, note: options.note },
    );
  }
  return edits;
}

function child(node: YNode | null | undefined, key: string): YNode | undefined {
  if (!node || node.kind !== 'map') return undefined;
  return node.entries.find((e) => e.key === key)?.value;
}
