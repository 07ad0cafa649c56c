import { expect } from 'vitest';

/** Tolerances for `expectClose`: pass if within `abs` OR within `rel` (relative to |expected|). */
export interface CloseOptions {
  abs?: number;
  rel?: number;
}

/**
 * Assert that `actual` is within a tolerance of `expected`. With neither option given the
 * tolerance is abs 1e-9. A failure message shows both numbers and the tolerances used.
 */
export function expectClose(actual: number, expected: number, options: CloseOptions = {}): void {
  const abs = options.abs ?? (options.rel === undefined ? 1e-9 : 0);
  const rel = options.rel ?? 0;
  const diff = Math.abs(actual - expected);
  const ok = Number.isFinite(actual) && (diff <= abs || diff <= rel * Math.abs(expected));
  if (!ok) {
    expect.fail(
      `expected ${actual} to be close to ${expected} (|diff| = ${diff}, abs ${abs}, rel ${rel})`,
    );
  }
}
