/**
 * `looprig run FILE`: simulate the plant file's trial with its controller and report the metrics.
 * A diverging loop is a result (exit 0, reported clearly); a bad file or bad arguments exit 2.
 */
import { onePositional, parseCommandArgs, timeOption } from '../parse-command.js';
import { headlineMetrics, headlineSources, stepFigureText } from '../../analysis/index.js';
import type { RequirementResult, StepFigure, TrialMetrics } from '../../analysis/index.js';
import { compilePlant, MIN_STEP, plantUnits, withUnit } from '../../model/index.js';
import { askedRequirements, buildLoop, requirementUnitOf, STREAM_ROWS } from '../../loop/index.js';
import type { ControllerStructure, PlantSpec } from '../../model/types.js';
import type { Trace, TrialResult } from '../../sim/types.js';
import type { TrialChunk } from '../../sim/index.js';
import { UserError } from '../errors.js';
import { num, secs, table } from '../format.js';
import type { Io } from '../io.js';
import { finiteOrNull, toJson } from '../json.js';
import { loadPlantFile, parseOverrides } from '../load-plant-file.js';
import type { Override } from '../load-plant-file.js';
import { runMetricsJson, type RunReport } from '../run-report.js';
import { writeRunSvg } from '../run-svg.js';
import { writeFrequencySvg } from '../frequency-svg.js';
import { enforceBudget, LIMIT_OPTIONS, refusalLine } from '../budget-check.js';
import { DEFAULT_BUDGET, plantBudget } from '../../sim/index.js';
import { simulatePlant } from '../simulate-plant.js';
import { USAGE } from '../usage.js';
import { writeOutput } from '../write-output.js';
import { tuningContext, tweakChangeText, tweakGuide, TWEAK_FIGURE_HEADS, TWEAK_FIGURES, TWEAK_STEP, type TweakFigure, type TweakGuide } from '../../tune/index.js';

export type { RunReport } from '../run-report.js';

export interface RunOptions {
  file: string;
  json: boolean;
  csv: string | null;
  /** Write the trial plot as SVG to this path. */
  svg: string | null;
  /** Write the frequency plots (Bode, |S| |T|, Nyquist at the worst operating point) as SVG to this path. */
  svgFrequency?: string | null;
  overrides: Override[];
  /** Trial duration override, s. */
  duration: number | null;
  /** Integration step override, s. */
  step: number | null;
  /** --no-limits: the resource budget lifted. */
  noLimits: boolean;
  /** --tweak: add the tweak guide (±10 % on each parameter, simulated) and print its table. */
  tweak?: boolean;
}

/** Parse the arguments of `run`; any mistake is a `UserError` with exit status 2. */
export function parseRunArgs(args: readonly string[]): RunOptions | 'help' {
  const { values, positionals } = parseCommandArgs('run', args, {
    json: { type: 'boolean' },
    csv: { type: 'string' },
    svg: { type: 'string' },
    'svg-frequency': { type: 'string' },
    set: { type: 'string', multiple: true },
    duration: { type: 'string' },
    step: { type: 'string' },
    tweak: { type: 'boolean' },
    help: { type: 'boolean', short: 'h' },
    ...LIMIT_OPTIONS,
  });
  if (values.help) return 'help';
  onePositional('run', positionals);
  return {
    file: positionals[0],
    json: values.json === true,
    csv: values.csv ?? null,
    svg: values.svg ?? null,
    svgFrequency: values['svg-frequency'] ?? null,
    overrides: parseOverrides(values.set ?? []),
    duration: timeOption('run', 'duration', values.duration),
    step: timeOption('run', 'step', values.step, { min: MIN_STEP }),
    noLimits: values['no-limits'] === true,
    tweak: values.tweak === true,
  };
}

/**
 * When the tweak guide is computed: 'asked' (--tweak: its runs are held to the budget like the
 * trial's, over it is exit 2), 'within-budget' (run --json without --tweak: computed when its runs
 * fit the budget, else left out with a warning saying why), 'none'.
 */
export type TweakWhen = 'asked' | 'within-budget' | 'none';

/** Load, apply overrides, simulate and measure. Prints only loader diagnostics (stderr). */
export function runPlant(options: RunOptions, io: Io, tweak: TweakWhen = options.tweak === true ? 'asked' : 'none'): RunReport {
  const loaded = loadPlantFile(options.file, io, options.overrides);
  const plant = withRunOverrides(loaded.plant, options);
  // Compiled and built once: the budget is worked out on the loop that runs.
  const dynamics = compilePlant(plant);
  const built = buildLoop(plant, { dynamics });
  const given = {
    ...(options.duration !== null && { duration: `looprig: run: --duration ${num(options.duration)} s` }),
    ...(options.step !== null && { step: `looprig: run: --step ${num(options.step)} s` }),
  };
  // run simulates only: no margins, so a long dead time costs only its (bounded) delay line;
  // the tweak guide adds its runs (at most 11) and Ms.
  const tweakBudget = { frequencyAnalysis: true, runs: TWEAK_RUNS, given };
  enforceBudget(plant, built, { text: loaded.text, file: options.file }, io, {
    noLimits: options.noLimits,
    // A trial over STREAM_ROWS rows is streamed (simulate-plant.ts): it holds a chunk and its kept
    // rows, not its trace (and is run twice: the second pass costs time, not memory). The tweak
    // guide's runs are held whole.
    ...(tweak === 'asked' ? tweakBudget : { frequencyAnalysis: (options.svgFrequency ?? null) !== null, runs: 1, given, heldRows: STREAM_ROWS }),
  });
  const sim = simulatePlant(plant, dynamics, built);
  const { result, metrics, requirements } = sim;
  const warnings = [...loaded.warnings, ...sim.warnings];
  // run simulates only: the frequency-domain requirements (the table's) need the frequency response.
  for (const c of askedRequirements(plant.loop.requirements)) {
    if (c.domain === 'frequency') warnings.push(`requirement ${c.name} is not checked by run (frequency domain)`);
  }
  let guide: TweakGuide | null = null;
  if (tweak === 'asked') guide = runTweak(plant, dynamics, warnings);
  else if (tweak === 'within-budget') {
    const over = plantBudget(plant, built, loaded.text, options.file, { ...tweakBudget, limits: options.noLimits ? null : DEFAULT_BUDGET });
    if (over.length > 0) warnings.push(`tweak guide left out (its ${TWEAK_RUNS} runs and margins): ${refusalLine(over[0])}`);
    else guide = runTweak(plant, dynamics, warnings);
  }
  return { file: options.file, plant, result, metrics, requirements, warnings, tweak: guide, replay: sim.replay };
}

/** Most runs of the tweak guide: the gains as they are and ±10 % on kc, ti, td, n and b. */
const TWEAK_RUNS = 11;

/** The tweak guide of the file's gains (plain PID laws only; otherwise a warning says why not). */
function runTweak(plant: PlantSpec, dynamics: ReturnType<typeof compilePlant>, warnings: string[]): TweakGuide | null {
  const structure = plant.loop.controller.structure;
  if (plant.loop.controller.extension !== undefined || !PLAIN.has(structure)) {
    warnings.push(`tweak guide: only for the plain PID law, not the ${structure} structure`);
    return null;
  }
  const ctx = tuningContext(plant, dynamics);
  const guide = tweakGuide(ctx, plant.loop.controller.gains, structure as ControllerStructure);
  for (const n of guide.notes) warnings.push(`tweak guide: ${n}`);
  return guide;
}

const PLAIN = new Set(['p', 'pi', 'pd', 'pid']);

/** Apply --duration and --step to a loaded plant (a copy; the loaded spec is not changed). */
function withRunOverrides(plant: PlantSpec, options: RunOptions): PlantSpec {
  if (options.duration === null && options.step === null) return plant;
  const loop = { ...plant.loop };
  if (options.step !== null) {
    if (options.step > loop.sampleTime * (1 + 1e-9)) {
      throw new UserError(`run: --step ${num(options.step)} s is longer than the sample time ${num(loop.sampleTime)} s`);
    }
    loop.step = options.step;
  }
  if (options.duration !== null) {
    const duration = options.duration;
    // Events after the new end would never happen: drop them rather than reject the file.
    loop.trial = { ...loop.trial, duration, events: loop.trial.events.filter((e) => e.at <= duration) };
  }
  return { ...plant, loop };
}

/** `looprig run ...` */
export async function runCommand(args: readonly string[], io: Io): Promise<number> {
  const options = parseRunArgs(args);
  if (options === 'help') {
    io.out(USAGE);
    return 0;
  }
  // --json always carries the tweak guide (key `tweak`: null when not made, a warning says why);
  // the text shows its table only with --tweak.
  const report = runPlant(options, io, options.tweak === true ? 'asked' : options.json ? 'within-budget' : 'none');
  if (options.csv !== null) {
    // Every sample: a streamed trial is run again for its rows, a chunk at a time.
    const replay = report.replay ?? null;
    writeOutput(io, options.csv, replay === null ? traceCsvChunks(report.result.trace) : chunksCsv(report.result.trace.disturbanceNames, replay()));
  }
  if (options.svg !== null) writeRunSvg(report, options.svg, options.overrides.length > 0, io);
  if ((options.svgFrequency ?? null) !== null) writeFrequencySvg(report.plant, compilePlant(report.plant), options.file, options.svgFrequency!, options.overrides.length > 0, io);
  io.out(options.json ? toJson(reportJson(report)) : summaryText(report) + (report.tweak ? tweakText(report.tweak) : ''));
  return 0;
}

// ---------------------------------------------------------------- output

/** Rows per CSV chunk: ~0.5 MB of text at a time, however long the trace. */
const CSV_CHUNK_ROWS = 4096;

/**
 * The trace as CSV: t, setpoint, output, measured, u, then one column per disturbance; every
 * sample, as chunks of text (the header first) so a long trace goes to disk a piece at a time.
 */
export function* traceCsvChunks(trace: Trace, rowsPerChunk: number = CSV_CHUNK_ROWS): Generator<string> {
  yield csvHeader(trace.disturbanceNames);
  yield* csvRows(trace, rowsPerChunk);
}

/** The CSV of a streamed trial's rows (its replay), as `traceCsvChunks` writes a whole trace. */
export function* chunksCsv(disturbanceNames: readonly string[], chunks: Iterable<TrialChunk>): Generator<string> {
  yield csvHeader(disturbanceNames);
  for (const { chunk } of chunks) yield* csvRows(chunk, CSV_CHUNK_ROWS);
}

function csvHeader(disturbanceNames: readonly string[]): string {
  return `${['t', 'setpoint', 'output', 'measured', 'u', ...disturbanceNames].join(',')}\n`;
}

function* csvRows(trace: Trace, rowsPerChunk: number): Generator<string> {
  for (let start = 0; start < trace.length; start += rowsPerChunk) {
    const end = Math.min(trace.length, start + rowsPerChunk);
    let text = '';
    for (let i = start; i < end; i++) {
      text += `${trace.t[i]},${trace.r[i]},${trace.y[i]},${trace.ym[i]},${trace.u[i]}`;
      for (const d of trace.d) text += `,${d[i]}`;
      text += '\n';
    }
    yield text;
  }
}

/** The `--json` document (see the CLI contract in the design notes). */
export function reportJson(report: RunReport): unknown {
  const { plant, result, metrics } = report;
  const events: { at: number; [key: string]: unknown }[] = [
    ...metrics.steps.map((s) => ({
      kind: 'setpoint',
      at: s.at,
      from: s.from,
      to: s.to,
      final_value: finiteOrNull(s.finalValue),
      settled: s.settled,
      measured_against: s.basis === 'final' ? 'final_value' : 'setpoint',
      rise_time: finiteOrNull(s.riseTime),
      overshoot_pct: finiteOrNull(s.overshootPct),
      undershoot_pct: finiteOrNull(s.undershootPct),
      peak_time: finiteOrNull(s.peakTime),
      settling_time: finiteOrNull(s.settlingTime),
      steady_state_error: finiteOrNull(s.steadyStateError),
      iae: finiteOrNull(s.iae),
      ise: finiteOrNull(s.ise),
      itae: finiteOrNull(s.itae),
    })),
    ...metrics.ramps.map((r) => ({
      kind: 'setpoint_ramp',
      at: r.at,
      from: r.from,
      to: r.to,
      duration: r.duration,
      end_error: finiteOrNull(r.endError),
      max_abs_error: finiteOrNull(r.maxAbsError),
      iae: finiteOrNull(r.iae),
    })),
    ...metrics.disturbances.map((d) => ({
      kind: 'disturbance',
      at: d.at,
      name: d.name,
      from: finiteOrNull(d.from),
      to: d.to,
      setpoint: d.setpoint,
      peak_deviation: finiteOrNull(d.peakDeviation),
      peak_time: finiteOrNull(d.peakTime),
      recovery_time: finiteOrNull(d.recoveryTime),
      band: d.band,
      iae: finiteOrNull(d.iae),
      ise: finiteOrNull(d.ise),
      itae: finiteOrNull(d.itae),
    })),
  ].sort((a, b) => a.at - b.at);
  return {
    plant: { name: plant.name, file: report.file, model_type: plant.model.type },
    // The units of the output and the actuator, once: every number below is a plain number.
    units: plantUnits(plant),
    controller: {
      structure: plant.loop.controller.structure,
      form: plant.loop.controller.form,
      values: plant.loop.controller.values,
    },
    status: result.status,
    steps: result.steps,
    step: result.step,
    sample_time: plant.loop.sampleTime,
    duration: plant.loop.trial.duration,
    diverged_at: result.divergedAt,
    // Step figures: the worst over the setpoint steps (null without a step, or not reached /
    // not settled there); `worst_step_at` gives the step each comes from.
    metrics: runMetricsJson(metrics),
    events,
    requirements: report.requirements.map((r) => ({
      name: r.name,
      measured: finiteOrNull(r.measured),
      limit: r.limit,
      status: r.status,
      pass: r.status === 'pass',
      reason: r.reason,
      at: r.at,
    })),
    warnings: report.warnings,
    tweak: report.tweak === null ? null : tweakJson(report.tweak),
  };
}

/** The tweak guide as a compact table: per parameter and direction, an arrow and the signed change. */
export function tweakText(g: TweakGuide): string {
  const cell = (v: number, b: number): string => tweakChangeText(v, b, (x) => num(x, 3));
  const rows: string[][] = [['change', ...TWEAK_FIGURES.map((f) => TWEAK_FIGURE_HEADS[f])]];
  rows.push(['as is', ...TWEAK_FIGURES.map((f) => (Number.isFinite(g.base[f]) ? num(g.base[f], 4) : '-'))]);
  for (const r of g.rows) {
    rows.push([`${r.parameter} +${100 * TWEAK_STEP} %`, ...TWEAK_FIGURES.map((f) => cell(r.plus[f], g.base[f]))]);
    rows.push([`${r.parameter} -${100 * TWEAK_STEP} %`, ...TWEAK_FIGURES.map((f) => cell(r.minus[f], g.base[f]))]);
  }
  const lines = ['', `tweak guide (each parameter ±${100 * TWEAK_STEP} %, the full trial simulated):`, table(rows)];
  for (const r of g.rows) for (const c of r.contradictions) lines.push(`  ${r.parameter} +${100 * TWEAK_STEP} %: ${c}`);
  return `${lines.join('\n')}\n`;
}

const FIGURE_JSON: Record<TweakFigure, string> = {
  riseTime: 'rise_time',
  overshootPct: 'overshoot_pct',
  settlingTime: 'settling_time',
  iae: 'iae',
  peakOutput: 'max_abs_output',
  travel: 'u_total_variation',
  ms: 'max_sensitivity',
};

/** The tweak guide in --json: per parameter, the signed change of each figure at +10 % and −10 %. */
function tweakJson(g: TweakGuide): unknown {
  const fig = (r: Record<TweakFigure, number>) => Object.fromEntries(TWEAK_FIGURES.map((f) => [FIGURE_JSON[f], finiteOrNull(r[f])]));
  const change = (r: Record<TweakFigure, number>) => Object.fromEntries(TWEAK_FIGURES.map((f) => [FIGURE_JSON[f], finiteOrNull(r[f] - g.base[f])]));
  return {
    step_pct: 100 * TWEAK_STEP,
    base: fig(g.base),
    parameters: g.rows.map((r) => ({
      parameter: r.parameter,
      value: finiteOrNull(r.value),
      plus: { figures: fig(r.plus), change: change(r.plus) },
      minus: { figures: fig(r.minus), change: change(r.minus) },
      usual_chart_plus: Object.fromEntries(Object.entries(r.chart).map(([f, d]) => [FIGURE_JSON[f as TweakFigure], d])),
      contradictions: r.contradictions,
    })),
  };
}

/** Controller values that are times (printed with their unit). */
const TIME_VALUES = new Set(['ti', 'td', 'tracking_time']);

/** Overshoot (%) above which `status` never says ok: the output passed its target by more than the step. */
const OVERSHOOT_NOT_OK = 100;

/**
 * The status line: 'ok' only when the trial ran to its end, every setpoint step settled toward
 * its setpoint, no step overshot by more than 100 %, and no requirement failed; otherwise what is wrong (a diverged loop, a step still
 * moving at its end or gone the wrong way, failed requirements). N/A requirements are listed
 * with the requirements, not here.
 */
function runStatus(report: RunReport): string {
  const { result, metrics } = report;
  if (result.status === 'diverged') {
    return `UNSTABLE - diverged at t = ${num(result.divergedAt ?? NaN)} s (metrics below cover the trace up to there)`;
  }
  const problems: string[] = [];
  const moving = metrics.steps.filter((s) => !s.settled);
  const away = metrics.steps.filter((s) => s.settled && s.basis === 'setpoint');
  if (moving.length > 0) problems.push(`NOT SETTLED - the output is still moving at the end of the step at ${moving.map((s) => secs(s.at)).join(', ')}`);
  if (away.length > 0) problems.push(`NOT FOLLOWING - the output settles short of or away from the setpoint after the step at ${away.map((s) => secs(s.at)).join(', ')}`);
  const failed = report.requirements.filter((r) => r.status === 'fail').map((r) => r.name);
  // Past the setpoint by more than the step itself is no acceptable response, required or not
  // (common practice, no source); a failed overshoot requirement already says so.
  const overshoot = headlineMetrics(metrics).overshootPct;
  if (overshoot !== null && overshoot.value > OVERSHOOT_NOT_OK && !failed.includes('overshoot_pct')) {
    problems.push(`OVERSHOOT ${num(overshoot.value)} % - past its target by more than the size of the step (step at ${secs(overshoot.stepAt)})`);
  }
  if (failed.length > 0) problems.push(`FAILS ${failed.join(', ')}`);
  return problems.length === 0 ? 'ok' : problems.join('; ');
}

/** The human-readable summary. */
export function summaryText(report: RunReport): string {
  const { plant, result, metrics } = report;
  const loop = plant.loop;
  const c = loop.controller;
  const units = plantUnits(plant);
  // A value of the measured output, of its time integral, or of the actuator, with the file's unit.
  const out = (text: string): string => withUnit(text, units.output);
  const outTime = (text: string): string => withUnit(text, requirementUnitOf('iae', units) || null);
  const act = (text: string): string => withUnit(text, units.actuator);
  const lines: string[] = [];
  lines.push(`${plant.name}  (${report.file})`);
  const gains = Object.entries(c.values)
    .map(([k, v]) => `${k} ${TIME_VALUES.has(k) ? secs(v, 'none') : num(v)}`)
    .join(', ');
  lines.push(`model ${plant.model.type}; controller ${c.structure} (${c.form}) ${gains}`);
  lines.push(
    `sample ${secs(loop.sampleTime)}, step ${secs(result.step)} (${loop.integrator}), ${result.steps} steps over ${secs(loop.trial.duration)}`,
  );
  lines.push(`status: ${runStatus(report)}`);
  lines.push('');

  const head = headlineMetrics(metrics);
  const n = metrics.steps.length;
  if (n > 0) {
    const fig = (k: StepFigure): string => stepFigureText(k, head[k], (x) => (k === 'riseTime' || k === 'settlingTime' ? num(x) : num(x, 3)), '-', units.output);
    const under = head.undershootPct !== null && head.undershootPct.value > 0 ? `, undershoot ${fig('undershootPct')}` : '';
    lines.push(n === 1 ? `setpoint step ${num(metrics.steps[0].from)} -> ${out(num(metrics.steps[0].to))} at ${secs(metrics.steps[0].at)}:` : `${n} setpoint steps, the worst of each figure:`);
    lines.push(
      `  rise time ${fig('riseTime')}, overshoot ${fig('overshootPct')}${under}, settling ${fig('settlingTime')}, ` +
        `steady-state error ${fig('steadyStateError')}` +
        (n > 1 ? ` (${headlineSources(head, ['riseTime', 'overshootPct', 'settlingTime', 'steadyStateError'], (x) => num(x))})` : ''),
    );
  } else {
    lines.push('no setpoint step in this trial');
  }
  const o = metrics.overall;
  lines.push(
    `whole trial: IAE ${outTime(num(o.iae))}, ISE ${num(o.ise)}, ITAE ${num(o.itae)}, u total variation ${act(num(o.uTotalVariation))}, ` +
      `saturated ${secs(o.saturatedTime)}, peak |u| ${act(num(o.maxAbsOutput))}`,
  );

  const rows: string[][] = [];
  for (const e of metrics.steps) {
    rows.push([secs(e.at), 'setpoint', `${num(e.from)} -> ${out(num(e.to))}`, `rise ${stepFigureText('riseTime', e.riseTime, num)}`,
      `overshoot ${stepFigureText('overshootPct', e.overshootPct, (x) => num(x, 3))}`, `settling ${stepFigureText('settlingTime', e.settlingTime, num)}`,
      `final ${out(num(e.finalValue))}${e.settled ? '' : ' (still moving)'}`, `IAE ${outTime(num(e.iae))}`]);
  }
  for (const r of metrics.ramps) {
    rows.push([secs(r.at), 'ramp', `${num(r.from)} -> ${out(num(r.to))} in ${secs(r.duration)}`, `end error ${out(num(r.endError))}`,
      `max |e| ${out(num(r.maxAbsError))}`, '', '', `IAE ${outTime(num(r.iae))}`]);
  }
  for (const d of metrics.disturbances) {
    // The disturbance's own values carry no unit the file gives; its effect on the output does.
    rows.push([secs(d.at), `disturbance ${d.name}`, `${num(d.from)} -> ${num(d.to)}`, `peak ${out(num(d.peakDeviation))} at +${secs(d.peakTime)}`,
      `band ${out(num(d.band))}`, `recovery ${secs(d.recoveryTime, 'not recovered')}`, '', `IAE ${outTime(num(d.iae))}`]);
  }
  rows.sort((a, b) => parseFloat(a[0]) - parseFloat(b[0]));
  if (rows.length > 0) {
    lines.push('', 'events:');
    lines.push(
      table(rows)
        .split('\n')
        .map((l) => `  ${l}`)
        .join('\n'),
    );
  }

  if (report.requirements.length > 0) {
    lines.push('', 'requirements:');
    const req = report.requirements.map((r) => {
      const u = requirementUnitOf(r.name, units);
      const unit = u === '' ? '' : ` ${u}`;
      const where = r.at !== null && report.metrics.steps.length > 1 ? ` (worst step: at ${secs(r.at)})` : '';
      const measured = Number.isFinite(r.measured) ? `${num(r.measured, 4)}${unit}` : (r.reason ?? '-');
      const word = r.status === 'pass' ? 'pass' : r.status === 'fail' ? 'FAIL' : 'N/A';
      return [r.name, r.status === 'n/a' ? '-' : measured, `limit ${num(r.limit)}${unit}`, word, r.status === 'n/a' ? `(${r.reason})` : where.trim()];
    });
    lines.push(
      table(req)
        .split('\n')
        .map((l) => `  ${l}`)
        .join('\n'),
    );
  }
  if (report.warnings.length > 0) {
    lines.push('', 'notes:');
    for (const w of report.warnings) lines.push(`  ${w}`);
  }
  return `${lines.join('\n')}\n`;
}
