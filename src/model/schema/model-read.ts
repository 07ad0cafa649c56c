/**
 * What reading a model section yields besides the spec: the disturbance names trial events
 * may use and the names an uncertainty entry may vary.
 */
import type { ModelSpec } from '../types.js';

export interface ModelRead {
  model: ModelSpec;
  /** Disturbance names, in order (linear kinds: ['load']). */
  disturbances: string[];
  /** Uncertain-able names -> whether the value is a time (accepts units). */
  uncertain: Record<string, boolean>;
}

/** The implicit input disturbance of every linear kind. */
export const LOAD_DISTURBANCE = 'load';
