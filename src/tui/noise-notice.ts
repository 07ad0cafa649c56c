/**
 * A notice for the gain set being edited when sensor noise alone would keep the actuator on its
 * rate limit (tune's noise-activity estimate, the same finding as the rule list's 'noisy valve'):
 * raising kc by hand shows at once what it does to the valve, before any trial is read.
 */
import { FLAG_SHARE, gainNoiseActivity, noiseMessage } from '../tune/index.js';
import { plantFor, runningGains, type LoopSetup } from './engine.js';
import type { Notice } from './notices.js';
import type { GainEdit } from './gain-edit.js';

/** The notice, or null when the noise stays clear of the rate limit (or the law is not the plain PID). */
export function noiseNotice(setup: LoopSetup, edit: GainEdit): Notice | null {
  if (edit.frame?.extended === true) return null;
  const n = gainNoiseActivity(plantFor(setup, edit), runningGains(edit), edit.structure);
  if (n === null || !(n.rateLimitedShare > FLAG_SHARE)) return null;
  // A warning once a quarter of the samples are cut short (common practice, no source); below, information.
  return { tone: n.rateLimitedShare > 0.25 ? 'warn' : 'info', title: 'noise at rate limit', text: noiseMessage(n) };
}
