/**
 * The range of times the engine can simulate, shared by every time field that sizes a run
 * (sample time, step, duration, dead times). Values outside cannot be simulated at all (a
 * sample time of 1e-320 s divides to infinity, a dead time of 1e308 s has no buffer), so the
 * loader refuses them where they are written; what is merely expensive inside the range is
 * the resource budget's business (sim/budget.ts), which the user may lift.
 */
import type { NumberRule } from './reader.js';

/** Longest duration or dead time, s: 1e8 s, a bit over three years. */
export const MAX_TIME = 1e8;
/** Shortest controller sample time, s (1 µs). */
export const MIN_SAMPLE_TIME = 1e-6;
/** Shortest integration step, s (1 ns). */
export const MIN_STEP = 1e-9;

/** A dead time: 0 up to MAX_TIME. */
export const DELAY_RULE: NumberRule = { ge: 0, le: MAX_TIME };
