/**
 * The metrics panel as rows of text: each figure of the trial, the file's limit where there is
 * one, and met / not met, for the current gain set and the baseline. The figures themselves come
 * from analysis/ (trialMetrics, checkRequirements) and the notice source (margins).
 */
import type { RequirementResult, TrialMetrics } from '../analysis/index.js';
import type { Requirements } from '../model/types.js';
import type { MarginsView } from './notices.js';

export interface MetricCell {
  text: string;
  /** true met, false not met, null no limit. */
  pass: boolean | null;
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
}

interface Def {
  name: string;
  label: string;
  unit: string;
  /** Requirement key in Requirements. */
  req: keyof Requirements;
  /** 'max' = measured must not exceed the limit; 'min' = must reach it. */
  sense: 'max' | 'min';
  /** The figure when no requirement asks for it. */
  figure: (m: TrialMetrics) => number;
  margin?: (g: MarginsView) => number;
}

const DEFS: readonly Def[] = [
  { name: 'overshoot_pct', label: 'overshoot', unit: '%', req: 'overshootPct', sense: 'max', figure: (m) => worst(m, (s) => s.overshootPct) },
  { name: 'settling_time', label: 'settling', unit: 's', req: 'settlingTime', sense: 'max', figure: (m) => worst(m, (s) => s.settlingTime) },
  { name: 'rise_time', label: 'rise time', unit: 's', req: 'riseTime', sense: 'max', figure: (m) => worst(m, (s) => s.riseTime) },
  { name: 'steady_state_error', label: 'offset', unit: '', req: 'steadyStateError', sense: 'max', figure: (m) => worst(m, (s) => Math.abs(s.steadyStateError)) },
  { name: 'iae', label: 'IAE', unit: '', req: 'iae', sense: 'max', figure: (m) => m.overall.iae },
  { name: 'max_output', label: 'peak |u|', unit: '', req: 'maxOutput', sense: 'max', figure: (m) => m.overall.maxAbsOutput },
  { name: 'saturated_time', label: 'saturated', unit: 's', req: 'saturatedTime', sense: 'max', figure: (m) => m.overall.saturatedTime },
  { name: 'max_sensitivity', label: 'Ms', unit: '', req: 'maxSensitivity', sense: 'max', figure: () => NaN, margin: (g) => g.maxSensitivity },
  { name: 'gain_margin', label: 'gain margin', unit: '', req: 'gainMargin', sense: 'min', figure: () => NaN, margin: (g) => g.gainMargin },
  { name: 'phase_margin_deg', label: 'phase margin', unit: '°', req: 'phaseMarginDeg', sense: 'min', figure: () => NaN, margin: (g) => g.phaseMarginDeg },
];

/** Figures shown even when the file does not require them, in this order, while rows last. */
const ALWAYS: readonly string[] = ['overshoot_pct', 'settling_time', 'rise_time', 'iae', 'saturated_time', 'steady_state_error'];

function worst(m: TrialMetrics, pick: (s: TrialMetrics['steps'][number]) => number): number {
  let w = NaN;
  for (const s of m.steps) {
    const v = pick(s);
    if (Number.isNaN(v)) return NaN;
    if (Number.isNaN(w) || v > w) w = v;
  }
  return w;
}

/** A figure with 3 significant digits (no exponent for ordinary sizes), or "—" when not reached. */
export function formatFigure(v: number, unit: string): string {
  if (Number.isNaN(v)) return '—';
  if (!Number.isFinite(v)) return v > 0 ? '∞' : '-∞';
  const a = Math.abs(v);
  const s = a !== 0 && (a >= 1e5 || a < 1e-3) ? v.toExponential(1) : String(Number(v.toPrecision(3)));
  return unit === '' ? s : unit === '°' ? `${s}°` : `${s} ${unit}`;
}

function cell(def: Def, inp: MetricInput, limit: number | undefined): MetricCell {
  let measured: number;
  let pass: boolean | null = null;
  if (def.margin !== undefined) {
    if (inp.margins === null) return { text: 'n/a', pass: null };
    if (inp.margins === 'pending') return { text: '…', pass: null };
    if (inp.margins.closedLoopStable === false) return { text: 'unstable', pass: limit === undefined ? null : false };
    measured = def.margin(inp.margins);
    if (limit !== undefined) pass = Number.isFinite(measured) && (def.sense === 'max' ? measured <= limit : measured >= limit);
    // An infinite gain margin (no phase crossover) meets any lower limit.
    if (limit !== undefined && def.sense === 'min' && measured === Infinity) pass = true;
  } else {
    const check = inp.checks.find((c) => c.name === def.name);
    if (check !== undefined) {
      measured = check.measured;
      pass = check.pass;
    } else measured = def.figure(inp.metrics);
  }
  return { text: formatFigure(measured, def.unit), pass };
}

/**
 * Rows for the metrics panel: every requirement of the file first (time-domain ones checked by
 * analysis, frequency-domain ones from the margins), then further figures up to `maxRows`.
 */
export function metricRows(req: Requirements, now: MetricInput, base: MetricInput | null, maxRows: number): MetricRow[] {
  const rows: MetricRow[] = [];
  const add = (def: Def): void => {
    const limit = req[def.req] as number | undefined;
    rows.push({
      label: def.label,
      limit: limit === undefined ? '' : `${def.sense === 'max' ? '≤' : '≥'} ${formatFigure(limit, def.unit)}`,
      now: cell(def, now, limit),
      base: base === null ? null : cell(def, base, limit),
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
