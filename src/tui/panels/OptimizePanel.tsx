/**
 * The optimiser: while it runs, a progress bar (evaluations of the budget, best cost so far, the
 * start it came from); at the end the result with its figures, offered to apply.
 */
import { Box } from 'ink';
import { headlineNumber, rankedFigureText } from '../../analysis/index.js';
import type { Theme } from '../theme.js';
import type { OptimizeOutcome, OptimizeView } from '../tuning-views.js';
import { gainsText } from './GainsPanel.js';
import { Heading } from './Heading.js';
import { Line, type Piece } from './line.js';
import { fig, figuresFrom } from './SuggestPanel.js';
import { wrap } from './wrap.js';

/** A progress bar of `width` cells for a fraction 0..1 ('#' done, '.' to go: readable without colour). */
export function progressBar(fraction: number, width: number): string {
  const f = Math.min(1, Math.max(0, Number.isFinite(fraction) ? fraction : 0));
  const n = Math.round(f * width);
  return `[${'#'.repeat(n)}${'.'.repeat(width - n)}]`;
}

const STOP_WORDS: Record<OptimizeOutcome['stoppedBy'], string> = {
  converged: 'converged',
  evaluations: 'evaluation budget used',
  time: 'time cap',
  cancelled: 'stopped by Esc',
};

/** The panel's lines (without the heading). */
export function optimizeLines(view: OptimizeView | null, outcome: OptimizeOutcome | null, cancelling: boolean, width: number, theme: Theme): Piece[][] {
  const out: Piece[][] = [];
  if (view === null) {
    out.push([{ text: '  starting…', color: theme.dim }]);
    return out;
  }
  const c = view.costLabel;
  if (outcome === null) {
    if (view.phase === 'start') {
      out.push([{ text: `  finding a start: tuning rules ${view.rulesDone}/${view.rulesTotal}` }]);
      out.push([{ text: `  ${progressBar(view.rulesTotal > 0 ? view.rulesDone / view.rulesTotal : 0, Math.max(10, Math.min(40, width - 30)))}` }]);
    } else {
      out.push([{ text: `  start: ${view.startLabel ?? 'the edited gains'}${Number.isFinite(view.startCost) ? `, ${c} ${fig(view.startCost, 5)}` : ''}` }]);
      out.push([
        { text: `  ${progressBar(view.evaluations / view.maxEvaluations, Math.max(10, Math.min(40, width - 34)))} ` },
        { text: `${view.evaluations}/${view.maxEvaluations} evaluations`, bold: true },
      ]);
      out.push([{ text: `  best ${c} so far: ` }, { text: Number.isFinite(view.bestCost) ? fig(view.bestCost, 5) : 'none feasible yet', bold: true }]);
    }
    out.push([]);
    out.push([{ text: cancelling ? '  stopping…' : '  Esc stops it; the best gain set so far is then offered', color: theme.dim }]);
    return out;
  }
  out.push([
    { text: '  result: ' },
    { text: Number.isFinite(outcome.cost) ? `${c} ${fig(outcome.cost, 5)}` : 'no gain set found', bold: true },
    { text: ` after ${outcome.evaluations} evaluations in ${outcome.slices} slices (${STOP_WORDS[outcome.stoppedBy]})` },
  ]);
  out.push([{ text: `  start: ${outcome.startLabel ?? 'the edited gains'}${Number.isFinite(outcome.startCost) ? `, ${c} ${fig(outcome.startCost, 5)}` : ''}`, color: theme.dim }]);
  if (outcome.edit !== null) out.push([{ text: '  gains: ' }, { text: gainsText(outcome.edit), bold: true }]);
  const os = rankedFigureText('overshootPct', outcome.head === null ? NaN : headlineNumber(outcome.head.overshootPct), (x) => fig(x));
  const ts = rankedFigureText('settlingTime', outcome.head === null ? NaN : headlineNumber(outcome.head.settlingTime), (x) => fig(x));
  const ms = outcome.ms === Infinity ? 'unstable' : fig(outcome.ms);
  out.push([{ text: `  overshoot ${os}, settling ${ts}, Ms ${ms}, GM ${fig(outcome.gm)}` }]);
  const from = figuresFrom(outcome.head);
  if (from !== '') out.push([{ text: `  ${from.trim()}`, color: theme.dim }]);
  const now = outcome.current;
  if (now !== null) {
    const above = now.ms > view.msTarget ? ' (Ms above the target)' : '';
    out.push([{ text: `  the edited set: ${c} ${fig(now.cost, 5)}, Ms ${now.ms === Infinity ? 'unstable' : fig(now.ms)}${above}`, color: theme.dim }]);
  }
  for (const f of outcome.flags) for (const l of wrap(`! ${f}`, width - 2)) out.push([{ text: `  ${l}`, color: theme.warn }]);
  for (const n of outcome.notes) for (const l of wrap(`note: ${n}`, width - 2)) out.push([{ text: `  ${l}`, color: theme.dim }]);
  out.push([]);
  out.push([
    { text: outcome.edit !== null ? '  Enter applies it (u undoes) · Esc discards it' : '  nothing to apply · Esc closes', color: theme.heading, bold: true },
  ]);
  return out;
}

export interface OptimizePanelProps {
  view: OptimizeView | null;
  outcome: OptimizeOutcome | null;
  cancelling: boolean;
  width: number;
  height: number;
  theme: Theme;
}

export function OptimizePanel(p: OptimizePanelProps) {
  const v = p.view;
  const title = v === null ? 'Optimiser' : `Optimiser: ${v.structure.toUpperCase()}, ${v.costLabel}, Ms <= ${v.msTarget}`;
  const lines = optimizeLines(p.view, p.outcome, p.cancelling, p.width, p.theme);
  const avail = Math.max(0, p.height - 1);
  // The last line (what Enter / Esc do) must stay: cut the notes above it when short of lines.
  const shown = lines.length <= avail ? lines : [...lines.slice(0, Math.max(0, avail - 1)), lines[lines.length - 1]];
  while (shown.length < avail) shown.push([]);
  return (
    <Box flexDirection="column" width={p.width}>
      <Heading title={title} width={p.width} theme={p.theme} />
      {shown.slice(0, avail).map((pieces, i) => (
        <Line key={i} pieces={pieces} width={p.width} color={p.theme.color} />
      ))}
    </Box>
  );
}
