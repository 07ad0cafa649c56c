/**
 * `looprig fit LOG --plant FILE [--params A,B [--write]] [--svg OUT]`: a plant file against a
 * log. Without --params, validate the file's model (every kind) on the logged input; with
 * --params, estimate those params of its ode model (grey box) and, with --write, put them into
 * the file with a dated note, comments kept.
 */
import { parseDocument } from 'yaml';
import {
  fitPlantParameters,
  plantSettlingTime,
  validateModel,
} from '../../ident/index.js';
import type { BumpData, FitStatistics, GreyBoxFit, ResidualTests, Validation } from '../../ident/index.js';
import { compilePlant, gainNote, lineColumn, savePlantValues } from '../../model/index.js';
import type { PlantSpec } from '../../model/types.js';
import { UserError } from '../errors.js';
import { num, table } from '../format.js';
import type { Io } from '../io.js';
import { snakeKeys, toJson } from '../json.js';
import { loadPlantFile } from '../load-plant-file.js';
import { svgPlot } from '../svg-plot.js';
import { writeOutput } from '../write-output.js';
import type { FitOptions } from './fit-log.js';
import { baseName, printLogDiagnostics, readLog, readLogText } from './fit-log.js';

/** `fit LOG --plant FILE ...` */
export async function fitPlantCommand(options: FitOptions, io: Io): Promise<number> {
  const plantPath = options.plant!;
  const loaded = loadPlantFile(plantPath, io);
  const spec = loaded.plant;
  const names = options.params;
  if (names !== null) checkParams(spec, loaded.text, plantPath, names);
  const text = readLogText(options.file, io);
  const log = readLog(text, options, io);
  if (log === null) return UserError.USAGE;
  const data = log.data;
  if (!options.json) printLogDiagnostics(log.diagnostics, options.file, io);
  const dynamics = compilePlant(spec);
  const settle = plantSettlingTime(spec, dynamics, dynamics.linear === null ? data.u[0] : 0);
  const covered = (data.n - 1) * data.dt;
  if (settle !== null && covered < settle) {
    throw new UserError(
      `${options.file}:${data.lastLine}:1: the log covers ${num(covered)} s, but the model in ${plantPath} needs about ${num(settle)} s to settle (dead time + 4 time constants of its slowest mode): log at least ${num(settle)} s`,
    );
  }
  if (names !== null) {
    const fit = fitPlantParameters(spec, dynamics, data, names);
    let wrote = false;
    if (options.write) {
      writeEstimates(loaded.text, plantPath, fit, options.file, io);
      wrote = true;
    }
    if (options.json) io.out(toJson(greyBoxJson(fit, data, options)));
    else {
      io.out(greyBoxSummary(fit, data, options));
      if (wrote) io.out(`wrote ${names.join(', ')} into ${plantPath}\n`);
    }
    if (options.svg !== null) writeSvg(options, data, fit.response, `${spec.name}: grey-box fit of ${names.join(', ')}`, io);
    return 0;
  }
  const v = validateModel(spec, dynamics, data);
  if (options.json) io.out(toJson(validationJson(v, data, options)));
  else io.out(validationSummary(v, data, options));
  if (options.svg !== null) writeSvg(options, data, v.response, `${spec.name}: validation against ${options.file}`, io);
  return 0;
}

/** --params needs an ode model and names from its params, else one line with what would work. */
function checkParams(spec: PlantSpec, text: string, path: string, names: readonly string[]): void {
  if (names.length === 0) throw new UserError('fit: --params needs at least one name, e.g. --params area,drain_coeff');
  if (spec.model.type !== 'ode') {
    throw new UserError(
      `${path}: --params estimates the params of an ode model, and this file's model is ${spec.model.type}: drop --params to validate it, or refit the log with fit --model`,
    );
  }
  const known = Object.keys(spec.model.params);
  for (const name of names) {
    if (known.includes(name)) continue;
    const doc = parseDocument(text);
    const node = doc.getIn(['model', 'params'], true) as { range?: [number, number, number] } | undefined;
    const at = lineColumn(text, node?.range?.[0] ?? 0);
    throw new UserError(`${path}:${at.line}:${at.col}: no parameter ${name} in model.params (it has ${known.join(', ') || 'none'}): name one of those with --params`);
  }
}

function writeEstimates(text: string, path: string, fit: GreyBoxFit, logFile: string, io: Io): void {
  const date = new Date().toISOString().slice(0, 10);
  // One record for all estimates: params often share one flow-mapping line, which keeps one note.
  const what = fit.parameters
    .map((p) => `${p.name} ${num(p.value, 6)}${p.stdError !== null ? ` ± ${num(1.96 * p.stdError, 2)}` : p.atBound ? ' at bound' : ''}`)
    .join(', ');
  const note = gainNote(date, `fit ${baseName(logFile)} (grey box, 95 %: ${what})`);
  const edits = fit.parameters.map((p) => ({ path: ['model', 'params', p.name], value: +p.value.toPrecision(6), note }));
  writeOutput(io, path, savePlantValues(text, edits), { expectExisting: true }, 'fit');
}

function header(data: BumpData, options: FitOptions): string {
  return `${options.file}: ${data.n} samples every ${num(data.dt)} s; input ${data.inputName}, output ${data.outputName}; plant ${options.plant}`;
}

function statLines(s: FitStatistics, maxErrorTime: number, unit: string): string[] {
  return [
    `NRMSE ${num(100 * s.nrmse, 3)} % of the output range, R² ${s.r2.toFixed(4)}, RMSE ${num(s.rmse)}${unit}`,
    `largest error ${num(s.maxError)}${unit} at ${num(maxErrorTime)} s`,
  ];
}

function testLines(t: ResidualTests): string[] {
  const w = t.whiteness;
  const lines = [
    `residual whiteness: ζ = ${num(w.statistic)} against χ²(${w.lags}) 95 % = ${num(w.threshold)}: ${w.passed ? 'white (passed)' : 'not white: dynamics or coloured noise left in the residuals'}`,
  ];
  const c = t.inputIndependence;
  lines.push(c === null
    ? 'input correlation: the input does not move; not tested'
    : `input correlation (lags 0..${c.lags - 1}): ζ = ${num(c.statistic)} against χ²(${c.lags}) 95 % = ${num(c.threshold)}: ${c.passed ? 'independent (passed)' : 'correlated: part of the response to the input is not in the model'}`);
  lines.push('(tests of Ljung, System Identification, 2nd ed. 1999, section 16.6)');
  return lines;
}

function greyBoxSummary(fit: GreyBoxFit, data: BumpData, options: FitOptions): string {
  const lines = [header(data, options), ''];
  const rows: string[][] = [['parameter', 'file', 'estimate', '95 % interval', 'bounds']];
  for (const p of fit.parameters) {
    const ci = p.atBound ? 'at bound' : p.ci95 !== null ? `${num(p.ci95[0])} .. ${num(p.ci95[1])}` : 'none';
    rows.push([p.name, num(p.start), num(p.value), ci, `${num(p.lower)} .. ${num(p.upper)} (${p.boundsFrom === 'uncertainty' ? 'uncertainty' : 'file value ÷/× 1000'})`]);
  }
  lines.push(table(rows));
  const np = fit.parameters.length;
  if (fit.correlation !== null && np > 1) {
    lines.push('', 'correlations:');
    const corr: string[][] = [['', ...fit.parameters.map((p) => p.name)]];
    for (let a = 0; a < np; a++) corr.push([fit.parameters[a].name, ...fit.parameters.map((_, b) => num(fit.correlation![a * np + b], 3))]);
    lines.push(table(corr));
  }
  lines.push('', ...statLines(fit.statistics, data.t0 + fit.statistics.maxErrorIndex * data.dt, ''));
  lines.push(`condition of the scaled information matrix ${num(fit.condition, 3)}; ${fit.evaluations} simulations${fit.converged ? '' : '; the search stopped before converging'}`);
  for (const n of fit.notes) lines.push(`note: ${n}`);
  for (const p of fit.parameters) if (p.atBound) lines.push(`warning: ${p.name} sits on a bound (${num(p.value)}): the log does not pin it down inside the range`);
  return `${lines.join('\n')}\n`;
}

function validationSummary(v: Validation, data: BumpData, options: FitOptions): string {
  const lines = [header(data, options), ''];
  lines.push(...statLines(v.statistics, v.maxErrorTime, ''));
  lines.push(...testLines(v.tests));
  for (const n of v.notes) lines.push(`note: ${n}`);
  return `${lines.join('\n')}\n`;
}

function statsJson(s: FitStatistics, maxErrorTime: number): unknown {
  return { nrmse: s.nrmse, r2: s.r2, rmse: s.rmse, max_error: s.maxError, max_error_time: maxErrorTime };
}

function testsJson(t: ResidualTests): unknown {
  return snakeKeys({ whiteness: t.whiteness, inputIndependence: t.inputIndependence, autocorrelation: t.autocorrelation, crossCorrelation: t.crossCorrelation, band: t.band });
}

function greyBoxJson(fit: GreyBoxFit, data: BumpData, options: FitOptions): unknown {
  return {
    file: options.file,
    plant: options.plant,
    parameters: snakeKeys(fit.parameters),
    correlation: fit.correlation,
    condition: Number.isFinite(fit.condition) ? fit.condition : null,
    fit: statsJson(fit.statistics, data.t0 + fit.statistics.maxErrorIndex * data.dt),
    converged: fit.converged,
    notes: fit.notes,
    wrote: options.write ? options.plant : null,
  };
}

function validationJson(v: Validation, data: BumpData, options: FitOptions): unknown {
  return { file: options.file, plant: options.plant, samples: data.n, fit: statsJson(v.statistics, v.maxErrorTime), tests: testsJson(v.tests), offsets: v.offsets, notes: v.notes };
}

/** Data against model (top) and the logged input (bottom). */
export function writeSvg(options: FitOptions, data: BumpData, model: Float64Array, title: string, io: Io, setpoint?: Float64Array): void {
  const t = new Float64Array(data.n);
  for (let i = 0; i < data.n; i++) t[i] = data.t0 + i * data.dt;
  const top = [
    { label: `${data.outputName} (log)`, t, v: data.y, color: '#888888' },
    { label: 'model', t, v: model, color: '#1f77b4', width: 2 },
  ];
  if (setpoint !== undefined) top.push({ label: 'setpoint', t, v: setpoint, color: '#2ca02c', width: 1 });
  const svg = svgPlot({
    title,
    subtitle: options.file,
    xLabel: 'time (s)',
    t0: t[0],
    t1: t[data.n - 1],
    panels: [
      { yLabel: data.outputName, series: top, weight: 2 },
      { yLabel: data.inputName, series: [{ label: `${data.inputName} (log)`, t, v: data.u, color: '#d62728', step: true }] },
    ],
  });
  writeOutput(io, options.svg!, svg, {}, 'fit');
}
