/**
 * The file's trial without its scripted gain changes: a gain set is judged (and the screen runs
 * the edited set) over the whole trial on its own. One definition, imported by the tuning
 * context and by the rehearsal, which adds its own switch to it.
 */
import type { TrialSpec } from '../model/types.js';

/** `trial` without its 'gains' events (the same object when it has none). */
export function screenTrial(trial: TrialSpec): TrialSpec {
  if (!trial.events.some((e) => e.kind === 'gains')) return trial;
  return { ...trial, events: trial.events.filter((e) => e.kind !== 'gains') };
}
