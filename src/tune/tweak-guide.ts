/**
 * The tweak guide computed for this loop: what +10 % and −10 % on each controller parameter does
 * to the trial's figures, by finite differences on the full nonlinear simulation (the file's
 * trial, limits and delays; all variants in one batched run, sim's runTrialBatch) and on the
 * project's one Ms.
 *
 * Beside each parameter it gives the usual qualitative chart (raise Kc: faster rise, more
 * overshoot, settling little changed; raise the integral action (lower Ti): more overshoot,
 * longer settling; raise Td: less overshoot, shorter settling — the table taught with PID, e.g.
 * Ang, Chong & Li, IEEE Trans. Control Systems Technology 13(4), 2005, Table I, from memory; common
 * practice) and names where this plant contradicts it.
 */
import { headlineMetrics, headlineNumber, trialMetrics } from '../analysis/index.js';
import { buildController } from '../control/index.js';
import type { ControllerStructure, GainSet } from '../model/types.js';
import { batchChunks, DEFAULT_BATCH_WIDTH, runTrialBatch } from '../sim/index.js';
import { FLAG_SHARE, gainSetMs } from './evaluate.js';
import type { TuningContext } from './tuning-context.js';

/** The figures the guide reports, per variant. */
export const TWEAK_FIGURES = ['riseTime', 'overshootPct', 'settlingTime', 'iae', 'peakOutput', 'travel', 'ms'] as const;
export type TweakFigure = (typeof TWEAK_FIGURES)[number];

/** How a contradiction names each figure. */
export const TWEAK_FIGURE_WORDS: Record<TweakFigure, string> = {
  riseTime: 'rise time',
  overshootPct: 'overshoot',
  settlingTime: 'settling time',
  iae: 'IAE',
  peakOutput: 'peak controller output',
  travel: 'controller travel',
  ms: 'Ms',
};

/** Short column heads of the figures, for the guide's compact table (CLI and screen). */
export const TWEAK_FIGURE_HEADS: Record<TweakFigure, string> = {
  riseTime: 'rise',
  overshootPct: 'overshoot',
  settlingTime: 'settling',
  iae: 'IAE',
  peakOutput: 'peak u',
  travel: 'travel',
  ms: 'Ms',
};

/**
 * One cell of the compact table: an arrow and the signed change of a figure from `base` to `v`
 * ('=' when it moves by less than 0.1 % of the figure; 'now reached' / 'lost' when the figure
 * appears or disappears, e.g. a step that settles only with the change). `format` writes a number.
 */
export function tweakChangeText(v: number, base: number, format: (x: number) => string): string {
  const d = v - base;
  if (!Number.isFinite(d)) return Number.isFinite(base) || Number.isFinite(v) ? (Number.isFinite(v) ? 'now reached' : 'lost') : '-';
  if (Math.abs(d) <= 1e-3 * Math.max(Math.abs(base), 1e-12)) return '=';
  return `${d > 0 ? '↑' : '↓'} ${d > 0 ? '+' : ''}${format(d)}`;
}

/** The parameters varied (those the structure uses). */
export type TweakParameter = 'kc' | 'ti' | 'td' | 'b' | 'n';

/** One parameter's row. */
export interface TweakRow {
  parameter: TweakParameter;
  /** Value in the ideal form (kc, ti s, td s, b, n). */
  value: number;
  /** Figures with the parameter at +10 % and −10 % (NaN where the trial does not show the figure). */
  plus: Record<TweakFigure, number>;
  minus: Record<TweakFigure, number>;
  /** The usual chart's direction for +10 % (+1 up, −1 down, 0 little change); null where it says nothing. */
  chart: Partial<Record<TweakFigure, -1 | 0 | 1>>;
  /** Figures where this plant moves against the chart for +10 %, with why when it is known. */
  contradictions: string[];
}

/** Result of `tweakGuide`. */
export interface TweakGuide {
  /** Figures of the gains as they are. */
  base: Record<TweakFigure, number>;
  rows: TweakRow[];
  notes: string[];
}

/** Relative step of the finite differences. */
export const TWEAK_STEP = 0.1;

/**
 * Usual chart for +10 % on each parameter (note: +10 % on Ti is LESS integral action, so its row
 * is the chart's integral row with the signs reversed).
 */
const CHART: Record<TweakParameter, Partial<Record<TweakFigure, -1 | 0 | 1>>> = {
  kc: { riseTime: -1, overshootPct: 1, settlingTime: 0, ms: 1 },
  ti: { riseTime: 1, overshootPct: -1, settlingTime: -1, ms: -1 },
  td: { overshootPct: -1, settlingTime: -1 },
  b: { riseTime: -1, overshootPct: 1 },
  n: {},
};

function figures(ctx: TuningContext, g: GainSet, structure: ControllerStructure, m: ReturnType<typeof trialMetrics>): Record<TweakFigure, number> {
  const head = headlineMetrics(m);
  return {
    riseTime: headlineNumber(head.riseTime),
    overshootPct: headlineNumber(head.overshootPct),
    settlingTime: headlineNumber(head.settlingTime),
    iae: m.overall.iae,
    peakOutput: m.overall.maxAbsOutput,
    travel: m.overall.uTotalVariation,
    ms: gainSetMs(ctx, g, structure).ms,
  };
}

function parametersOf(g: GainSet, structure: ControllerStructure): TweakParameter[] {
  const p: TweakParameter[] = ['kc'];
  if ((structure === 'pi' || structure === 'pid') && Number.isFinite(g.ti)) p.push('ti');
  if ((structure === 'pd' || structure === 'pid') && g.td > 0) {
    p.push('td');
    if (Number.isFinite(g.n)) p.push('n');
  }
  if (g.b > 0) p.push('b');
  return p;
}

/**
 * The tweak guide for gain set `g` (ideal form) of the file's plain PID law, in slices: each
 * `next()` simulates at most `width` variants (one batched run) and measures them, so a screen
 * can answer keys between slices; the generator's return value is the guide. `width` (default
 * sim's DEFAULT_BATCH_WIDTH) only changes how the work is cut, not one figure (the batch runner
 * is bit-identical to runTrial).
 */
export function* tweakGuideSteps(ctx: TuningContext, g: GainSet, structure: ControllerStructure, width = DEFAULT_BATCH_WIDTH): Generator<void, TweakGuide, void> {
  const spec = ctx.spec;
  const { extension: _e, named: _n, ...plain } = spec.loop.controller;
  const params = parametersOf(g, structure);
  const sets: GainSet[] = [g];
  for (const p of params) for (const f of [1 + TWEAK_STEP, 1 - TWEAK_STEP]) sets.push({ ...g, [p]: g[p] * f });
  const figs: Record<TweakFigure, number>[] = [];
  const notes = new Set<string>();
  let baseMetrics: ReturnType<typeof trialMetrics> | null = null;
  for (const chunk of batchChunks(sets, Math.max(1, width))) {
    const members = chunk.map((s) => ({ plant: ctx.dynamics, controller: buildController({ ...plain, structure, gains: s }, spec.loop.sampleTime), loop: ctx.loop }));
    const batch = runTrialBatch(members, ctx.trial, { width });
    for (const n of batch.notes) notes.add(n);
    batch.results.forEach((r, i) => {
      const m = trialMetrics(r.trace, ctx.trial, spec.loop.requirements);
      baseMetrics ??= m;
      figs.push(figures(ctx, chunk[i], structure, m));
    });
    if (figs.length < sets.length) yield;
  }
  return assemble(g, params, figs, baseMetrics!, spec.loop.trial.duration, [...notes]);
}

/** The tweak guide for gain set `g` (ideal form) of the file's plain PID law, all at once. */
export function tweakGuide(ctx: TuningContext, g: GainSet, structure: ControllerStructure): TweakGuide {
  const steps = tweakGuideSteps(ctx, g, structure);
  for (;;) {
    const next = steps.next();
    if (next.done) return next.value;
  }
}

/** The rows from the figures of every variant (base first, then +/− per parameter). */
function assemble(g: GainSet, params: TweakParameter[], figs: Record<TweakFigure, number>[], baseMetrics: ReturnType<typeof trialMetrics>, duration: number, notes: string[]): TweakGuide {
  const base = figs[0];
  // The same share that flags a gain set as saturated (evaluate.ts).
  const saturated = baseMetrics.overall.saturatedTime > FLAG_SHARE * duration;
  const rows: TweakRow[] = params.map((p, i) => {
    const plus = figs[1 + 2 * i];
    const minus = figs[2 + 2 * i];
    const chart = CHART[p];
    const contradictions: string[] = [];
    for (const [f, dir] of Object.entries(chart) as [TweakFigure, -1 | 0 | 1][]) {
      const d = plus[f] - base[f];
      if (!Number.isFinite(d) || dir === 0) continue;
      // A change below 1 % of the figure is no direction at all.
      if (Math.abs(d) <= 0.01 * Math.abs(base[f])) continue;
      if (Math.sign(d) !== dir) {
        contradictions.push(`${TWEAK_FIGURE_WORDS[f]} ${d > 0 ? 'rises' : 'falls'} where the usual chart has it ${dir > 0 ? 'rise' : 'fall'}${saturated ? ' (the actuator is at a limit for part of the trial, which the chart does not know)' : ''}`);
      }
    }
    return { parameter: p, value: g[p], plus, minus, chart, contradictions };
  });
  return { base, rows, notes };
}
