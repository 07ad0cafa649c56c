/**
 * What the notices panel shows: diagnosis flags about the plant and the loop margins of the gain
 * set being edited. The screen only draws what a `NoticeSource` returns; the source is the
 * diagnose core (see `diagnose-source.ts`), or `NO_DIAGNOSIS` when that is not available, in
 * which case the panel says so instead of inventing findings.
 */
import type { GainSet } from '../model/types.js';

export interface Notice {
  tone: 'info' | 'warn' | 'bad';
  /** Short heading (e.g. the flag's kind); absent = the text is all there is. */
  title?: string;
  text: string;
}

/** Loop margins of one gain set (NaN = not defined, e.g. no crossover). */
export interface MarginsView {
  gainMargin: number;
  phaseMarginDeg: number;
  maxSensitivity: number;
  /** Bandwidth, rad/s (worst over the operating points); absent when not computed for this loop. */
  bandwidth?: number;
  /** Dominant closed-loop damping ratio (worst over the points); absent when not computed (the file does not ask for it). */
  dampingRatio?: number;
  /** Closed-loop stability; false makes the margins meaningless (shown as 'unstable'). Absent/null = not checked. */
  closedLoopStable?: boolean | null;
  /**
   * The setpoint level GM, PM and Ms were read at, when the trial has more than one operating point
   * and the three are worst at the same one (check names it the same way); absent otherwise.
   */
  level?: number;
  /** The levels when they are worst at different points: the line then says 'worst of N points'. */
  points?: number;
}

export interface NoticeSource {
  /** False when no diagnosis is wired in. */
  readonly available: boolean;
  /** Findings about the plant and the file's loop, computed once. */
  plantNotices(): Notice[];
  /** Margins of the loop closed with these gains; null when they cannot be computed. */
  margins(gains: GainSet): MarginsView | null;
}

/** The source used when the diagnose core is not available. */
export const NO_DIAGNOSIS: NoticeSource = {
  available: false,
  plantNotices: () => [{ tone: 'info', text: 'diagnosis not available' }],
  margins: () => null,
};

/** A source with extra notices (e.g. loader warnings) listed after its own. */
export function withNotices(source: NoticeSource, extra: readonly Notice[]): NoticeSource {
  if (extra.length === 0) return source;
  return {
    available: source.available,
    plantNotices: () => [...source.plantNotices(), ...extra],
    margins: (g) => source.margins(g),
  };
}
