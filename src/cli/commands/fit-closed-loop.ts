/**
 * `looprig fit LOG --setpoint COL [--controller FILE] [--svg OUT]`: identification from a log of
 * the loop in automatic (ident/closed-loop-fit.ts), with the excitation report, and a refusal
 * (exit 2) when the data cannot support a fit. With --controller, the file's controller is
 * replayed on the logged setpoint and measurement to check that it explains the logged
 * controller output (the gains in force).
 */
import { buildController } from '../../control/index.js';
import { fitClosedLoop, fitStatistics } from '../../ident/index.js';
import type { BumpData, ClosedLoopFit, FitStatistics } from '../../ident/index.js';
import { UserError } from '../errors.js';
import { num, table } from '../format.js';
import type { Io } from '../io.js';
import { snakeKeys, toJson } from '../json.js';
import { loadPlantFile } from '../load-plant-file.js';
import type { FitOptions } from './fit-log.js';
import { printLogDiagnostics, readLog, readLogText } from './fit-log.js';
import { writeSvg } from './fit-plant.js';

/** NRMSE above which the controller in the file does not explain the logged output (our choice). */
const CONTROLLER_MISMATCH = 0.05;

/** `fit LOG --setpoint COL ...` */
export async function fitClosedLoopCommand(options: FitOptions, io: Io): Promise<number> {
  const controllerSpec = options.controller !== null ? loadPlantFile(options.controller, io).plant.loop.controller : null;
  const text = readLogText(options.file, io);
  const sp = options.setpoint!;
  const log = readLog(text, options, io, [sp]);
  if (log === null) return UserError.USAGE;
  const data = log.data;
  const setpoint = log.extra[sp];
  if (!options.json) printLogDiagnostics(log.diagnostics, options.file, io);
  const fit = fitClosedLoop(data, setpoint, { models: options.models });
  if (fit.refused !== null) throw new UserError(`${options.file}: cannot fit this closed-loop log: ${fit.refused}`);
  let controllerCheck: FitStatistics | null = null;
  if (controllerSpec !== null) {
    // Replay the controller on the logged setpoint and measurement (bumpless start at the logged output).
    const c = buildController(controllerSpec, data.dt);
    const op = new Float64Array(data.n);
    c.initialize(setpoint[0], data.y[0], data.u[0]);
    for (let i = 0; i < data.n; i++) {
      op[i] = c.update(setpoint[i], data.y[i]);
      c.track(data.u[i]);
    }
    controllerCheck = fitStatistics(data.u, op);
  }
  if (options.json) io.out(toJson(json(fit, data, options, controllerCheck)));
  else io.out(summary(fit, data, options, controllerCheck));
  if (options.svg !== null) writeSvg(options, data, fit.response, `closed-loop fit (${fit.kind})`, io, setpoint);
  return 0;
}

function summary(fit: ClosedLoopFit, data: BumpData, options: FitOptions, check: FitStatistics | null): string {
  const e = fit.excitation;
  const lines = [
    `${options.file}: ${data.n} samples every ${num(data.dt)} s, loop in automatic; controller output ${data.inputName}, process value ${data.outputName}, setpoint ${options.setpoint}`,
    `excitation: setpoint moved ${e.setpointMoves} time${e.setpointMoves === 1 ? '' : 's'} over a range of ${num(e.setpointRange)} (${num(e.setpointToNoise, 3)} × the noise σ ${num(e.noiseStd)}); controller output range ${num(e.inputRange)}, σ ${num(e.inputStd)}; condition of the scaled information matrix ${num(e.condition, 3)}`,
    '',
  ];
  const rows: string[][] = [['parameter', 'estimate', '95 % interval']];
  for (const p of fit.parameters) {
    if (p.name === 'level') continue;
    rows.push([p.name, `${num(p.value)}${p.unit === 's' ? ' s' : ''}`, p.atBound ? 'at bound' : p.ci95 ? `${num(p.ci95[0])} .. ${num(p.ci95[1])}` : 'none']);
  }
  lines.push(`model: ${fit.kind} by the direct prediction-error method (Ljung 1999 section 13.4; Forssell & Ljung, Automatica 35 (1999) 1215-1241)`);
  lines.push(table(rows));
  const nm = fit.noiseModel!;
  lines.push(`noise model (1 + c q⁻¹)/(1 − a q⁻¹): a = ${num(nm.pole, 3)}, c = ${num(nm.zero, 3)}`);
  const s = fit.statistics!;
  lines.push(`simulated output against the log: NRMSE ${num(100 * s.nrmse, 3)} %, R² ${s.r2.toFixed(4)}`);
  const w = fit.tests!.whiteness;
  lines.push(`prediction errors: whiteness ζ = ${num(w.statistic)} against χ²(${w.lags}) 95 % = ${num(w.threshold)} (${w.passed ? 'passed' : 'not white'})`);
  const oe = fit.outputError!;
  lines.push(`output-error stage: ${oe.reason}`);
  for (const n of fit.notes) lines.push(`note: ${n}`);
  for (const m of oe.models[oe.chosen].warnings) lines.push(`warning: ${m.message}`);
  if (check !== null) {
    lines.push(check.nrmse <= CONTROLLER_MISMATCH
      ? `controller in ${options.controller}: reproduces the logged output (NRMSE ${num(100 * check.nrmse, 3)} %)`
      : `warning: the controller in ${options.controller} does not explain the logged output (NRMSE ${num(100 * check.nrmse, 3)} %): other gains were in force, the output was limited or in manual part of the time; the direct fit above does not depend on it`);
  }
  return `${lines.join('\n')}\n`;
}

function json(fit: ClosedLoopFit, data: BumpData, options: FitOptions, check: FitStatistics | null): unknown {
  return snakeKeys({
    file: options.file,
    samples: data.n,
    dt: data.dt,
    method: 'direct prediction error',
    excitation: { ...fit.excitation, condition: Number.isFinite(fit.excitation.condition) ? fit.excitation.condition : null },
    kind: fit.kind,
    parameters: fit.parameters,
    noiseModel: fit.noiseModel,
    fit: fit.statistics ? { nrmse: fit.statistics.nrmse, r2: fit.statistics.r2, rmse: fit.statistics.rmse } : null,
    whiteness: fit.tests?.whiteness ?? null,
    notes: fit.notes,
    controller: check === null ? null : { file: options.controller, nrmse: check.nrmse, explains: check.nrmse <= CONTROLLER_MISMATCH },
  });
}
