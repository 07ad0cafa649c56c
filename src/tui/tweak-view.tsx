/**
 * The tweak guide on the screen: for the edited gain set, what +10 % and −10 % on each parameter
 * do to rise, overshoot, settling, IAE, peak output, travel and Ms, as a compact table of arrows
 * and signed changes (tune's tweakGuide, the same figures as `looprig run --json`'s `tweak`).
 *
 * The edit keys stay live while it is open (↑↓ choose, ←→ [ ] nudge, u r): the guide is
 * recomputed once the edits settle (SETTLE_MS after the last one), in slices from timers, so a
 * key is never held up by it; until then the previous guide stays, marked as such.
 */
import { Box } from 'ink';
import { useEffect, useRef, useState } from 'react';
import { requirementUnitOf } from '../loop/index.js';
import { plantUnits, type PlantUnits } from '../model/index.js';
import { TWEAK_FIGURE_HEADS, TWEAK_FIGURES, TWEAK_STEP, tweakChangeText, type TweakFigure, type TweakGuide } from '../tune/index.js';
import type { LoopSetup } from './engine.js';
import { gainsText } from './panels/GainsPanel.js';
import { Heading } from './panels/Heading.js';
import { Line, fit, type Piece } from './panels/line.js';
import { fig } from './panels/SuggestPanel.js';
import { wrap } from './panels/wrap.js';
import { SliceRunner } from './slice-runner.js';
import { frameId, paramList, type GainEdit } from './state.js';
import type { Theme } from './theme.js';
import { TweakJob, type TweakProgress } from './tweak-job.js';

/** Quiet time after the last edit before the guide is recomputed, ms (a held key repeats faster). */
export const SETTLE_MS = 150;
/** Wall time of one slice, ms: the rest is left to keys and drawing. */
const SLICE_MS = 30;

/** The guide as shown: the newest complete one, whether it is for the gains on screen, and progress. */
export interface TweakState {
  guide: TweakGuide | null;
  /** The guide is for the gain set being edited (false: for the previous one, being recomputed). */
  current: boolean;
  progress: TweakProgress | null;
  error: string | null;
}

/** Compute the guide for `edit` after edits settle, in slices; keep the last one meanwhile. */
export function useTweakGuide(setup: LoopSetup, edit: GainEdit): TweakState {
  const runner = useRef(new SliceRunner());
  const [state, setState] = useState<TweakState>({ guide: null, current: false, progress: null, error: null });
  useEffect(() => () => runner.current.stop(), []);
  useEffect(() => {
    setState((s) => ({ ...s, current: false, progress: null, error: null }));
    const job = new TweakJob(setup, edit);
    runner.current.start(
      () => job.step(SLICE_MS),
      (finished) => {
        const p = job.progress();
        setState((s) => (finished ? { guide: p.guide, current: true, progress: p, error: null } : { ...s, progress: p }));
      },
      (error) => setState((s) => ({ ...s, error: error.message.split('\n')[0] })),
      SETTLE_MS,
    );
    return () => runner.current.stop();
  }, [setup, edit.gains, edit.structure, frameId(edit)]);
  return state;
}

/** Width of the first column ('kc +10 %'). */
const FIRST = 9;

/** The requirement whose figure each column shows (its unit is the column's); travel has none. */
const FIGURE_REQUIREMENT: Readonly<Record<TweakFigure, string | null>> = {
  riseTime: 'rise_time',
  overshootPct: 'overshoot_pct',
  settlingTime: 'settling_time',
  iae: 'iae',
  peakOutput: 'max_output',
  travel: null,
  ms: 'max_sensitivity',
};

/** The unit a column's figures are in ('' = none, or the file gives none): travel is in actuator units as peak u. */
export function tweakFigureUnit(f: TweakFigure, units: PlantUnits): string {
  const req = FIGURE_REQUIREMENT[f];
  return req === null ? (units.actuator ?? '') : requirementUnitOf(req, units);
}

/**
 * The table's lines: a header, the units of the columns, the gains as they are, then +10 % and
 * −10 % for each parameter; each cell an arrow and the signed change. The units go on a line of
 * their own: at 80 columns a cell is 9 wide and 'overshoot %' is not. `selected`: the parameter
 * whose rows are marked '>'.
 */
export function tweakTableLines(g: TweakGuide, width: number, selected: string | null, units: PlantUnits): string[] {
  const col = Math.max(4, Math.floor((width - FIRST - 1) / TWEAK_FIGURES.length) - 1);
  const digits = col >= 9 ? 3 : 2;
  const line = (mark: string, first: string, cells: readonly string[]): string => `${mark}${fit(first, FIRST - 1)} ${cells.map((c) => fit(c, col)).join(' ')}`;
  // A unit too long for its cell is cut visibly ('m3/h·s' to 'm3/…'), never silently into another unit.
  const unitCell = (u: string): string => (u.length <= col ? u : `${u.slice(0, col - 1)}…`);
  const out = [line(' ', 'change', TWEAK_FIGURES.map((f) => TWEAK_FIGURE_HEADS[f]))];
  out.push(line(' ', 'unit', TWEAK_FIGURES.map((f) => unitCell(tweakFigureUnit(f, units)))));
  out.push(line(' ', 'as is', TWEAK_FIGURES.map((f) => fig(g.base[f], digits))));
  const pct = 100 * TWEAK_STEP;
  for (const r of g.rows) {
    const mark = r.parameter === selected ? '>' : ' ';
    out.push(line(mark, `${r.parameter} +${pct}%`, TWEAK_FIGURES.map((f) => tweakChangeText(r.plus[f], g.base[f], (x) => fig(x, digits)))));
    out.push(line(mark, `${r.parameter} −${pct}%`, TWEAK_FIGURES.map((f) => tweakChangeText(r.minus[f], g.base[f], (x) => fig(x, digits)))));
  }
  return out;
}

export interface TweakViewProps {
  setup: LoopSetup;
  edit: GainEdit;
  /** Index into paramList(edit): the parameter the arrows edit. */
  selected: number;
  width: number;
  height: number;
  theme: Theme;
}

export function TweakView(p: TweakViewProps) {
  const t = p.theme;
  const s = useTweakGuide(p.setup, p.edit);
  const list = paramList(p.edit);
  const sel = list[Math.min(p.selected, list.length - 1)] ?? null;
  const pr = s.progress;
  const status = s.error !== null ? `failed: ${s.error}` : s.current ? `${pr?.done ?? 0} simulations` : pr === null ? 'waiting for the edits to settle…' : `computing… ${pr.done}/${pr.total}`;
  const rows: Piece[][] = [[{ text: `${gainsText(p.edit)}   (selected: ${sel ?? '-'})`, bold: true }]];
  if (s.guide === null) rows.push([{ text: '  simulating ±10 % on each parameter on the full plant…', color: t.dim }]);
  else {
    const lines = tweakTableLines(s.guide, p.width, sel, plantUnits(p.setup.plant));
    // A guide for the previous gains stays until the new one is ready, dimmed.
    const dim = s.current ? undefined : t.dim;
    for (const l of lines.slice(0, 2)) rows.push([{ text: l, color: t.dim }]);
    for (const l of lines.slice(2)) rows.push([{ text: l, color: dim, bold: l.startsWith('>') }]);
    const said: string[] = [];
    for (const r of s.guide.rows) for (const c of r.contradictions) said.push(`${r.parameter} +${100 * TWEAK_STEP}%: ${c}`);
    for (const c of said) for (const w of wrap(`unlike the usual chart: ${c}`, p.width)) rows.push([{ text: w, color: t.warn }]);
    if (!s.current) rows.push([{ text: 'for the previous gains: recomputing…', color: t.dim }]);
  }
  const avail = Math.max(0, p.height - 1);
  const shown = rows.slice(0, avail);
  while (shown.length < avail) shown.push([]);
  return (
    <Box flexDirection="column" width={p.width}>
      <Heading title="Tweak guide" legend={[{ text: `±${100 * TWEAK_STEP} % each, full trial · ${status} `, color: t.dim }]} width={p.width} theme={t} />
      {shown.map((pieces, i) => (
        <Line key={i} pieces={pieces} width={p.width} color={t.color} />
      ))}
    </Box>
  );
}
