/**
 * Times in the plant file: a bare number is seconds; a string may carry a unit
 * ("90 s", "1.5 min", "250ms", "2 h"). Inside the core every time is in seconds.
 */

/** Seconds per unit for the accepted time units. */
export const TIME_UNITS: Readonly<Record<string, number>> = { ms: 1e-3, s: 1, min: 60, h: 3600 };

export type DurationResult =
  | { ok: true; value: number; unit: string | null }
  | { ok: false; code: 'BAD_UNIT'; message: string };

// Number part: sign, digits with optional fraction (or a leading-dot fraction), exponent;
// "inf" lets `ti: inf s` mean no integral action.
const NUMBER_PART = String.raw`(?:\d+(?:\.\d*)?|\.\d+)(?:[eE][+-]?\d+)?`;
const DURATION = new RegExp(String.raw`^\s*([+-]?(?:${NUMBER_PART}|inf))\s*([A-Za-z]*)\s*$`);
// The same number written with at least one non-zero digit in its mantissa (a value > 0).
const POSITIVE_PART = String.raw`(?:\d*[1-9]\d*(?:\.\d*)?|\d+\.\d*[1-9]\d*|\.\d*[1-9]\d*)(?:[eE][+-]?\d+)?`;

/** Which time texts a pattern from `durationPattern` accepts. */
export interface DurationPatternOptions {
  /** any sign, >= 0 (no minus sign), or > 0 (no minus sign, not zero). */
  sign: 'any' | 'non_negative' | 'positive';
  /** Accept "inf" (and "+inf"). */
  infinity?: boolean;
  /** Accept "-inf" (only with sign 'any'). */
  negativeInfinity?: boolean;
}

/**
 * A regular expression (as source text, for JSON Schema `pattern`) for the time texts that
 * `tryParseDuration` reads with a known unit, restricted by sign. Built from the same pieces as
 * the parser's own expression and the same unit table.
 */
export function durationPattern(options: DurationPatternOptions): string {
  const units = Object.keys(TIME_UNITS)
    .sort((a, b) => b.length - a.length)
    .join('|');
  const alternatives =
    options.sign === 'any'
      ? [`[+-]?${NUMBER_PART}`]
      : options.sign === 'non_negative'
        ? [`\\+?${NUMBER_PART}`]
        : [`\\+?${POSITIVE_PART}`];
  if (options.infinity) alternatives.push('\\+?inf');
  if (options.negativeInfinity && options.sign === 'any') alternatives.push('-inf');
  return String.raw`^\s*(?:${alternatives.join('|')})\s*(?:${units})?\s*$`;
}

/**
 * Parse a time without throwing. Numbers are seconds; strings are `<number> [unit]` with unit
 * ms | s | min | h (no unit = seconds). `unit` in the result is the unit written, or null.
 */
export function tryParseDuration(input: string | number): DurationResult {
  if (typeof input === 'number') {
    if (Number.isNaN(input)) return { ok: false, code: 'BAD_UNIT', message: 'a time cannot be NaN' };
    return { ok: true, value: input, unit: null };
  }
  const m = DURATION.exec(input);
  if (!m) {
    return {
      ok: false,
      code: 'BAD_UNIT',
      message: `cannot read '${clip(input)}' as a time; write a number of seconds or e.g. '90 s', '1.5 min', '250 ms'`,
    };
  }
  const num = m[1].endsWith('inf') ? (m[1].startsWith('-') ? -Infinity : Infinity) : Number(m[1]);
  const unit = m[2];
  if (unit === '') return { ok: true, value: num, unit: null };
  const factor = Object.prototype.hasOwnProperty.call(TIME_UNITS, unit) ? TIME_UNITS[unit] : undefined;
  if (factor === undefined) {
    return {
      ok: false,
      code: 'BAD_UNIT',
      message: `unknown time unit '${clip(unit)}' in '${clip(input)}'; use ms, s, min or h`,
    };
  }
  return { ok: true, value: num * factor, unit };
}

/**
 * Parse a time to seconds: `parseDuration("90 s") === 90`, `parseDuration("1.5 min") === 90`.
 * Throws RangeError on malformed input (use `tryParseDuration` for user text that must not throw).
 */
export function parseDuration(input: string | number): number {
  const r = tryParseDuration(input);
  if (!r.ok) throw new RangeError(r.message);
  return r.value;
}

/**
 * Write seconds back in `unit` (null = a bare number of seconds), e.g. (42.5, 's') -> "42.5 s".
 * `digits` rounds to that many significant digits; absent = shortest exact representation.
 */
export function formatDuration(seconds: number, unit: string | null, digits?: number): string | number {
  if (unit === null) return roundSig(seconds, digits);
  const factor = Object.prototype.hasOwnProperty.call(TIME_UNITS, unit) ? TIME_UNITS[unit] : undefined;
  if (factor === undefined) throw new RangeError(`unknown time unit '${unit}'`);
  const v = roundSig(seconds / factor, digits);
  return `${v === Infinity ? 'inf' : v === -Infinity ? '-inf' : String(v)} ${unit}`;
}

function roundSig(v: number, digits: number | undefined): number {
  if (digits === undefined || !Number.isFinite(v) || v === 0) return v;
  return Number(v.toPrecision(digits));
}

function clip(s: string): string {
  return s.length > 40 ? `${s.slice(0, 37)}...` : s;
}
