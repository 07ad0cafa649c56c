/**
 * `looprig optimize FILE [--ms 1.6] [--cost iae|itae] [--json] [--write]`: PI or PID gains that
 * minimise the cost on the full simulated trial subject to Ms <= target; progress on a terminal;
 * `--write` puts the result into the file (comments kept, atomic write).
 */
import { countOption, onePositional, parseCommandArgs, timeOption } from '../parse-command.js';
import { enforceFileBudget, LIMIT_OPTIONS, MAX_COUNTS } from '../budget-check.js';
import { controllerEdits, gainNote, plantUnits, savePlantValues } from '../../model/index.js';
import type { PlantSpec } from '../../model/types.js';
import { createOptimizer, DEFAULT_EVALUATIONS, tuningContext, valuesInForm, type OptimizeProgress, type OptimizeResult } from '../../tune/index.js';
import { UserError } from '../errors.js';
import { headlineMetrics, headlineSources, stepFigureText } from '../../analysis/index.js';
import { num, secs } from '../format.js';
import type { Io } from '../io.js';
import { finiteOrNull, noiseJson, toJson } from '../json.js';
import { loadPlantFile } from '../load-plant-file.js';
import { writeOutput } from '../write-output.js';

export const OPTIMIZE_USAGE = `Usage: looprig optimize FILE [options]

Searches PI or PID gains that minimise a cost on the full simulation of the file's trial, subject
to Ms <= a target, the actuator limits and the file's own requirements (overshoot_pct, rise_time,
settling_time, steady_state_error, iae, max_output, saturated_time). Starts from the best tuning
rule. The evaluation budget bounds the work: the same file gives the same gains on any machine
(and on the screen); a wall-clock cap applies only with --time-limit.

Options:
  --ms M             upper bound on the sensitivity peak Ms (default: the file's max_sensitivity
                     requirement, else 1.6; 1.4 for more robustness)
  --cost iae|itae    error integral to minimise over the trial (default iae)
  --du-weight W      add W times the total variation of the controller output to the cost (default 0)
  --structure pi|pid controller structure (default: the file's)
  --evaluations N    evaluation budget (default 300)
  --time-limit T     also stop after this wall time, e.g. 2s (default none; the result then
                     depends on the machine's speed)
  --ignore-requirements  optimise under Ms and the actuator limits only
  --write            write the gains into FILE (comments kept)
  --json             one JSON document on stdout
  -h, --help         show this text
`;

interface OptimizeArgs {
  file: string;
  json: boolean;
  write: boolean;
  ms: number | null;
  cost: 'iae' | 'itae';
  duWeight: number;
  structure: 'pi' | 'pid' | null;
  evaluations: number;
  timeLimitMs: number | undefined;
  requirements: boolean;
  noLimits: boolean;
}

function parseOptimizeArgs(args: readonly string[]): OptimizeArgs | 'help' {
  const { values, positionals } = parseCommandArgs('optimize', args, {
    json: { type: 'boolean' },
    write: { type: 'boolean' },
    ms: { type: 'string' },
    cost: { type: 'string' },
    'du-weight': { type: 'string' },
    structure: { type: 'string' },
    evaluations: { type: 'string' },
    'time-limit': { type: 'string' },
    'ignore-requirements': { type: 'boolean' },
    help: { type: 'boolean', short: 'h' },
    ...LIMIT_OPTIONS,
  });
  if (values.help) return 'help';
  onePositional('optimize', positionals);
  const ms = values.ms === undefined ? null : Number(values.ms);
  if (ms !== null && (!(ms > 1) || !Number.isFinite(ms))) throw new UserError('optimize: --ms must be a number > 1');
  const cost = values.cost ?? 'iae';
  if (cost !== 'iae' && cost !== 'itae') throw new UserError(`optimize: --cost must be iae or itae, got ${cost}`);
  const duWeight = values['du-weight'] === undefined ? 0 : Number(values['du-weight']);
  if (!(duWeight >= 0) || !Number.isFinite(duWeight)) throw new UserError('optimize: --du-weight must be >= 0');
  const structure = values.structure ?? null;
  if (structure !== null && structure !== 'pi' && structure !== 'pid') throw new UserError('optimize: --structure must be pi or pid');
  const evaluations = countOption('optimize', 'evaluations', values.evaluations, DEFAULT_EVALUATIONS, 1, MAX_COUNTS.evaluations);
  const limit = timeOption('optimize', 'time-limit', values['time-limit']);
  const timeLimitMs = limit === null ? undefined : limit * 1000;
  return {
    file: positionals[0],
    json: values.json === true,
    write: values.write === true,
    ms,
    cost,
    duWeight,
    structure,
    evaluations,
    timeLimitMs,
    requirements: values['ignore-requirements'] !== true,
    noLimits: values['no-limits'] === true,
  };
}

function progressLine(p: OptimizeProgress, cost: string): string {
  const width = 24;
  const filled = Math.round(p.fraction * width);
  return `\r[${'#'.repeat(filled)}${'.'.repeat(width - filled)}] ${p.evaluations}/${p.maxEvaluations}  best ${cost} ${num(p.bestCost)}   `;
}

function summaryText(plant: PlantSpec, r: OptimizeResult, elapsedMs: number, values: Record<string, number> | null, wrote: string | null): string {
  const b = r.best;
  const head = headlineMetrics(b.metrics);
  const from = headlineSources(head, ['overshootPct', 'settlingTime'], num);
  const kind = r.cost.kind.toUpperCase();
  const lines = [
    `${plant.name}: optimised ${r.structure.toUpperCase()} (${kind}${r.cost.outputVariationWeight > 0 ? ` + ${r.cost.outputVariationWeight} x output variation` : ''}, Ms <= ${r.msTarget})`,
    `  constraints: Ms <= ${r.msTarget}, actuator limits${r.constraints.length > 0 ? `, ${r.constraints.join(', ')} (the file's requirements)` : ''}${r.feasible ? '' : ' - NOT all met'}`,
    `  start: ${r.startLabel}, ${kind} ${num(r.startCost)}`,
    `  result: ${kind} ${num(b.cost)} after ${r.evaluations} evaluations (${r.stoppedBy}, ${num(elapsedMs / 1000, 3)} s)`,
    `  gains (${plant.loop.controller.form}): ${values ? Object.entries(values).map(([k, v]) => `${k}=${k === 'ti' || k === 'td' ? secs(v) : num(v)}`).join(' ') : 'not expressible in this form'}`,
    `  overshoot ${stepFigureText('overshootPct', head.overshootPct, (x) => num(x, 3))}, settling ${stepFigureText('settlingTime', head.settlingTime, num)}${from ? ` (${from})` : ''}, Ms ${Number.isNaN(b.ms) ? '-' : b.ms === Infinity ? 'unstable' : num(b.ms, 3)}, GM ${b.margins ? num(b.margins.gainMargin, 3, 'inf') : '-'}`,
  ];
  lines.push(`  binding: ${r.binding.length > 0 ? r.binding.map((x) => x.text).join('; ') : 'none (an interior optimum)'}`);
  for (const f of b.flags) lines.push(`  flag: ${f.message}`);
  for (const n of r.notes) lines.push(`note: ${n}`);
  if (wrote) lines.push(`wrote ${wrote}`);
  return `${lines.join('\n')}\n`;
}

/** `looprig optimize ...` */
export async function optimizeCommand(args: readonly string[], io: Io): Promise<number> {
  const o = parseOptimizeArgs(args);
  if (o === 'help') {
    io.out(OPTIMIZE_USAGE);
    return 0;
  }
  const loaded = loadPlantFile(o.file, io);
  const { plant, text } = loaded;
  const built = enforceFileBudget(loaded, o.file, io, {
    noLimits: o.noLimits,
    runs: o.evaluations,
    given: { runs: `looprig: optimize: --evaluations ${o.evaluations}` },
  });
  const fileStructure = plant.loop.controller.structure;
  const structure = o.structure ?? (fileStructure === 'pid' || fileStructure === 'pd' ? 'pid' : 'pi');
  if (o.write && fileStructure !== structure) {
    throw new UserError(`optimize: --write: the file's controller structure is ${fileStructure}; set it to ${structure} first (or pass --structure ${fileStructure === 'pid' ? 'pid' : 'pi'})`);
  }
  const showProgress = io.isTTY && !o.json;
  const t0 = performance.now();
  const optimizer = createOptimizer(tuningContext(plant, built.dynamics), {
    structure,
    msTarget: o.ms ?? undefined,
    cost: { kind: o.cost, outputVariationWeight: o.duWeight },
    maxEvaluations: o.evaluations,
    timeLimitMs: o.timeLimitMs,
    requirements: o.requirements,
  });
  // Run to the end; a progress line per few evaluations on a terminal.
  while (!optimizer.step(10)) if (showProgress) io.err(progressLine(optimizer.progress, o.cost.toUpperCase()));
  if (showProgress) io.err(`${progressLine(optimizer.progress, o.cost.toUpperCase())}\n`);
  const result = optimizer.result();
  const elapsedMs = performance.now() - t0;
  const values = valuesInForm(plant.loop.controller.form, result.best.gains);
  let wrote: string | null = null;
  if (o.write) {
    if (values === null) throw new UserError('optimize: --write: the result has no series form (ti < 4 td); nothing written');
    if (result.best.cost === Infinity || result.best.flags.some((f) => f.code === 'DIVERGED' || f.code === 'UNSTABLE_LOOP')) {
      throw new UserError('optimize: --write: no stable gain set found; nothing written', UserError.FAIL);
    }
    if (!result.feasible) {
      // Writing would replace the file's gains with a set that breaks what the file asks for.
      const what = result.constraints.length > 0 ? `Ms <= ${result.msTarget} and the file's requirements` : `Ms <= ${result.msTarget}`;
      throw new UserError(
        `optimize: --write: the best gain set found does not meet ${what} (run without --write to see it); nothing written. Relax --ms or pass --ignore-requirements to write it anyway.`,
        UserError.FAIL,
      );
    }
    const method = `optimize (${result.cost.kind.toUpperCase()}, Ms<=${result.msTarget})`;
    const edits = controllerEdits(text, values, { digits: 6, note: gainNote(new Date().toISOString().slice(0, 10), method) });
    let next: string;
    try {
      next = savePlantValues(text, edits);
    } catch (error) {
      // A value the text editor cannot replace in place (e.g. `kc: *alias`): the screen reports
      // the same refusal; nothing is written.
      if (!(error instanceof RangeError)) throw error;
      throw new UserError(`optimize: --write: cannot write the gains into ${o.file}: ${error.message}; nothing written`);
    }
    // The file was read a moment ago: if it is gone now, say so (it is written anew).
    wrote = writeOutput(io, o.file, next, { expectExisting: true });
  }
  if (o.json) {
    const b = result.best;
    const head = headlineMetrics(b.metrics);
    io.out(
      toJson({
        plant: { name: plant.name, file: o.file, form: plant.loop.controller.form },
        units: plantUnits(plant),
        structure: result.structure,
        cost: { kind: result.cost.kind, output_variation_weight: result.cost.outputVariationWeight, value: finiteOrNull(b.cost) },
        ms_target: result.msTarget,
        constraints: result.constraints,
        feasible: result.feasible,
        values,
        ideal: { kc: b.gains.kc, ti: finiteOrNull(b.gains.ti), td: b.gains.td },
        start: { rule: result.startRule?.rule.id ?? null, label: result.startLabel, cost: finiteOrNull(result.startCost) },
        evaluations: result.evaluations,
        stopped_by: result.stoppedBy,
        elapsed_ms: elapsedMs,
        // Worst over the setpoint steps (null: no step, or not reached / not settled there).
        overshoot_pct: head.overshootPct === null ? null : finiteOrNull(head.overshootPct.value),
        settling_time: head.settlingTime === null ? null : finiteOrNull(head.settlingTime.value),
        worst_step_at: { overshoot_pct: head.overshootPct?.stepAt ?? null, settling_time: head.settlingTime?.stepAt ?? null },
        max_sensitivity: finiteOrNull(b.ms),
        binding: result.binding,
        gain_margin: b.margins ? finiteOrNull(b.margins.gainMargin) : null,
        saturated_fraction: b.saturatedFraction,
        noise: noiseJson(b.noise),
        flags: b.flags,
        notes: result.notes,
        written: wrote,
      }),
    );
  } else {
    io.out(summaryText(plant, result, elapsedMs, values, wrote));
  }
  return 0;
}
