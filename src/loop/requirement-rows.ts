/**
 * Every requirement of a plant file as one row: the time-domain figures of the simulated trial
 * (analysis' checkRequirements: the worst step for step figures) and the frequency-domain figures
 * of the loop at its operating points (the worst point, named). `check`, `run`, the screen and the
 * tuning commands print these rows; none of them decides a verdict of its own.
 */
import { CHECKED_REQUIREMENTS, meetsLimit, type LimitKind, type RequirementInfo, type RequirementResult } from '../analysis/index.js';
import type { PlantUnits } from '../model/index.js';
import type { Requirements } from '../model/types.js';
import type { TrialResult } from '../sim/index.js';
import { worstPoint, type FrequencyFigure, type PointFigures } from './point-margins.js';

/** The one requirement table and its verdict rule are analysis' (requirements.ts). */
export { CHECKED_REQUIREMENTS, meetsLimit } from '../analysis/index.js';
export type { LimitKind, RequirementInfo } from '../analysis/index.js';

/**
 * The unit a requirement's figure is printed with: its fixed unit, or for a figure in the plant's
 * own units the file's unit ('' when the file gives none). IAE integrates the output's error over
 * seconds: "m·s".
 */
export function requirementUnit(info: RequirementInfo, units: PlantUnits): string {
  if (info.of === 'output') return units.output ?? '';
  if (info.of === 'actuator') return units.actuator ?? '';
  if (info.of === 'output_integral') return units.output === null ? '' : `${units.output}·s`;
  return info.unit;
}

/** `requirementUnit` by requirement name ('' for a name looprig does not check). */
export function requirementUnitOf(name: string, units: PlantUnits): string {
  const info = CHECKED_REQUIREMENTS.find((c) => c.name === name);
  return info === undefined ? '' : requirementUnit(info, units);
}

/** A measured figure: NaN = not reached; `available: false` = could not be computed (with the reason in `note`). */
export interface Figure {
  measured: number;
  available: boolean;
  /** Where the figure comes from ("worst step: at 2520 s", "at level 7, 0.83 rad/s") or why it is missing. */
  note: string;
}

/** Verdict of one requirement: analysis' one vocabulary ('n/a': the figure could not be evaluated, the note says why; it fails a check). */
export type { RequirementStatus } from '../analysis/index.js';
import type { RequirementStatus } from '../analysis/index.js';

/** One row of a requirement report. */
export interface RequirementRow {
  requirement: string;
  scope: 'nominal' | 'worst case';
  measured: number;
  limit: number;
  kind: LimitKind;
  unit: string;
  status: RequirementStatus;
  note: string;
}

/** The frequency-domain figures of a loop that is not the plain PID loop (Smith predictor, cascade). */
export interface StructureFigures {
  /** Structure name for notes. */
  name: string;
  maxSensitivity: number;
  gainMargin: number;
  phaseMarginDeg: number;
}

/** Where the frequency figures of a loop come from. */
export type FrequencySource =
  | { kind: 'points'; figures: readonly PointFigures[]; describe: (i: number) => string }
  | { kind: 'structure'; figures: StructureFigures | null; why: string }
  | { kind: 'none'; why: string };

function fmt(v: number, digits = 3): string {
  if (!Number.isFinite(v)) return String(v);
  return String(Number(v.toPrecision(digits)));
}

/** Time-domain figures from a trial's requirement results. */
export function timeFigures(result: TrialResult, checks: readonly RequirementResult[], multipleSteps: boolean): Map<string, Figure> {
  const out = new Map<string, Figure>();
  const diverged = result.status === 'diverged';
  for (const r of checks) {
    // A requirement the trial cannot show (a step figure without a setpoint step) is not available.
    if (r.status === 'n/a') {
      out.set(r.name, { measured: NaN, available: false, note: `not available: ${r.reason}` });
      continue;
    }
    let note = '';
    if (diverged) note = `trial diverged at t = ${fmt(result.divergedAt ?? NaN, 4)} s`;
    else if (!Number.isFinite(r.measured)) note = r.reason ?? '';
    else if (r.at !== null && multipleSteps) note = `worst step: at ${fmt(r.at, 6)} s`;
    out.set(r.name, { measured: diverged ? NaN : r.measured, available: true, note });
  }
  return out;
}

/** Frequency-domain figures asked for by `wanted` from a frequency source. */
export function frequencyFigures(source: FrequencySource, wanted: ReadonlySet<string>): Map<string, Figure> {
  const out = new Map<string, Figure>();
  for (const name of wanted) {
    if (source.kind === 'none') {
      out.set(name, { measured: NaN, available: false, note: `not available: ${source.why}` });
      continue;
    }
    if (source.kind === 'structure') {
      const m = source.figures;
      if (m === null) out.set(name, { measured: NaN, available: false, note: `not available: ${source.why}` });
      else if (name === 'max_sensitivity') out.set(name, { measured: m.maxSensitivity, available: true, note: `${m.name}, loop broken at the actuator` });
      else if (name === 'gain_margin') out.set(name, { measured: m.gainMargin, available: true, note: `${m.name}, loop broken at the actuator` });
      else if (name === 'phase_margin_deg') out.set(name, { measured: m.phaseMarginDeg, available: true, note: `${m.name}, loop broken at the actuator` });
      else out.set(name, { measured: NaN, available: false, note: `not available for structure ${m.name} (not the plain PID loop)` });
      continue;
    }
    const figure = CHECKED_REQUIREMENTS.find((c) => c.name === name)?.frequency;
    const pts = source.figures;
    const usable = pts.filter((p) => p.margins !== null);
    if (figure === undefined || usable.length === 0) {
      const why = pts.find((p) => p.point.problem !== null)?.point.problem ?? 'no linear model of the loop at its operating points';
      out.set(name, { measured: NaN, available: false, note: `not available: ${why}` });
      continue;
    }
    const { index, value } = worstPoint(pts, figure);
    const f = pts[index];
    const m = f.margins;
    const where = pts.length > 1 || !f.point.allLevels ? source.describe(index) : '';
    let detail = '';
    if (m === null) detail = f.point.problem ?? 'no linear model here';
    else if (m.closedLoopStable === false) detail = 'closed loop unstable';
    else if (figure === 'gainMargin') detail = m.gainMargin === Infinity ? 'no phase crossover' : `at ${fmt(m.phaseCrossoverFrequency)} rad/s`;
    else if (figure === 'phaseMarginDeg') detail = m.phaseMarginDeg === Infinity ? '|L| never reaches 1' : `at ${fmt(m.crossoverFrequency)} rad/s`;
    else if (figure === 'maxSensitivity') detail = `at ${fmt(m.maxSensitivityFrequency)} rad/s`;
    else if (figure === 'bandwidth') detail = Number.isFinite(m.bandwidth) ? '|S| reaches 1/√2' : '|S| never reaches 1/√2 below Nyquist';
    else if (figure === 'dampingRatio') detail = f.dampingPole ? `dominant pole ${fmtPole(f.dampingPole)} rad/s` : 'no closed-loop poles';
    const lead = pts.length > 1 ? 'worst ' : '';
    out.set(name, {
      measured: m === null ? NaN : value,
      available: m !== null,
      note: [where ? `${lead}at ${where}` : '', detail].filter((s) => s !== '').join(', '),
    });
  }
  return out;
}

const fmtPole = (p: { re: number; im: number }): string => (Math.abs(p.im) > 0 ? `${fmt(p.re)} ± ${fmt(Math.abs(p.im))}j` : fmt(p.re));

/** The row of one requirement from its figure, its unit the file's where the figure is in the plant's units. */
export function requirementRow(info: RequirementInfo, scope: RequirementRow['scope'], limit: number, f: Figure, units: PlantUnits): RequirementRow {
  const status: RequirementStatus = !f.available ? 'n/a' : meetsLimit(f.measured, limit, info.kind) ? 'pass' : 'fail';
  return { requirement: info.name, scope, measured: f.measured, limit, kind: info.kind, unit: requirementUnit(info, units), status, note: f.note };
}

/** The requirements a file sets, in report order. */
export function askedRequirements(req: Requirements): RequirementInfo[] {
  return CHECKED_REQUIREMENTS.filter((c) => req[c.key] !== undefined);
}
