/**
 * Parameter metadata: which parameters a PID form has, their symbols, words and units, which
 * values they accept, and how a typed value is read. Knows nothing of a gain set (gain-edit.ts).
 */
import type { ControllerStructure, PidForm } from '../model/types.js';
import type { EditMath } from './edit-math.js';

/** Form parameters, the derivative filter N, the setpoint weights b and c, and the back-calculation tracking time Tt. */
export type ParamId = 'kc' | 'ti' | 'td' | 'kp' | 'ki' | 'kd' | 'n' | 'b' | 'c' | 'tt';

/** Form parameter names of a structure in a form, in display order. */
export function formParams(structure: ControllerStructure, form: PidForm): ParamId[] {
  const hasI = structure === 'pi' || structure === 'pid';
  const hasD = structure === 'pd' || structure === 'pid';
  const names: ParamId[] = form === 'parallel' ? ['kp', 'ki', 'kd'] : ['kc', 'ti', 'td'];
  return names.filter((_, i) => i === 0 || (i === 1 && hasI) || (i === 2 && hasD));
}

export interface ParamInfo {
  /** Short symbol as shown in the gain panel. */
  symbol: string;
  /** What it is, in words. */
  label: string;
  /** Unit shown after the value ('' = dimensionless or the loop's own gain units). */
  unit: '' | 's' | '1/s';
}

/** Symbol, words and unit of a parameter in a given form. */
export function paramInfo(id: ParamId, form: PidForm): ParamInfo {
  const prime = form === 'series' ? "'" : '';
  switch (id) {
    case 'kc':
      return { symbol: `Kc${prime}`, label: 'controller gain', unit: '' };
    case 'ti':
      return { symbol: `Ti${prime}`, label: 'integral time', unit: 's' };
    case 'td':
      return { symbol: `Td${prime}`, label: 'derivative time', unit: 's' };
    case 'kp':
      return { symbol: 'Kp', label: 'proportional', unit: '' };
    case 'ki':
      return { symbol: 'Ki', label: 'integral gain', unit: '1/s' };
    case 'kd':
      return { symbol: 'Kd', label: 'derivative gain', unit: 's' };
    case 'n':
      return { symbol: 'N', label: 'deriv. filter', unit: '' };
    case 'b':
      return { symbol: 'b', label: 'SP weight on P', unit: '' };
    case 'c':
      return { symbol: 'c', label: 'SP weight on D', unit: '' };
    case 'tt':
      return { symbol: 'Tt', label: 'tracking time', unit: 's' };
  }
}

/** Why a value is not allowed for a parameter, or null when it is. */
export function checkValue(id: ParamId, v: number): string | null {
  if (!Number.isFinite(v)) return 'not a finite number';
  switch (id) {
    case 'kc':
    case 'kp':
      return v === 0 ? 'the gain must not be 0' : null;
    case 'ti':
      return v > 0 ? null : 'the integral time must be > 0';
    case 'ki':
      return v > 0 ? null : 'the integral gain must be > 0';
    case 'td':
    case 'kd':
      return v >= 0 ? null : 'must be >= 0';
    case 'n':
      return v >= 1 ? null : 'N must be >= 1';
    case 'b':
    case 'c':
      return v >= 0 && v <= 1 ? null : 'a setpoint weight lies in [0, 1]';
    case 'tt':
      return v > 0 ? null : 'the tracking time must be > 0';
  }
}

/**
 * Parse a typed value for a parameter, with units where they make sense:
 * times ("90 s", "1.5 min"), integral gain per time ("0.2 /s", "3 /min", "3 1/min"), plain numbers.
 * Returns the value in the panel's units (s, 1/s) or an error text.
 */
export function parseParamText(id: ParamId, text: string, math: EditMath): { value: number } | { error: string } {
  const s = text.trim();
  if (s === '') return { error: 'type a value' };
  const unit = paramInfo(id, 'ideal').unit;
  let v: number;
  if (unit === 's') {
    v = math.parseSeconds(s);
    if (Number.isNaN(v)) return { error: `'${s}' is not a time (e.g. 40, 40 s, 1.5 min)` };
  } else if (unit === '1/s') {
    const m = /^([-+]?(?:\d+\.?\d*|\.\d+)(?:e[-+]?\d+)?)\s*(?:(?:1\/|\/|per\s+)(.+))?$/i.exec(s);
    if (m === null) return { error: `'${s}' is not a rate (e.g. 0.05, 0.05 /s, 3 /min)` };
    const per = m[2] === undefined ? 1 : math.parseSeconds(`1 ${m[2].trim()}`);
    if (!(per > 0)) return { error: `'${m[2]}' is not a time unit` };
    v = Number(m[1]) / per;
  } else {
    if (!/^[-+]?(?:\d+\.?\d*|\.\d+)(?:e[-+]?\d+)?$/i.test(s)) return { error: `'${s}' is not a number` };
    v = Number(s);
  }
  const bad = checkValue(id, v);
  return bad === null ? { value: v } : { error: bad };
}

/** A number in the shortest form that reads back to the same value (at 6 significant digits). */
export function formatPlain(v: number): string {
  if (!Number.isFinite(v)) return String(v);
  return String(Number(v.toPrecision(6)));
}
