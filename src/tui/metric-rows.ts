/**
 * The metrics panel as rows of text: each figure of the trial, the file's limit where there is
 * one, and met / not met / n/a, for the current gain set and the baseline. The figures themselves
 * come from analysis/ (headlineMetrics: the worst step; checkRequirements) and the notice source
 * (margins); the words for a figure not reached / not settled are analysis' (stepFigureText).
 */
import { headlineMetrics, stepFigureText, timeFigure, type HeadlineMetrics, type RequirementResult, type TrialMetrics } from '../analysis/index.js';
import { CHECKED_REQUIREMENTS, meetsLimit, requirementUnit, type RequirementInfo } from '../loop/index.js';
import { NO_UNITS, type PlantUnits } from '../model/index.js';
import type { Requirements } from '../model/types.js';
import type { MarginsView } from './notices.js';

export interface MetricCell {
  text: string;
  /**
   * The text without its unit (the file's, or a bandwidth's rad/s), for a column too narrow for it
   * (the limit beside it names the unit); absent when the figure carries no such unit.
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
  // A degree sign hugs its number ('deg' is the requirement table's unit of a phase).
  return unit === '' ? s : unit === '°' || unit === 'deg' ? `${s}°` : `${s} ${unit}`;
}

function cell(def: RequirementInfo, inp: MetricInput, head: HeadlineMetrics, limit: number | undefined, units: PlantUnits): MetricCell {
  const unit = requirementUnit(def, units);
  if (def.frequency !== undefined) {
    if (inp.margins === null) return { text: 'n/a', status: null };
    if (inp.margins === 'pending') return { text: '…', status: null };
    if (inp.margins.closedLoopStable === false) return { text: 'unstable', status: limit === undefined ? null : 'no' };
    const measured = inp.margins[def.frequency];
    // Not computed for this loop (bandwidth and damping of a structure that is not the plain PID loop).
    if (measured === undefined) return { text: 'n/a', status: limit === undefined ? null : 'n/a' };
    // The verdict rule check uses (an infinite gain margin meets any lower limit).
    const status = limit === undefined ? null : meetsLimit(measured, limit, def.kind) ? 'ok' : 'no';
    // A narrow panel shows the bandwidth without 'rad/s' (the limit beside names it); a degree sign stays.
    return withShort({ text: formatFigure(measured, unit), status }, formatFigure(measured, unit === 'deg' ? unit : ''));
  }
  const check = inp.checks.find((c) => c.name === def.name);
  let status: MetricCell['status'] = null;
  if (check !== undefined) status = check.status === 'pass' ? 'ok' : check.status === 'fail' ? 'no' : 'n/a';
  // A diverged trial meets no limit, whatever its figures up to the divergence say.
  if (inp.diverged && status === 'ok') status = 'no';
  // The figure checkRequirements judges (the offset by its magnitude, so it is shown as one).
  const f = timeFigure(def, inp.metrics, head);
  if (f === null) return { text: NO_STEP, status };
  if (def.step !== undefined) {
    const text = stepFigureText(def.step, f.value, (x) => formatFigure(x, ''), '-', units.output);
    return withShort({ text, status }, stepFigureText(def.step, f.value, (x) => formatFigure(x, '')));
  }
  return withShort({ text: formatFigure(f.value, unit), status }, formatFigure(f.value, def.unit));
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
  const add = (def: RequirementInfo): void => {
    const limit = req[def.key] as number | undefined;
    rows.push({
      label: def.label,
      limit: limit === undefined ? '' : `${def.kind === 'max' ? '≤' : '≥'} ${formatFigure(limit, requirementUnit(def, units))}`,
      now: cell(def, now, headNow, limit, units),
      base: base === null || headBase === null ? null : cell(def, base, headBase, limit, units),
    });
  };
  for (const def of CHECKED_REQUIREMENTS) if (req[def.key] !== undefined) add(def);
  for (const name of ALWAYS) {
    if (rows.length >= maxRows) break;
    const def = CHECKED_REQUIREMENTS.find((d) => d.name === name);
    if (def !== undefined && req[def.key] === undefined) add(def);
  }
  return rows.slice(0, Math.max(0, maxRows));
}
