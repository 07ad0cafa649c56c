/**
 * `looprig check FILE|DIR... [--json] [--shard I/N] [--svg DIR]`: validate each plant file, run
 * its trial, evaluate its requirements (time and frequency domain, and the worst case over the
 * uncertainty box when the file sets `worst_case: true`) and print one table.
 *
 * Exit status: 0 every requirement of every file passes; 1 some requirement fails or cannot be
 * evaluated (status n/a, printed N/A: e.g. overshoot_pct on a trial without a setpoint step; a CI job
 * must not pass on a requirement nobody checked, so it is counted as not passing and printed with its reason); 2 a file is invalid (not a plant file, YAML
 * or schema errors, unreadable), bad arguments, or no plant file found. 2 wins over 1.
 */
import { parseCommandArgs } from '../parse-command.js';
import { mkdirSync } from 'node:fs';
import { join } from 'node:path';
import { buildLoop, STREAM_ROWS } from '../../loop/index.js';
import { compilePlant, formatDiagnostic, loadPlant, plantUnits, type PlantUnits } from '../../model/index.js';
import { DEFAULT_BUDGET, plantBudget } from '../../sim/index.js';
import { LIMIT_OPTIONS, refusalLine } from '../budget-check.js';
import { readFailure } from '../read-bounded.js';
import { MAX_PLANT_BYTES } from '../load-plant-file.js';
import { StructureUnavailable } from '../../tune/index.js';
import { checkPlant, type CheckRow, type PlantCheck } from '../check-plant.js';
import type { PlantSpec } from '../../model/types.js';
import { UserError } from '../errors.js';
import { hasPlantKeysAtTop, listYamlFiles, parseShard, plantFileText, shardOf, topLevelKeys, type PlantFileEntry } from '../find-plant-files.js';
import { num, table } from '../format.js';
import { EncodingError, type Io } from '../io.js';
import { finiteOrNull, toJson } from '../json.js';
import type { trialPlotSvg } from '../trial-plot.js';
import { writeOutput } from '../write-output.js';

export const CHECK_USAGE = `Usage: looprig check FILE|DIR... [options]

Validates each plant file, runs its trial and checks its requirements: overshoot_pct, rise_time,
settling_time, steady_state_error, iae, max_output, saturated_time (from the simulated trial) and
bandwidth, damping_ratio, max_sensitivity, gain_margin, phase_margin_deg (from the loop linearised
at the trial's starting point). With 'worst_case: true' under loop.requirements each one is also
checked as its worst case over the file's uncertainty ranges (nominal plus every corner).
Folders are searched for *.yaml / *.yml files with top-level 'model' and 'loop'; other YAML files
found that way are skipped (named explicitly, they are an error).

Options:
  --json          one JSON document on stdout
  --shard I/N     check only shard I of N (1 <= I <= N): the YAML files at positions I, I+N,
                  I+2N ... of the sorted list of YAML files named or found, so N CI jobs together
                  check every plant file exactly once, each reading only its own files
  --svg DIR       write a plot of each failing file's trial to DIR (created if needed)
  -h, --help      show this text

Step requirements are the worst setpoint step, measured against the value the output settles at;
on a trial without a setpoint step they cannot be evaluated (N/A, with the reason).

Exit status: 0 all pass, 1 a requirement failed (or could not be evaluated: N/A),
2 an invalid file, bad arguments, or no plant file found.
`;

interface CheckArgs {
  paths: string[];
  json: boolean;
  shard: { index: number; count: number } | null;
  svg: string | null;
  /** --no-limits: the resource budget lifted. */
  noLimits: boolean;
}

function parseCheckArgs(args: readonly string[]): CheckArgs | 'help' {
  const { values, positionals } = parseCommandArgs('check', args, {
    json: { type: 'boolean' },
    shard: { type: 'string' },
    svg: { type: 'string' },
    help: { type: 'boolean', short: 'h' },
    ...LIMIT_OPTIONS,
  });
  if (values.help) return 'help';
  if (positionals.length === 0) throw new UserError('check: missing FILE or DIR');
  return {
    paths: positionals,
    json: values.json === true,
    shard: values.shard === undefined ? null : parseShard(values.shard),
    svg: values.svg ?? null,
    noLimits: values['no-limits'] === true,
  };
}

/** The outcome for one file of the list. */
export interface FileOutcome {
  file: string;
  status: 'pass' | 'fail' | 'invalid';
  plant: string | null;
  /** The file's units (null for an invalid file). */
  units: PlantUnits | null;
  /**
   * The verdicts: rows and notes. The nominal trial is dropped once its plot (if any) is written,
   * and the figures map too (the rows carry what is printed): a folder's outcomes are held to the end.
   */
  check: Pick<PlantCheck, 'rows' | 'pass' | 'notes'> | null;
  /** Why the file is invalid (already printed to stderr as FILE:LINE:COL lines). */
  errors: string[];
  warnings: string[];
  svg: string | null;
}

/**
 * Load and check one file (its `text` when already read); diagnostics go to stderr. The file is
 * parsed once, by the loader. The nominal trial is kept only to plot a failing file (`svg`: --svg),
 * right here: nothing of a file's trial outlives its check, so memory stays flat in the number of
 * files.
 */
/** Where failing files' plots go (--svg) and the plot writer, loaded only then (the SVG code is not on check's start-up path). */
interface PlotTarget {
  dir: string;
  plot: typeof trialPlotSvg;
}

function checkFile(entry: PlantFileEntry, io: Io, noLimits: boolean, svg: PlotTarget | null, text?: string): FileOutcome {
  const file = entry.path;
  const invalid = (errors: string[]): FileOutcome => {
    for (const e of errors) io.err(`${e}\n`);
    return { file, status: 'invalid', plant: null, units: null, check: null, errors, warnings: [], svg: null };
  };
  if (text === undefined) {
    try {
      text = io.readText(file, MAX_PLANT_BYTES);
    } catch (error) {
      if (error instanceof EncodingError) return invalid([error.message]);
      return invalid([`${file}: cannot read: ${readFailure(error)}`]);
    }
  }
  // Both keys at the start of a line: a plant file, no parse to decide. Otherwise the keys are
  // read (a parse) for the message.
  const keys = hasPlantKeysAtTop(text) ? ['model', 'loop'] : topLevelKeys(text);
  if (keys !== null && !(keys.includes('model') && keys.includes('loop'))) {
    return invalid([
      `${file}:1:1: not a plant file: a plant file is a YAML mapping with top-level 'model' and 'loop' ` +
        `(this one has ${keys.length > 0 ? keys.join(', ') : 'no keys'})`,
    ]);
  }
  const loaded = loadPlant(text, file);
  const errors = loaded.diagnostics.filter((d) => d.severity === 'error').map((d) => formatDiagnostic(d, text, file));
  const warnings = loaded.diagnostics.filter((d) => d.severity !== 'error').map((d) => formatDiagnostic(d, text, file));
  if (errors.length > 0 || loaded.plant === undefined) {
    if (keys === null && errors.length === 0) errors.push(`${file}:1:1: not a plant file`);
    for (const w of warnings) io.err(`${w}\n`);
    return invalid(errors);
  }
  for (const w of warnings) io.err(`${w}\n`);
  // The nominal trial's budget (a worst-case sweep repeats it per corner), on the loop that runs:
  // the plant is compiled and its loop built once.
  const dynamics = compilePlant(loaded.plant);
  const built = buildLoop(loaded.plant, { dynamics });
  const over = plantBudget(loaded.plant, built, text, file, { limits: noLimits ? null : DEFAULT_BUDGET, heldRows: STREAM_ROWS });
  if (over.length > 0) return invalid(over.map(refusalLine));
  let check: PlantCheck;
  try {
    check = checkPlant(loaded.plant, { loop: built });
  } catch (error) {
    // A structure this plant cannot support (e.g. a Smith predictor on an integrating plant).
    if (error instanceof StructureUnavailable) return invalid([`${file}: ${error.message}`]);
    throw error;
  }
  const verdicts = { rows: check.rows, pass: check.pass, notes: check.notes };
  const outcome: FileOutcome = { file, status: check.pass ? 'pass' : 'fail', plant: loaded.plant.name, units: plantUnits(loaded.plant), check: verdicts, errors: [], warnings, svg: null };
  if (svg !== null && outcome.status === 'fail') outcome.svg = writePlot(loaded.plant, file, check.rows, check.nominal, svg, io);
  return outcome;
}

/** Write the plot of a failing file's nominal trial into `dir` (created if needed). @returns its path. */
function writePlot(plant: PlantSpec, file: string, rows: readonly CheckRow[], nominal: PlantCheck['nominal'], { dir, plot }: PlotTarget, io: Io): string {
  try {
    mkdirSync(dir, { recursive: true });
  } catch (error) {
    throw new UserError(`check: cannot create ${dir}: ${(error as Error).message}`);
  }
  const failed = rows.filter((r) => r.status !== 'pass').map((r) => r.requirement);
  const path = join(dir, plotName(file));
  const svg = plot({
    plant,
    file,
    trace: nominal.result.trace,
    metrics: nominal.metrics,
    note: `FAILED: ${[...new Set(failed)].join(', ')}`,
  });
  writeOutput(io, path, svg, {}, 'check');
  return path;
}

/** A file name for a plot of `file`: its path with separators turned into "__". */
export function plotName(file: string): string {
  const base = file
    .replace(/\\/g, '/')
    .replace(/^(\.\.?\/)+/, '')
    .replace(/^\/+/, '')
    .replace(/\.ya?ml$/i, '')
    .replace(/\//g, '__')
    .replace(/[^A-Za-z0-9_.-]/g, '_');
  return `${base || 'plant'}.svg`;
}

/** `looprig check ...` */
export async function checkCommand(args: readonly string[], io: Io): Promise<number> {
  const a = parseCheckArgs(args);
  if (a === 'help') {
    io.out(CHECK_USAGE);
    return 0;
  }
  // The shard is taken from the list of YAML files before any is read: a shard reads only its own.
  const listed = listYamlFiles(a.paths, io);
  const mine = shardOf(listed, a.shard);
  const svg: PlotTarget | null = a.svg === null ? null : { dir: a.svg, plot: (await import('../trial-plot.js')).trialPlotSvg };
  const outcomes: FileOutcome[] = [];
  const skipped: string[] = [];
  for (const entry of mine) {
    let text: string | undefined;
    if (!entry.explicit) {
      const found = plantFileText(entry.path, io);
      if (found === null) {
        skipped.push(entry.path);
        continue;
      }
      if (found !== '') text = found;
    }
    outcomes.push(checkFile(entry, io, a.noLimits, svg, text));
  }
  if (outcomes.length === 0 && (a.shard === null || listed.length === 0)) {
    const why = skipped.length > 0 ? ` (${skipped.length} YAML file${skipped.length === 1 ? '' : 's'} without top-level model and loop skipped)` : '';
    throw new UserError(`check: no plant files found in ${a.paths.join(', ')}${why}`);
  }
  const invalid = outcomes.filter((o) => o.status === 'invalid').length;
  const failed = outcomes.filter((o) => o.status === 'fail').length;
  const code = invalid > 0 ? UserError.USAGE : failed > 0 ? UserError.FAIL : 0;
  io.out(a.json ? toJson(checkJson(outcomes, listed.length, skipped, a.shard, code)) : checkText(outcomes, listed.length, a.shard));
  return code;
}

function unitOf(r: CheckRow, v: number): string {
  if (!Number.isFinite(v) || r.unit === '') return '';
  return r.unit === '%' ? ' %' : ` ${r.unit}`;
}

function measuredText(r: CheckRow): string {
  if (r.status === 'n/a') return 'n/a';
  if (r.measured === Infinity) return 'inf';
  if (!Number.isFinite(r.measured)) return '-';
  return `${num(r.measured, 4)}${unitOf(r, r.measured)}`;
}

/** The human-readable table. */
export function checkText(outcomes: readonly FileOutcome[], total: number, shard: { index: number; count: number } | null): string {
  const rows: string[][] = [['FILE', 'REQUIREMENT', 'CASE', 'MEASURED', 'LIMIT', 'RESULT', 'NOTE']];
  for (const o of outcomes) {
    if (o.status === 'invalid') {
      rows.push([o.file, '-', '-', '-', '-', 'INVALID', `${o.errors.length} error${o.errors.length === 1 ? '' : 's'} (see above)`]);
      continue;
    }
    const c = o.check!;
    if (c.rows.length === 0) rows.push([o.file, '(no requirements)', '-', '-', '-', 'pass', 'the trial ran']);
    for (const r of c.rows) {
      rows.push([
        o.file,
        r.requirement,
        r.scope,
        measuredText(r),
        `${r.kind === 'max' ? '<=' : '>='} ${num(r.limit, 4)}${unitOf(r, r.limit)}`,
        r.status === 'pass' ? 'pass' : r.status === 'fail' ? 'FAIL' : 'N/A',
        r.note,
      ]);
    }
  }
  const lines = [table(rows)];
  const notes = outcomes.flatMap((o) => [...(o.check?.notes ?? []).map((n) => `${o.file}: ${n}`), ...(o.svg ? [`${o.file}: plot written to ${o.svg}`] : [])]);
  if (notes.length > 0) lines.push('', 'notes:', ...notes.map((n) => `  ${n}`));
  const pass = outcomes.filter((o) => o.status === 'pass').length;
  const fail = outcomes.filter((o) => o.status === 'fail').length;
  const inv = outcomes.filter((o) => o.status === 'invalid').length;
  const where = shard ? ` (shard ${shard.index}/${shard.count} of ${total} files)` : '';
  lines.push('', `${outcomes.length} file${outcomes.length === 1 ? '' : 's'}${where}: ${pass} pass, ${fail} fail, ${inv} invalid`);
  return `${lines.join('\n')}\n`;
}

/** The `--json` document. */
export function checkJson(
  outcomes: readonly FileOutcome[],
  total: number,
  skipped: readonly string[],
  shard: { index: number; count: number } | null,
  exitCode: number,
): unknown {
  return {
    shard: shard && { index: shard.index, count: shard.count, of_files: total },
    exit_code: exitCode,
    summary: {
      files: outcomes.length,
      pass: outcomes.filter((o) => o.status === 'pass').length,
      fail: outcomes.filter((o) => o.status === 'fail').length,
      invalid: outcomes.filter((o) => o.status === 'invalid').length,
    },
    files: outcomes.map((o) => ({
      file: o.file,
      plant: o.plant,
      // The units of the file's output and actuator once; every number below is a plain number.
      units: o.units,
      status: o.status,
      errors: o.errors,
      warnings: o.warnings,
      requirements: (o.check?.rows ?? []).map((r) => ({
        name: r.requirement,
        case: r.scope,
        measured: finiteOrNull(r.measured),
        /** GM or PM of a loop that never crosses, Ms of an unstable loop. */
        infinite: r.measured === Infinity,
        limit: r.limit,
        kind: r.kind,
        unit: r.unit,
        status: r.status,
        pass: r.status === 'pass',
        note: r.note,
      })),
      notes: o.check?.notes ?? [],
      svg: o.svg,
    })),
    skipped,
  };
}
