/**
 * The loop a model-based design works on (loop shaping, the Ms-constrained PI, loop shaping to
 * an Ms target): one type for all of them. The design point's frequency response with the
 * elements the margins path adds (hold at the sample time, sensor delay and filter), the file's
 * gain set whose filter, weights and anti-windup a design keeps, and the project's one Ms of a
 * gain set on the loop.
 */
import { effectiveMs, loopMs, poleZeroSummary, slowestRhpZero, type PlantFrequencyResponse } from '../analysis/index.js';
import type { GainSet, SensorSpec } from '../model/types.js';
import { gainMs } from './gain-margins.js';
import type { TuningContext } from './tuning-context.js';
import { worstMs } from '../loop/index.js';

/** A loop to design on. */
export interface DesignLoop {
  /** Frequency response of the linear model the design places L(jω) on. */
  response: PlantFrequencyResponse;
  /** Controller sample time, s. */
  sampleTime: number;
  sensor: Pick<SensorSpec, 'delay' | 'filterTime'>;
  /** The file's gain set: derivative filter, weights and anti-windup are kept. */
  base: GainSet;
  /**
   * Ms of a gain set on the loop, Infinity when the closed loop is not stable (analysis'
   * effectiveMs). From a plant file: the worst over the trial's operating points (tune's
   * gainMargins), the figure every row of `suggest` is judged by; read through the Ms-only
   * evaluation (loopMs, worstMs, gainMs: the same number bit for bit, test/tune/gain-ms.test.ts).
   */
  ms(g: GainSet): number;
  /**
   * With several distinct operating points (linear models): how many, and Ms over a subset of
   * them (indices below `pointCount`), the same figure as `ms` when the subset is all of them.
   * A design may then work on the points that bind and check the rest (ms-constrained-pi.ts).
   */
  pointCount?: number;
  msAt?(g: GainSet, points: readonly number[]): number;
}

/** The loop of one frequency response (one operating point): for a plant without a plant file. */
export function responseDesignLoop(
  response: PlantFrequencyResponse,
  sampleTime: number,
  sensor: Pick<SensorSpec, 'delay' | 'filterTime'>,
  base: GainSet,
): DesignLoop {
  return { response, sampleTime, sensor, base, ms: (g) => effectiveMs(loopMs(response, g, sampleTime, sensor)) };
}

/**
 * The loop of a prepared plant file: the rules' linear model for L(jω), Ms the worst over the
 * operating points; null without a linear model.
 */
export function contextDesignLoop(ctx: TuningContext): DesignLoop | null {
  if (ctx.response === null) return null;
  const loop: DesignLoop = {
    response: ctx.response,
    sampleTime: ctx.spec.loop.sampleTime,
    sensor: ctx.spec.sensor,
    base: ctx.spec.loop.controller.gains,
    ms: (g) => gainMs(ctx, g) ?? Infinity,
  };
  // One point per distinct linear model (points with the same model have the same Ms).
  const seen = new Set<PlantFrequencyResponse>();
  const distinct = ctx.points.filter((p) => p.response !== null && !seen.has(p.response) && seen.add(p.response) !== undefined);
  if (distinct.length < 2) return loop;
  return {
    ...loop,
    pointCount: distinct.length,
    msAt: (g, points) => worstMs(points.map((i) => distinct[i]), g, ctx.spec) ?? Infinity,
  };
}

/**
 * The slowest right-half-plane zero of the context's linear model, rad/s (NaN: none, or no linear
 * model): what bounds the bandwidth a design may aim at.
 */
export function contextRhpZero(ctx: TuningContext): number {
  return ctx.linear === null ? NaN : slowestRhpZero(poleZeroSummary(ctx.linear));
}
