/** Number formatting for the human-readable summaries. */

/** `x` with up to `digits` significant digits, trailing zeros dropped; non-finite as `missing`. */
export function num(x: number, digits = 4, missing = '-'): string {
  if (!Number.isFinite(x)) return missing;
  if (x === 0) return '0';
  const abs = Math.abs(x);
  if (abs >= 1e6 || abs < 1e-4) return x.toExponential(digits - 1).replace(/\.?0+e/, 'e');
  const decimals = Math.max(0, digits - 1 - Math.floor(Math.log10(abs)));
  return x.toFixed(decimals).replace(/(\.\d*?)0+$/, '$1').replace(/\.$/, '');
}

/** A time in seconds, e.g. `12.5 s`; non-finite as `missing`. */
export function secs(x: number, missing = '-'): string {
  return Number.isFinite(x) ? `${num(x)} s` : missing;
}

/** Render rows as left-aligned columns separated by two spaces. */
export function table(rows: readonly (readonly string[])[]): string {
  const widths: number[] = [];
  for (const row of rows) row.forEach((cell, i) => (widths[i] = Math.max(widths[i] ?? 0, cell.length)));
  return rows
    .map((row) => row.map((cell, i) => (i === row.length - 1 ? cell : cell.padEnd(widths[i]))).join('  ').trimEnd())
    .join('\n');
}
