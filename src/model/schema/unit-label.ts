/**
 * An engineering unit written in the plant file (`model.output_unit: m`, `actuator.unit: '%'`):
 * a short label printed beside every value of that quantity on every surface (the screen's
 * columns, text tables, SVG axes). It is never parsed or converted, so any short text is a unit;
 * what is refused is what would break a printed line: anything but text, an empty label, one too
 * long for a table column, and control characters (a tab or an escape would move the cursor).
 */
import type { YNode } from '../yaml-doc.js';
import type { Reader } from './reader.js';

/**
 * Longest unit accepted, in characters. The screen's limit column at 80 columns is 9 wide
 * ("≤ 0.01 " leaves 2 to 3); 12 holds every unit a plant needs ("kmol/m3", "rev/min", "% open")
 * while a sentence written where a unit belongs is refused.
 */
export const MAX_UNIT_LENGTH = 12;

/** C0 and C1 controls and DEL, line and paragraph separators, and the bidirectional controls. */
const CONTROL = /[\u0000-\u001f\u007f-\u009f\u2028\u2029\u200e\u200f\u202a-\u202e\u2066-\u2069]/u;

/**
 * The same rule as a JSON Schema pattern (draft-07, ECMA 262 syntax): at least one visible
 * character, no control character anywhere.
 */
export const UNIT_PATTERN = String.raw`^[^\u0000-\u001f\u007f-\u009f\u2028\u2029\u200e\u200f\u202a-\u202e\u2066-\u2069]*[^\s\u0000-\u001f\u007f-\u009f\u2028\u2029\u200e\u200f\u202a-\u202e\u2066-\u2069][^\u0000-\u001f\u007f-\u009f\u2028\u2029\u200e\u200f\u202a-\u202e\u2066-\u2069]*$`;

/**
 * Read a unit label, diagnosing at the value (at the offending character for a control
 * character). Surrounding spaces are dropped (`unit: ' % '` prints as "%").
 * @returns the label, or undefined after a diagnostic
 */
export function readUnitLabel(r: Reader, node: YNode, path: string): string | undefined {
  if (node.kind === 'scalar' && typeof node.value === 'number') {
    // `unit: 1` or `unit: .inf` is a number to YAML: say how to write text.
    r.error('WRONG_TYPE', `${path} must be a unit as text (e.g. m, '%', degC), not the number ${String(node.value)}`, node.span);
    return undefined;
  }
  const raw = r.string(node, path);
  if (raw === undefined || node.kind !== 'scalar') return undefined;
  const bad = CONTROL.exec(raw);
  if (bad !== null) {
    const at = node.offsetOf(bad.index);
    const code = bad[0].charCodeAt(0).toString(16).toUpperCase().padStart(4, '0');
    r.error('BAD_VALUE', `${path} contains a control character (U+${code}); a unit is printed on the screen and in tables: write it in plain characters`, [at, at + 1]);
    return undefined;
  }
  const label = raw.trim();
  if (label === '') {
    r.error('BAD_VALUE', `${path} is empty; give the unit (e.g. m, '%', degC) or leave the field out`, node.span);
    return undefined;
  }
  const length = [...label].length;
  if (length > MAX_UNIT_LENGTH) {
    r.error('BAD_VALUE', `${path} is ${length} characters long; a unit has at most ${MAX_UNIT_LENGTH} (it is printed beside every value)`, node.span);
    return undefined;
  }
  return label;
}
