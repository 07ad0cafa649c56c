/**
 * The robustness envelope of the gain set being edited, recomputed after edits: a short pause
 * after the last edit (so a held key does not start a sweep per step), then the sweep in slices
 * (EnvelopeJob), the envelope growing on the trend as cases come in.
 */
import { useEffect, useRef, useState } from 'react';
import type { TraceEnvelope } from '../../tune/index.js';
import type { LoopSetup } from '../engine.js';
import { EnvelopeJob } from '../envelope-job.js';
import { SliceRunner } from '../slice-runner.js';
import type { GainEdit } from '../gain-edit.js';

/** Pause after the last edit before sweeping, ms. */
export const ENVELOPE_DEBOUNCE_MS = 200;
const SLICE_MS = 30;

/** What the trend draws. */
export interface EnvelopeState {
  envelope: TraceEnvelope | null;
  done: number;
  total: number;
  anyDiverged: boolean;
  /** Set when the sweep failed (the reason). */
  error: string | null;
}

export function useEnvelope(setup: LoopSetup, edit: GainEdit, enabled: boolean): EnvelopeState | null {
  const runner = useRef(new SliceRunner());
  const [state, setState] = useState<{ edit: GainEdit; value: EnvelopeState } | null>(null);
  useEffect(() => {
    const r = runner.current;
    if (!enabled) {
      r.stop();
      return undefined;
    }
    let job: EnvelopeJob | null = null;
    r.start(
      () => {
        job ??= new EnvelopeJob(setup, edit);
        return job.step(SLICE_MS);
      },
      () => {
        const j = job!;
        setState({ edit, value: { envelope: j.envelope, done: j.done, total: j.total, anyDiverged: j.anyDiverged, error: null } });
      },
      (error) => setState({ edit, value: { envelope: null, done: 0, total: 0, anyDiverged: false, error: error.message.split('\n')[0] } }),
      ENVELOPE_DEBOUNCE_MS,
    );
    return () => r.stop();
  }, [setup, edit.gains, edit.structure, edit.frame?.id, enabled]);
  if (!enabled) return null;
  // An envelope of another gain set is not shown: only "computing" until the new one starts.
  if (state === null || state.edit.gains !== edit.gains || state.edit.structure !== edit.structure) {
    return { envelope: null, done: 0, total: 0, anyDiverged: false, error: null };
  }
  return state.value;
}
