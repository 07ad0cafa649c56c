/** JSON output helpers: one document, NaN and ±Infinity written as null. */

/** `JSON.stringify` with non-finite numbers as null (JSON has no NaN) and a final newline. */
export function toJson(value: unknown): string {
  return `${JSON.stringify(value, (_key, v: unknown) => (typeof v === 'number' && !Number.isFinite(v) ? null : v), 2)}\n`;
}

/** A number for a JSON document: itself when finite, else null. */
export function finiteOrNull(x: number): number | null {
  return Number.isFinite(x) ? x : null;
}
