/**
 * `looprig compare FILE [--json]`: every candidate controller (the file's `compare:` list, or
 * candidates chosen from the diagnosis) on the same trial of the same plant, one table row each:
 * structure, gains, step and disturbance figures, actuator use, margins of the linearised loop,
 * what held a tuned candidate back, and the worst case over the file's uncertainty ranges.
 */
import { countOption, onePositional, parseCommandArgs } from '../parse-command.js';
import { enforceFileBudget, LIMIT_OPTIONS, MAX_COUNTS } from '../budget-check.js';
import { requirementUnitOf } from '../../loop/index.js';
import { plantUnits, quantityLabel } from '../../model/index.js';
import type { PlantSpec } from '../../model/types.js';
import { bindingSummary, compareCandidates, DEFAULT_EVALUATIONS, sweepCaseCount, tuningContext, type CandidateReport, type CompareResult } from '../../tune/index.js';
import { UserError } from '../errors.js';
import { rankedFigureText } from '../../analysis/index.js';
import { num, secs, table } from '../format.js';
import type { Io } from '../io.js';
import { finiteOrNull, snakeKeys, toJson } from '../json.js';
import { loadPlantFile } from '../load-plant-file.js';

export const COMPARE_USAGE = `Usage: looprig compare FILE [options]

Runs every candidate controller on the plant file's trial and prints one row per candidate:
structure, gains, rise time, overshoot, settling time (worst over the setpoint steps), IAE over
the setpoint steps and over the disturbance events, peak controller output, time at an
actuator limit, Ms and gain/phase margins of the linearised loop, and the worst case over the
file's uncertainty ranges. The candidates are the file's compare: list; without one they are
chosen from the diagnosis (dead time -> Smith predictor, nonlinear plant -> gain schedule,
stepped model disturbance -> feedforward, faster inner measurement -> cascade), and the table
says which finding led to each. Candidates without gains start from their structure's rule
gains and are then tuned by the optimiser on the full plant to the same Ms target and under the
file's requirements, so each structure shows what it can do; the 'binds' column says what held
it back (Ms, a requirement, actuator saturation, the evaluation budget).

Options:
  --json           one JSON document on stdout
  --ms M           Ms target of the tuned candidates (default: the file's max_sensitivity
                   requirement, else 1.6)
  --evaluations N  optimiser evaluations per tuned candidate (default 300; 0 = rule gains only)
  --samples N      Monte-Carlo samples over the uncertainty per candidate, besides the corners (default 0)
  --nominal        skip the uncertainty sweep
  -h, --help     show this text
`;

interface CompareArgs {
  file: string;
  json: boolean;
  samples: number;
  /** --no-limits: the resource budget lifted. */
  noLimits: boolean;
  nominal: boolean;
  ms: number | undefined;
  evaluations: number;
}

function parseCompareArgs(args: readonly string[]): CompareArgs | 'help' {
  const { values, positionals } = parseCommandArgs('compare', args, {
    json: { type: 'boolean' },
    samples: { type: 'string' },
    nominal: { type: 'boolean' },
    ms: { type: 'string' },
    evaluations: { type: 'string' },
    help: { type: 'boolean', short: 'h' },
    ...LIMIT_OPTIONS,
  });
  if (values.help) return 'help';
  onePositional('compare', positionals);
  const samples = countOption('compare', 'samples', values.samples, 0, 0, MAX_COUNTS.samples);
  const evaluations = countOption('compare', 'evaluations', values.evaluations, DEFAULT_EVALUATIONS, 0, MAX_COUNTS.evaluations);
  const ms = values.ms === undefined ? undefined : Number(values.ms);
  if (ms !== undefined && (!(ms > 1) || !Number.isFinite(ms))) throw new UserError('compare: --ms must be a number > 1');
  return { file: positionals[0], json: values.json === true, samples, nominal: values.nominal === true, ms, evaluations, noLimits: values['no-limits'] === true };
}

/**
 * Candidates compared when the file lists none, at most: the file's controller, its plain form
 * and one structure per diagnosis finding (tune/compare.ts chooseCandidates); for the budget.
 */
const COMPARE_DEFAULT_CANDIDATES = 6;

function gainsText(c: CandidateReport): string {
  const r = c.row;
  if (c.controller === null) return '-';
  const parts = [`kc=${num(r.kc)}`];
  if (Number.isFinite(r.ti)) parts.push(`ti=${secs(r.ti)}`);
  if (r.td > 0) parts.push(`td=${secs(r.td)}`);
  return parts.join(' ');
}

function worstText(c: CandidateReport): string {
  const w = c.row.worst;
  if (w === null) return '-';
  if (w.anyDiverged) return `diverges (${w.cases} cases)`;
  const ms = w.worstMs === Infinity ? 'unstable' : num(w.worstMs, 3);
  const os = rankedFigureText('overshootPct', w.worstOvershootPct, (x) => num(x, 3));
  const ts = rankedFigureText('settlingTime', w.worstSettlingTime, num);
  return `os ${os} ts ${ts} IAE ${num(w.worstIae, 3)} Ms ${ms}`;
}

/** The table and notes as text. */
export function compareText(plant: PlantSpec, r: CompareResult): string {
  const lines: string[] = [
    `${plant.name}: ${r.candidates.length} candidates on the same trial` +
      (r.sweepCases > 0 ? `, worst case over ${r.sweepCases + 1} plant cases` : ''),
  ];
  if (r.source === 'chosen') {
    const kinds = r.flags.map((f) => `${f.kind} (${f.severity})`);
    lines.push(`  no compare: list in the file; candidates chosen from the diagnosis: ${kinds.length ? kinds.join(', ') : 'no findings'}`);
  }
  if (r.candidates.some((c) => c.gainsFrom === 'tuned')) {
    lines.push(`  candidates without gains tuned by the optimiser to Ms <= ${r.msTarget} and the file's requirements`);
  } else if (r.candidates.some((c) => c.gainsFrom === 'rule')) {
    lines.push('  candidates without gains run their rule gains, not tuned further (no optimiser budget)');
  }
  lines.push('');
  // Columns in the plant's units name the file's unit in their heading, so the cells stay narrow.
  const units = plantUnits(plant);
  const iae = requirementUnitOf('iae', units);
  const rows: string[][] = [
    ['candidate', 'structure', 'gains', 'rise', 'overshoot', 'settling', quantityLabel('IAE sp', iae || null), quantityLabel('IAE dist', iae || null),
      quantityLabel('peak u', units.actuator), 'sat', 'Ms', 'GM', 'PM', 'binds', 'worst case'],
  ];
  for (const c of r.candidates) {
    const w = c.row;
    if (c.controller === null || c.unavailable !== null) {
      rows.push([c.name, c.structure, '-', '-', '-', '-', '-', '-', '-', '-', '-', '-', '-', '-', 'not set up']);
      continue;
    }
    const diverged = w.status === 'diverged';
    rows.push([
      c.name,
      c.structure,
      gainsText(c),
      rankedFigureText('riseTime', w.riseTime, num),
      rankedFigureText('overshootPct', w.overshootPct, (x) => num(x, 3)),
      rankedFigureText('settlingTime', w.settlingTime, num),
      diverged ? 'diverged' : num(w.iaeSetpoint, 4),
      diverged ? 'diverged' : num(w.iaeDisturbance, 4),
      num(w.peakOutput, 4),
      secs(w.saturatedTime),
      w.maxSensitivity === Infinity ? 'unstable' : num(w.maxSensitivity, 3),
      num(w.gainMargin, 3, Number.isNaN(w.gainMargin) ? '-' : 'inf'),
      Number.isFinite(w.phaseMarginDeg) ? `${num(w.phaseMarginDeg, 3)} deg` : '-',
      bindingSummary(c),
      worstText(c),
    ]);
  }
  lines.push(table(rows), '');
  for (const c of r.candidates) {
    lines.push(`${c.name}: ${c.origin.reason}${c.origin.flags.length ? ` [${c.origin.flags.join(', ')}]` : ''}`);
    if (c.row.detail) lines.push(`  ${c.row.detail}`);
    if (c.unavailable !== null) lines.push(`  not set up: ${c.unavailable}`);
    for (const b of c.basis) lines.push(`  from ${b}`);
    if (c.row.binding.length > 0) lines.push(`  binds: ${c.row.binding.join('; ')}`);
    for (const n of c.notes) lines.push(`  note: ${n}`);
  }
  for (const n of r.notes) lines.push(`note: ${n}`);
  return `${lines.join('\n')}\n`;
}

/** The comparison as one JSON document. */
export function compareJson(file: string, plant: PlantSpec, r: CompareResult): unknown {
  return {
    plant: { name: plant.name, file },
    // The units of the output and the actuator, once: every number below is a plain number.
    units: plantUnits(plant),
    source: r.source,
    flags: r.flags.map((f) => ({ kind: f.kind, severity: f.severity, evidence: f.evidence })),
    sweep_cases: r.sweepCases,
    ms_target: r.msTarget,
    candidates: r.candidates.map((c) => {
      const w = c.row;
      const ext = c.controller?.extension ?? null;
      return {
        name: c.name,
        structure: c.structure,
        origin: { kind: c.origin.kind, flags: c.origin.flags, reason: c.origin.reason },
        status: w.status,
        unavailable: c.unavailable,
        gains: c.controller ? { kc: w.kc, ti: finiteOrNull(w.ti), td: w.td, b: c.controller.gains.b, c: c.controller.gains.c } : null,
        // Core extension records are camelCase (timeConstant, antiWindup): snake_case like every key.
        structure_settings: snakeKeys(ext),
        gains_from: c.gainsFrom,
        detail: w.detail,
        rise_time: finiteOrNull(w.riseTime),
        overshoot_pct: finiteOrNull(w.overshootPct),
        settling_time: finiteOrNull(w.settlingTime),
        iae_setpoint: finiteOrNull(w.iaeSetpoint),
        iae_disturbance: finiteOrNull(w.iaeDisturbance),
        peak_output: finiteOrNull(w.peakOutput),
        saturated_time: finiteOrNull(w.saturatedTime),
        max_sensitivity: finiteOrNull(w.maxSensitivity),
        gain_margin: finiteOrNull(w.gainMargin),
        phase_margin_deg: finiteOrNull(w.phaseMarginDeg),
        margins_loop: c.margins?.loop ?? null,
        tuning: c.tuning && {
          ms_target: c.tuning.msTarget,
          start_cost: finiteOrNull(c.tuning.startCost),
          cost: finiteOrNull(c.tuning.cost),
          evaluations: c.tuning.evaluations,
          stopped_by: c.tuning.stoppedBy,
          feasible: c.tuning.feasible,
          binding: c.tuning.binding,
        },
        worst_case: w.worst && {
          cases: w.worst.cases,
          any_diverged: w.worst.anyDiverged,
          overshoot_pct: finiteOrNull(w.worst.worstOvershootPct),
          settling_time: finiteOrNull(w.worst.worstSettlingTime),
          iae: finiteOrNull(w.worst.worstIae),
          max_sensitivity: finiteOrNull(w.worst.worstMs),
        },
        basis: c.basis,
        notes: c.notes,
      };
    }),
    notes: r.notes,
  };
}

/** `looprig compare ...` */
export async function compareCommand(args: readonly string[], io: Io): Promise<number> {
  const options = parseCompareArgs(args);
  if (options === 'help') {
    io.out(COMPARE_USAGE);
    return 0;
  }
  const loaded = loadPlantFile(options.file, io);
  const { plant } = loaded;
  // Each candidate's tuning (at most `evaluations` trials), its trial and its sweep; the
  // candidates are the file's list or the default few.
  const sweeps = options.nominal ? 1 : sweepCaseCount(plant, { samples: options.samples, nominal: false }) + 1;
  const built = enforceFileBudget(loaded, options.file, io, {
    noLimits: options.noLimits,
    runs: (plant.compare?.length ?? COMPARE_DEFAULT_CANDIDATES) * (sweeps + options.evaluations),
    given: options.samples > 0 ? { runs: `looprig: compare: --samples ${options.samples}` } : {},
  });
  const result = compareCandidates(plant, {
    context: tuningContext(plant, built.dynamics),
    robustness: options.nominal ? false : { samples: options.samples },
    msTarget: options.ms,
    evaluations: options.evaluations,
  });
  io.out(options.json ? toJson(compareJson(options.file, plant, result)) : compareText(plant, result));
  return 0;
}
