/** The median of the timings (the upper middle one for an even count). */
export function median(xs: readonly number[]): number {
  const s = [...xs].sort((a, b) => a - b);
  return s[s.length >> 1];
}
