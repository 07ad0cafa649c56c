/** JSON output helpers: one document, NaN and ±Infinity written as null. */
import type { NoiseActivity } from '../tune/index.js';


/** `JSON.stringify` with non-finite numbers as null (JSON has no NaN) and a final newline. */
export function toJson(value: unknown): string {
  return `${JSON.stringify(value, (_key, v: unknown) => (typeof v === 'number' && !Number.isFinite(v) ? null : v), 2)}\n`;
}

/** A number for a JSON document: itself when finite, else null. */
export function finiteOrNull(x: number): number | null {
  return Number.isFinite(x) ? x : null;
}

/** Noise-driven actuator activity (tune's NoiseActivity) as JSON; null without sensor noise. */
export function noiseJson(n: NoiseActivity | null): { step_std: number; rate_step: number | null; rate_limited_share: number } | null {
  return n === null ? null : { step_std: n.stepStd, rate_step: finiteOrNull(n.rateStep), rate_limited_share: n.rateLimitedShare };
}

/**
 * A core record with its keys in snake_case, as every --json document writes them
 * (timeConstant -> time_constant), nested records and arrays included.
 */
export function snakeKeys(value: unknown): unknown {
  if (Array.isArray(value)) return value.map(snakeKeys);
  if (value === null || typeof value !== 'object' || ArrayBuffer.isView(value)) return value;
  const out: Record<string, unknown> = {};
  for (const [k, v] of Object.entries(value)) out[k.replace(/[A-Z]/g, (c) => `_${c.toLowerCase()}`)] = snakeKeys(v);
  return out;
}
