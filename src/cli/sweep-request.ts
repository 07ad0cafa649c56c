/**
 * The messages between the parallel sweep and its worker threads (plain data only), and the
 * per-plant state both sides keep: the loaded plant, its tuning context, and prepared sweep cases
 * by preparation options.
 */
import type { GainSet, PlantSpec } from '../model/types.js';
import type { RobustnessOptions, SweepPart, SweepPlan, TuningContext } from '../tune/index.js';

/** Simulate cases `indices` of the sweep of `gains` on the plant file `text`. */
export interface SweepRequest {
  id: number;
  text: string;
  fileName: string;
  gains: GainSet;
  options: RobustnessOptions;
  indices: number[];
}

/** The part, or the error text of a failed request. */
export type SweepReply = { id: number; part: SweepPart; error?: undefined } | { id: number; error: string; part?: undefined };

/** A loaded plant with its prepared sweep cases, one cache per set of preparation options. */
export function plantState(plant: PlantSpec, base: TuningContext): {
  plant: PlantSpec;
  base: TuningContext;
  cacheFor(options: RobustnessOptions): Map<number, SweepPlan['cases'][number]>;
} {
  const caches = new Map<string, Map<number, SweepPlan['cases'][number]>>();
  return {
    plant,
    base,
    cacheFor(options) {
      // Only these options change which cases there are; structure, runner and envelope do not.
      const key = JSON.stringify([options.corners ?? true, options.samples ?? null, options.seed ?? null, options.nominal ?? true]);
      let c = caches.get(key);
      if (c === undefined) {
        c = new Map();
        caches.set(key, c);
      }
      return c;
    },
  };
}
