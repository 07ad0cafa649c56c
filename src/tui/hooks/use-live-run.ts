/**
 * The live run behind the screen: created when live mode is first asked for, given every edited
 * gain set, advanced on a timer at the asked speed within a wall-time budget per tick, and
 * redrawn only when a sample ran.
 */
import { useEffect, useRef, useState } from 'react';
import type { LoopSetup } from '../engine.js';
import { frameId } from '../gain-edit.js';
import { LiveRun } from '../live-run.js';
import { speedOf, type Action, type ScreenState } from '../screen-state.js';

/** Wall-time budget of one live tick, ms: the rest of the tick is left to keys and drawing. */
const LIVE_BUDGET_MS = 25;

export interface LiveRunHandle {
  /** The run (null until live mode was first asked for). */
  readonly run: LiveRun | null;
  /** Smoothed simulated seconds per wall second achieved (NaN: not measured yet). */
  readonly achieved: number;
  /** Restart the run at t = 0 and redraw. */
  restart(): void;
}

/**
 * @param duration the trial's duration, s (the run's window)
 * @param tickMs timer period, ms
 */
export function useLiveRun(setup: LoopSetup, state: ScreenState, duration: number, tickMs: number, dispatch: (a: Action) => void): LiveRunHandle {
  const live = useRef<LiveRun | null>(null);
  const achieved = useRef(NaN);
  const [, setFrame] = useState(0);
  if (state.mode === 'live' && live.current === null) live.current = new LiveRun(setup, state.current, duration);
  const speed = speedOf(state);
  // The timer reads the newest state: a pause must stop the run at once, not after the effect
  // that clears the timer has run.
  const latest = useRef(state);
  latest.current = state;
  useEffect(() => {
    if (live.current?.setGains(state.current) === true) {
      achieved.current = NaN;
      // In instant mode the (paused) live run restarts unseen: nothing to tell.
      if (latest.current.mode === 'live') dispatch({ type: 'notify', message: { text: 'live run restarted: the edited set runs another controller structure', tone: 'info' } });
    }
  }, [state.current.gains, state.current.structure, frameId(state.current)]);
  useEffect(() => {
    if (state.mode !== 'live' || state.paused) return undefined;
    let last = performance.now();
    const timer = setInterval(() => {
      const run = live.current;
      if (run === null || latest.current.paused || latest.current.mode !== 'live') return;
      const t = performance.now();
      const wall = (t - last) / 1000;
      last = t;
      if (run.diverged) return;
      const done = run.advance(speed * wall, LIVE_BUDGET_MS);
      // Smoothed achieved speed, shown when the machine cannot keep up. A tick that kept up ran
      // at the asked speed (it may have run no sample at all: the fraction waits for the next).
      const inst = !run.behind ? speed : wall > 0 ? done / wall : NaN;
      achieved.current = Number.isNaN(achieved.current) ? inst : 0.8 * achieved.current + 0.2 * inst;
      // No sample ran, nothing on the screen changed: no frame.
      if (done > 0) setFrame((f) => f + 1);
    }, tickMs);
    return () => clearInterval(timer);
  }, [state.mode, state.paused, speed]);
  return {
    run: live.current,
    achieved: achieved.current,
    restart: () => {
      live.current?.restart();
      achieved.current = NaN;
      setFrame((f) => f + 1);
    },
  };
}
