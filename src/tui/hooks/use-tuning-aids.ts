/**
 * The tuning aids behind the screen's keys: the rule suggestions, the optimiser and the
 * comparison of the file's candidates (each candidate tuned by the optimiser), all run in slices
 * from timers, so keys such as Esc are handled while they work. The reducer asks through effects;
 * this hook answers with actions.
 */
import { useEffect, useRef, useState } from 'react';
import { compareSteps, type CompareResult } from '../../tune/index.js';
import { candidateEntries, editedEntry } from '../candidates.js';
import type { LoopSetup } from '../engine.js';
import { OptimizeJob } from '../optimize-job.js';
import { SliceRunner } from '../slice-runner.js';
import { sameEdit, type GainEdit } from '../gain-edit.js';
import type { Action, Effect } from '../screen-state.js';
import { SuggestJob } from '../suggest-job.js';

/** Wall time of one slice of rules, ms: the rest is left to keys and drawing. */
const SLICE_MS = 30;
/**
 * Delay before the first slice, ms: long enough for the frame that says "computing…" to be
 * written first (Ink draws at most every 1/60 s).
 */
const FIRST_FRAME_MS = 25;

export interface TuningAids {
  /** Handle an aid's effect; false when the effect is not one of the aids'. */
  run(effect: Effect, current: GainEdit): boolean;
  /** The comparison to draw (null until computed). */
  compare: CompareResult | null;
}

function message(error: Error): string {
  return error.message.split('\n')[0];
}

export function useTuningAids(setup: LoopSetup, dispatch: (a: Action) => void): TuningAids {
  const suggestRunner = useRef(new SliceRunner());
  const optimizeRunner = useRef(new SliceRunner());
  const suggestJob = useRef<SuggestJob | null>(null);
  const optimizeJob = useRef<OptimizeJob | null>(null);
  const compareRunner = useRef(new SliceRunner());
  const [compare, setCompare] = useState<CompareResult | null>(null);
  const compareRef = useRef<CompareResult | null>(null);

  useEffect(
    () => () => {
      suggestRunner.current.stop();
      optimizeRunner.current.stop();
      compareRunner.current.stop();
    },
    [],
  );

  function showCompare(result: CompareResult, current: GainEdit): void {
    const entries = candidateEntries(setup, result, current.form);
    dispatch({ type: 'compare_ready', entries, edited: editedEntry(entries, current) });
  }

  function run(e: Effect, current: GainEdit): boolean {
    switch (e.kind) {
      case 'suggest_start': {
        // The same gain set asked again: the list computed (or half computed) is still right.
        let job = suggestJob.current;
        if (job === null || !sameEdit(job.base, current)) job = suggestJob.current = new SuggestJob(setup, current);
        const j = job;
        if (j.finished) {
          dispatch({ type: 'suggest_progress', view: j.view() });
          return true;
        }
        suggestRunner.current.start(
          () => j.step(SLICE_MS),
          () => dispatch({ type: 'suggest_progress', view: j.view() }),
          (error) => {
            suggestJob.current = null;
            dispatch({ type: 'aid_failed', text: `tuning rules: ${message(error)}` });
          },
          FIRST_FRAME_MS,
        );
        return true;
      }
      case 'suggest_stop':
        suggestRunner.current.stop();
        return true;
      case 'optimize_start': {
        const job = (optimizeJob.current = new OptimizeJob(setup, current));
        optimizeRunner.current.start(
          () => job.step(SLICE_MS),
          (finished) => {
            if (finished) dispatch({ type: 'optimize_done', outcome: job.outcome() });
            else dispatch({ type: 'optimize_progress', view: job.view() });
          },
          (error) => dispatch({ type: 'aid_failed', text: `optimiser: ${message(error)}` }),
          FIRST_FRAME_MS,
        );
        return true;
      }
      case 'optimize_cancel': {
        const job = optimizeJob.current;
        if (job === null) return true;
        job.cancel();
        // The next slice ends the run at once and reports the best so far.
        if (!optimizeRunner.current.running) {
          job.step(0);
          dispatch({ type: 'optimize_done', outcome: job.outcome() });
        }
        return true;
      }
      case 'compare_start': {
        const cached = compareRef.current;
        if (cached !== null) {
          showCompare(cached, current);
          return true;
        }
        // As `looprig compare` by default: nominal figures and the worst corner of the uncertainty.
        const run = compareSteps(setup.plant, { context: setup.context() });
        let result: CompareResult | null = null;
        compareRunner.current.start(
          () => {
            const t0 = performance.now();
            for (;;) {
              const next = run.next();
              if (next.done) {
                result = next.value;
                return true;
              }
              if (performance.now() - t0 >= SLICE_MS) return false;
            }
          },
          (finished) => {
            if (!finished || result === null) return;
            compareRef.current = result;
            setCompare(result);
            showCompare(result, current);
          },
          (error) => dispatch({ type: 'aid_failed', text: `comparison: ${message(error)}` }),
          FIRST_FRAME_MS,
        );
        return true;
      }
      default:
        return false;
    }
  }

  return { run, compare };
}
