/**
 * `looprig fit LOG.csv`: fit simple models to a logged bump test, print them side by side,
 * and optionally write the chosen one as a plant file (`--out`, never over an existing file
 * without `--force`) or draw data against fit (`--show`). Bad logs exit 2 with
 * `LOG.csv:LINE:COL: message` diagnostics.
 */
import { parseCommandArgs } from '../parse-command.js';
import * as asciichart from 'asciichart';
import { buildPlantFile, FIT_KINDS, identify, parseFitKind } from '../../ident/index.js';
import type { BumpData, FitKind, IdentifyResult, LogDiagnostic } from '../../ident/index.js';
import { UserError } from '../errors.js';
import { num, table } from '../format.js';
import type { Io } from '../io.js';
import { snakeKeys, toJson } from '../json.js';
import { writeOutput } from '../write-output.js';
import { fitClosedLoopCommand } from './fit-closed-loop.js';
import { baseName, printLogDiagnostics, readLog, readLogText } from './fit-log.js';
import type { FitOptions } from './fit-log.js';
import { fitPlantCommand } from './fit-plant.js';

/** Help text of `fit`. */
export const FIT_USAGE = `looprig fit LOG.csv - fit a model to a logged bump test

Usage:
  looprig fit LOG.csv [--time COL --input COL --output COL] [options]

Options:
  --time COL          time column: seconds, or ISO-8601 timestamps (default: 1st column)
  --input COL         manipulated input, e.g. the valve output in manual (default: 2nd column)
  --output COL        process value (default: 3rd column)
  --from T --to T     window on the log's clock: seconds (units allowed, e.g. 10min) or,
                      for a timestamp column, an ISO-8601 time
  --model M           auto (default: fit all, choose by BIC), first_order, second_order,
                      integrating or inverse_response (repeatable)
  --skip-bad-rows     drop rows with missing or non-numeric cells instead of failing
  --out FILE          write the chosen model as a plant file (with a starting PI and a trial)
  --force             let --out replace an existing file
  --actuator-min U    the actuator's real limits (input units) for the --out file; without
  --actuator-max U    them the file has no actuator limits (the log's span is not the range)

Closed loop (the log comes from the loop in automatic):
  --setpoint COL      setpoint column: fit by the direct prediction-error method, report how
                      much the setpoint and the controller output moved, refuse what the data
                      cannot support
  --controller FILE   a plant file whose controller was in force: check that it explains the
                      logged controller output

Against a plant file:
  --plant FILE        simulate FILE with the logged input and validate it: NRMSE, R², the
                      largest error, residual whiteness and input-correlation tests
  --params A,B        with --plant (an ode model): estimate these params from the log, with
                      intervals and correlations (bounds from the file's uncertainty ranges)
  --write             with --params: put the estimates into FILE with a dated note
  --svg OUT           with --plant or --setpoint: plot data against the model
  --show              draw the data against the chosen model's response
  --json              print one JSON document on stdout
  -h, --help          show this text

Exit status: 0 fitted; 2 bad arguments or a log that cannot be fitted
(printed as LOG.csv:LINE:COL: message).
`;

export type { FitOptions } from './fit-log.js';

/** Parse the arguments of `fit`; a mistake is a `UserError` with exit status 2. */
export function parseFitArgs(args: readonly string[]): FitOptions | 'help' {
  const { values, positionals } = parseCommandArgs('fit', args, {
    time: { type: 'string' },
    input: { type: 'string' },
    output: { type: 'string' },
    from: { type: 'string' },
    to: { type: 'string' },
    model: { type: 'string', multiple: true },
    'skip-bad-rows': { type: 'boolean' },
    out: { type: 'string' },
    force: { type: 'boolean' },
    show: { type: 'boolean' },
    json: { type: 'boolean' },
    'actuator-min': { type: 'string' },
    'actuator-max': { type: 'string' },
    setpoint: { type: 'string' },
    controller: { type: 'string' },
    plant: { type: 'string' },
    params: { type: 'string' },
    write: { type: 'boolean' },
    svg: { type: 'string' },
    help: { type: 'boolean', short: 'h' },
  });
  if (values.help) return 'help';
  if (positionals.length !== 1) {
    throw new UserError(positionals.length === 0 ? 'fit: missing LOG.csv' : `fit: one log file expected, got ${positionals.length}`);
  }
  let models: FitKind[] | 'auto' = 'auto';
  for (const m of values.model ?? []) {
    if (m === 'auto') continue;
    const k = parseFitKind(m);
    if (k === null) throw new UserError(`fit: --model ${m}: expected auto, ${FIT_KINDS.join(', ')}`);
    if (models === 'auto') models = [];
    if (!models.includes(k)) models.push(k);
  }
  return {
    file: positionals[0],
    time: values.time ?? null,
    input: values.input ?? null,
    output: values.output ?? null,
    from: values.from ?? null,
    to: values.to ?? null,
    models,
    skipBadRows: values['skip-bad-rows'] === true,
    out: values.out ?? null,
    force: values.force === true,
    show: values.show === true,
    json: values.json === true,
    actuatorMin: limitValue(values['actuator-min'], 'actuator-min'),
    actuatorMax: limitValue(values['actuator-max'], 'actuator-max'),
    setpoint: values.setpoint ?? null,
    controller: values.controller ?? null,
    plant: values.plant ?? null,
    params: values.params === undefined ? null : values.params.split(',').map((x) => x.trim()).filter((x) => x !== ''),
    write: values.write === true,
    svg: values.svg ?? null,
  };
}

/** Options that belong to one mode only, used in another: one line saying which goes with which. */
function checkModeOptions(o: FitOptions): void {
  if (o.plant !== null && o.setpoint !== null) throw new UserError('fit: --plant and --setpoint are separate uses: validate or fit a plant file, or fit a closed-loop log');
  if (o.params !== null && o.plant === null) throw new UserError('fit: --params needs --plant FILE (the ode plant file whose params to estimate)');
  if (o.write && o.params === null) throw new UserError('fit: --write needs --plant FILE --params NAME,... (it writes the estimates into the plant file)');
  if (o.controller !== null && o.setpoint === null) throw new UserError('fit: --controller needs --setpoint COL (it applies to a closed-loop log)');
  if (o.svg !== null && o.plant === null && o.setpoint === null) throw new UserError('fit: --svg needs --plant FILE or --setpoint COL (use --show for a bump-test fit)');
  if ((o.plant !== null || o.setpoint !== null) && (o.out !== null || o.show)) throw new UserError('fit: --out and --show belong to a bump-test fit; leave them out with --plant or --setpoint');
}

function limitValue(raw: string | undefined, flag: string): number | null {
  if (raw === undefined) return null;
  const v = Number(raw);
  if (raw.trim() === '' || !Number.isFinite(v)) throw new UserError(`fit: --${flag} ${raw}: expected a number in the input's units`);
  return v;
}

/** Everything `fit` computed. */
export interface FitReport {
  file: string;
  data: BumpData;
  result: IdentifyResult;
  diagnostics: LogDiagnostic[];
  from: number;
  to: number;
  plantText: string | null;
}

/** `looprig fit ...` */
export async function fitCommand(args: readonly string[], io: Io): Promise<number> {
  const options = parseFitArgs(args);
  if (options === 'help') {
    io.out(FIT_USAGE);
    return 0;
  }
  checkModeOptions(options);
  if (options.plant !== null) return fitPlantCommand(options, io);
  if (options.setpoint !== null) return fitClosedLoopCommand(options, io);
  const text = readLogText(options.file, io);
  if (options.out !== null && !options.force && exists(io, options.out)) {
    throw new UserError(`fit: ${options.out} exists; add --force to replace it`);
  }
  const report = fitLog(text, options, io);
  if (report === null) return UserError.USAGE;

  if (options.out !== null && report.plantText !== null) {
    writeOutput(io, options.out, report.plantText);
  }
  if (options.json) {
    io.out(toJson(jsonReport(report, options)));
  } else {
    io.out(summary(report));
    if (options.show) io.out(chart(report, io));
    if (options.out !== null) io.out(`wrote ${options.out}\n`);
  }
  return 0;
}

/** Read, window, fit. Prints diagnostics to stderr; returns null after errors. */
export function fitLog(text: string, options: FitOptions, io: Io): FitReport | null {
  const file = options.file;
  const log = readLog(text, options, io);
  if (log === null) return null;
  const { data, diagnostics } = log;
  let result: ReturnType<typeof identify>;
  try {
    result = identify(data, { models: options.models });
  } catch (error) {
    // The data checks (bump-data.ts) refuse what is known to defeat the fit; should a window
    // still leave no finite starting point, that is a finding about the log, not a crash.
    if (!(error instanceof RangeError)) throw error;
    printLogDiagnostics(diagnostics, file, io);
    throw new UserError(`${file}: no model could be fitted to this window (${error.message})`);
  }
  diagnostics.push(...result.diagnostics);
  if (!options.json) printLogDiagnostics(diagnostics, file, io);
  const windowFrom = data.t0;
  const windowTo = data.t0 + (data.n - 1) * data.dt;
  const plantText = options.out !== null
    ? buildPlantFile(result, data, {
      fileName: baseName(file), from: windowFrom, to: windowTo,
      actuator: { min: options.actuatorMin, max: options.actuatorMax },
    })
    : null;
  return { file, data, result, diagnostics, from: windowFrom, to: windowTo, plantText };
}


/** Whether --out names something already there. A file we cannot read still exists. */
function exists(io: Io, path: string): boolean {
  try {
    return io.exists(path);
  } catch (error) {
    throw new UserError(`fit: cannot tell whether ${path} exists (${(error as Error).message}); not written`);
  }
}


const LABELS: Record<string, string> = {
  gain: 'gain',
  time_constant: 'time constant',
  time_constant_1: 'time constant 1',
  time_constant_2: 'time constant 2',
  natural_frequency: 'natural frequency',
  damping: 'damping',
  zero_time_constant: 'zero time constant',
  delay: 'delay',
  level: 'level',
};

/** The side-by-side table and the choice. */
export function summary(report: FitReport): string {
  const { result, data } = report;
  const lines: string[] = [];
  const a = result.analysis;
  lines.push(
    `${report.file}: ${data.n} samples every ${num(data.dt)} s from ${num(report.from)} s to ${num(report.to)} s` +
      `${data.resampled ? ' (resampled)' : ''}; input ${data.inputName}, output ${data.outputName}`,
  );
  const stepText = a.steps.length === 0
    ? 'no step: fitted to the whole input signal'
    : a.stepLike
      ? a.steps.map((s) => `${num(s.from)} -> ${num(s.to)} at ${num(data.t0 + s.time)} s`).join(', ')
      : `${a.steps.length} moves (general input signal)`;
  lines.push(`input: ${stepText}; pre-step level ${num(a.y0)}, noise σ ${num(a.noiseStd)} (${a.noiseSource})`);
  const r = result.reading;
  if (r !== null) {
    const tp = (e: { timeConstant: number; delay: number } | null): string =>
      e === null ? 'not reached' : `T ${num(e.timeConstant)} s, delay ${num(e.delay)} s`;
    lines.push(`two-point readings of the first step (gain ${num(r.gain)}): Smith ${tp(r.smith)}; Sundaresan-Krishnaswamy ${tp(r.sundaresanKrishnaswamy)}`);
  }
  lines.push('');
  const names: string[] = [];
  for (const m of result.models) for (const p of m.fit.parameters) if (!names.includes(p.name)) names.push(p.name);
  const head = ['', ...result.models.map((m, i) => `${m.fit.kind}${i === result.chosen ? ' *' : ''}`)];
  const rows: string[][] = [head];
  for (const name of names) {
    rows.push([
      LABELS[name] ?? name,
      ...result.models.map((m) => {
        const p = m.fit.parameters.find((q) => q.name === name);
        if (p === undefined) return '';
        const unit = p.unit === 's' ? ' s' : '';
        const ci = p.atBound ? ' (at bound)' : p.stdError !== null ? ` ± ${num(1.96 * p.stdError, 2)}` : '';
        return `${num(p.value)}${ci}${unit}`;
      }),
    ]);
  }
  rows.push(['NRMSE', ...result.models.map((m) => `${num(100 * m.fit.nrmse, 3)} %`)]);
  rows.push(['R²', ...result.models.map((m) => m.fit.r2.toFixed(4))]);
  rows.push(['BIC', ...result.models.map((m) => num(m.fit.bic, 6))]);
  rows.push(['warnings', ...result.models.map((m) => String(m.warnings.length))]);
  lines.push(table(rows));
  lines.push('(± is an approximate 95 % interval from the Jacobian; * = chosen)');
  lines.push('');
  lines.push(result.reason);
  const chosen = result.models[result.chosen];
  for (const w of chosen.warnings) lines.push(`warning (${chosen.fit.kind}): ${w.message}`);
  return `${lines.join('\n')}\n`;
}

/**
 * Data against the chosen model's response, 80 columns wide. With colour the two lines are
 * told apart by colour; without it (NO_COLOR, or not a terminal) the data keep asciichart's
 * line and the fit is overlaid as dots wherever it leaves the data line.
 */
export function chart(report: FitReport, io: Io): string {
  const fit = report.result.models[report.result.chosen].fit;
  const labelWidth = 11;
  const width = 80 - labelWidth - 1;
  const data = bucketMeans(report.data.y, width);
  const model = bucketMeans(fit.response, width);
  let min = Infinity;
  let max = -Infinity;
  for (const v of [...data, ...model]) {
    if (v < min) min = v;
    if (v > max) max = v;
  }
  const config = { height: 14, min, max, format: (x: number) => num(x, 4).padStart(labelWidth - 1) };
  const color = io.env.NO_COLOR === undefined && io.isTTY;
  const span = `${' '.repeat(labelWidth)}${num(report.from)} s .. ${num(report.to)} s`;
  if (color) {
    const plot = asciichart.plot([data, model], { ...config, colors: [asciichart.lightgray, asciichart.green] });
    const legend = `${asciichart.lightgray}── data${asciichart.reset}   ${asciichart.green}── ${fit.kind} fit${asciichart.reset}`;
    return `\n${plot}\n${span}\n${legend}\n`;
  }
  const dataRows = asciichart.plot(data, config).split('\n');
  const fitRows = asciichart.plot(model, config).split('\n');
  const merged = dataRows.map((row, i) => {
    const f = fitRows[i] ?? '';
    let out = '';
    for (let c = 0; c < Math.max(row.length, f.length); c++) {
      const d = row[c] ?? ' ';
      const m = f[c] ?? ' ';
      out += c > labelWidth && d === ' ' && m !== ' ' ? '·' : d;
    }
    return out.trimEnd();
  });
  return `\n${merged.join('\n')}\n${span}\n── data   ··· ${fit.kind} fit (where it leaves the data)\n`;
}

function bucketMeans(a: Float64Array, buckets: number): number[] {
  const n = a.length;
  const k = Math.min(buckets, n);
  const out: number[] = [];
  for (let b = 0; b < k; b++) {
    const i0 = Math.floor((b * n) / k);
    const i1 = Math.max(i0 + 1, Math.floor(((b + 1) * n) / k));
    let s = 0;
    for (let i = i0; i < i1; i++) s += a[i];
    out.push(s / (i1 - i0));
  }
  return out;
}

function jsonReport(report: FitReport, options: FitOptions): unknown {
  const { result, data } = report;
  const a = result.analysis;
  // snake_case keys, as every --json document (the reading's record keys included).
  return snakeKeys({
    file: report.file,
    window: { from: report.from, to: report.to, samples: data.n, dt: data.dt, resampled: data.resampled, firstLine: data.firstLine, lastLine: data.lastLine },
    columns: { input: data.inputName, output: data.outputName },
    input: { steps: a.steps.map((s) => ({ at: data.t0 + s.time, from: s.from, to: s.to })), stepLike: a.stepLike, u0: a.u0 },
    output: { preStepLevel: a.y0, noiseStd: a.noiseStd, noiseSource: a.noiseSource },
    twoPoint: result.reading,
    models: result.models.map((m) => ({
      kind: m.fit.kind,
      parameters: m.fit.parameters.map((p) => ({ name: p.name, value: p.value, unit: p.unit, stdError: p.stdError, ci95: p.ci95, atBound: p.atBound, derived: p.derived })),
      nrmse: m.fit.nrmse,
      r2: m.fit.r2,
      rmse: m.fit.rmse,
      bic: m.fit.bic,
      nParams: m.fit.nParams,
      settleTime: m.settleTime,
      converged: m.fit.converged,
      warnings: m.warnings.map((w) => ({ code: w.code, message: w.message })),
    })),
    chosen: result.models[result.chosen].fit.kind,
    reason: result.reason,
    diagnostics: report.diagnostics.map((d) => ({ code: d.code, severity: d.severity, line: d.line, column: d.column, message: d.message })),
    out: options.out,
  });
}
