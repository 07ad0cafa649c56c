/**
 * The metrics panel as rows of text: each figure of the trial, the file's limit where there is
 * one, and met / not met / n/a, for the current gain set and the baseline. The figures themselves
 * come from analysis/ (headlineMetrics: the worst step; checkRequirements) and the notice source
 * (margins); the words for a figure not reached / not settled are analysis' (stepFigureText).
 */
import { headlineMetrics, stepFigureText, type HeadlineMetrics, type RequirementResult, type StepFigure, type TrialMetrics } from '../analysis/index.js';
import { meetsLimit, requirementUnitOf } from '../loop/index.js';
import { NO_UNITS, type PlantUnits } from '../model/index.js';
import type { Requirements } from '../model/types.js';
import type { MarginsView } from './notices.js';

export interface MetricCell {
  text: string;
  /**
   * The text without the file's unit, for a column too narrow for it (the limit beside it names
   * the unit); absent when the figure carries no unit of the file.
   */
  short?: string;
  /** 'ok' met, 'no' not met, 'n/a' cannot be evaluated on this trial, null no limit. */
  status: 'ok' | 'no' | 'n/a' | null;
}

export interface MetricRow {
  label: string;
  /** "<= 10 %", or '' with no limit. */
  limit: string;
  now: MetricCell;
  base: MetricCell | null;
}

/** What one evaluated gain set contributes. */
export interface MetricInput {
  metrics: TrialMetrics;
  checks: readonly RequirementResult[];
  /** 'pending' while they are being computed for a new gain set. */
  margins: MarginsView | null | 'pending';
  /** The trial diverged: no time-domain figure of it meets a limit. */
  diverged: boolean;
}

interface Def {
  name: string;
  label: string;
  unit: string;
  /** Requirement key in Requirements. */
  req: keyof Requirements;
  /** 'max' = measured must not exceed the limit; 'min' = must reach it. */
  sense: 'max' | 'min';
  /** A step figure: its headline (worst step, analysis' headlineMetrics) and its words. */
  step?: StepFigure;
  /** The figure of a whole-trial row. */
  figure?: (m: TrialMetrics) => number;
  margin?: (g: MarginsView) => number;
}

const DEFS: readonly Def[] = [
  { name: 'overshoot_pct', label: 'overshoot', unit: '%', req: 'overshootPct', sense: 'max', step: 'overshootPct' },
  { name: 'settling_time', label: 'settling', unit: 's', req: 'settlingTime', sense: 'max', step: 'settlingTime' },
  { name: 'rise_time', label: 'rise time', unit: 's', req: 'riseTime', sense: 'max', step: 'riseTime' },
  { name: 'steady_state_error', label: 'offset', unit: '', req: 'steadyStateError', sense: 'max', step: 'steadyStateError' },
  { name: 'iae', label: 'IAE', unit: '', req: 'iae', sense: 'max', figure: (m) => m.overall.iae },
  { name: 'max_output', label: 'peak |u|', unit: '', req: 'maxOutput', sense: 'max', figure: (m) => m.overall.maxAbsOutput },
  { name: 'saturated_time', label: 'saturated', unit: 's', req: 'saturatedTime', sense: 'max', figure: (m) => m.overall.saturatedTime },
  { name: 'max_sensitivity', label: 'Ms', unit: '', req: 'maxSensitivity', sense: 'max', margin: (g) => g.maxSensitivity },
  { name: 'gain_margin', label: 'GM', unit: '', req: 'gainMargin', sense: 'min', margin: (g) => g.gainMargin },
  { name: 'phase_margin_deg', label: 'PM', unit: '°', req: 'phaseMarginDeg', sense: 'min', margin: (g) => g.phaseMarginDeg },
];

/** Figures shown even when the file does not require them, in this order, while rows last. */
const ALWAYS: readonly string[] = ['overshoot_pct', 'settling_time', 'rise_time', 'iae', 'saturated_time', 'steady_state_error'];

/** Text of a trial without a setpoint step in a step figure's cell (the reason it is n/a). */
const NO_STEP = 'no step';

/** A figure with 3 significant digits (no exponent for ordinary sizes), or "—" when not reached. */
export function formatFigure(v: number, unit: string): string {
  if (Number.isNaN(v)) return '—';
  if (!Number.isFinite(v)) return v > 0 ? '∞' : '-∞';
  const a = Math.abs(v);
  const s = a !== 0 && (a >= 1e5 || a < 1e-3) ? v.toExponential(1) : String(Number(v.toPrecision(3)));
  return unit === '' ? s : unit === '°' ? `${s}°` : `${s} ${unit}`;
}

/** The unit a row prints: its own, or for a figure in the plant's units (offset, IAE, peak |u|) the file's. */
function unitOf(def: Def, units: PlantUnits): string {
  return def.unit !== '' ? def.unit : requirementUnitOf(def.name, units);
}

function cell(def: Def, inp: MetricInput, head: HeadlineMetrics, limit: number | undefined, units: PlantUnits): MetricCell {
  const unit = unitOf(def, units);
  if (def.margin !== undefined) {
    if (inp.margins === null) return { text: 'n/a', status: null };
    if (inp.margins === 'pending') return { text: '…', status: null };
    if (inp.margins.closedLoopStable === false) return { text: 'unstable', status: limit === undefined ? null : 'no' };
    const measured = def.margin(inp.margins);
    if (limit === undefined) return { text: formatFigure(measured, unit), status: null };
    // The verdict rule check uses (an infinite gain margin meets any lower limit).
    return { text: formatFigure(measured, unit), status: meetsLimit(measured, limit, def.sense) ? 'ok' : 'no' };
  }
  const check = inp.checks.find((c) => c.name === def.name);
  let status: MetricCell['status'] = null;
  if (check !== undefined) status = check.status === 'pass' ? 'ok' : check.status === 'fail' ? 'no' : 'n/a';
  // A diverged trial meets no limit, whatever its figures up to the divergence say.
  if (inp.diverged && status === 'ok') status = 'no';
  if (def.step !== undefined) {
    const f = head[def.step];
    // The offset is judged by its magnitude (checkRequirements), so it is shown as one.
    const v = f === null ? NaN : def.step === 'steadyStateError' ? Math.abs(f.value) : f.value;
    if (f === null) return { text: NO_STEP, status };
    const text = stepFigureText(def.step, v, (x) => formatFigure(x, ''), '-', units.output);
    return withShort({ text, status }, stepFigureText(def.step, v, (x) => formatFigure(x, '')));
  }
  const v = def.figure!(inp.metrics);
  return withShort({ text: formatFigure(v, unit), status }, formatFigure(v, def.unit));
}

/** The cell with its unit-less text when that differs (a figure in the file's units). */
function withShort(c: MetricCell, short: string): MetricCell {
  return short === c.text ? c : { ...c, short };
}

/**
 * Rows for the metrics panel: every requirement of the file first (time-domain ones checked by
 * analysis, frequency-domain ones from the margins), then further figures up to `maxRows`; a
 * figure in the plant's units (offset, IAE, peak |u|) carries the file's `units`.
 */
export function metricRows(req: Requirements, now: MetricInput, base: MetricInput | null, maxRows: number, units: PlantUnits = NO_UNITS): MetricRow[] {
  const rows: MetricRow[] = [];
  const headNow = headlineMetrics(now.metrics);
  const headBase = base === null ? null : headlineMetrics(base.metrics);
  const add = (def: Def): void => {
    const limit = req[def.req] as number | undefined;
    rows.push({
      label: def.label,
      limit: limit === undefined ? '' : `${def.sense === 'max' ? '≤' : '≥'} ${formatFigure(limit, unitOf(def, units))}`,
      now: cell(def, now, headNow, limit, units),
      base: base === null || headBase === null ? null : cell(def, base, headBase, limit, units),
    });
  };
  for (const def of DEFS) if (req[def.req] !== undefined) add(def);
  for (const name of ALWAYS) {
    if (rows.length >= maxRows) break;
    const def = DEFS.find((d) => d.name === name);
    if (def !== undefined && req[def.req] === undefined) add(def);
  }
  return rows.slice(0, Math.max(0, maxRows));
}
