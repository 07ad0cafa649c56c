/**
 * `looprig suggest FILE [--json]`: every tuning rule on the plant file, each gain set simulated on
 * the full plant (its trial, limits, delays), one row per rule.
 */
import { countOption, onePositional, parseCommandArgs, timeOption } from '../parse-command.js';
import { enforceFileBudget, LIMIT_OPTIONS, MAX_COUNTS } from '../budget-check.js';
import { MIN_SAMPLE_TIME, plantUnits } from '../../model/index.js';
import type { PlantSpec } from '../../model/types.js';
import type { LoopShapingTarget, PoleTarget } from '../../tune/index.js';
import { caseFigures, caseMs, suggestGains, summarise, sweepCaseCount, tuningContext, TUNING_RULES, type SuggestResult, type Suggestion } from '../../tune/index.js';
import { UserError } from '../errors.js';
import { headlineMetrics, headlineSources, rankedFigureText, stepFigureText } from '../../analysis/index.js';
import { num, secs, table } from '../format.js';
import type { Io } from '../io.js';
import { finiteOrNull, noiseJson, toJson } from '../json.js';
import { loadPlantFile } from '../load-plant-file.js';
import { MIN_PARALLEL_CASES, sweepJobs, SweepPool } from '../parallel-sweep.js';

export const SUGGEST_USAGE = `Usage: looprig suggest FILE [options]

Runs every tuning rule on the plant's low-order approximation (and ultimate point), converts each
gain set into the file's controller form, simulates the file's trial with it and reports one row
per rule: gains, overshoot, settling time, IAE, Ms, gain margin, worst case over the file's
uncertainty ranges, flags. Rules give a starting point, not an answer.

Options:
  --json         one JSON document on stdout
  --tauc T       SIMC closed-loop time constant (default: the effective delay), e.g. --tauc 20s
  --lambda T     lambda / IMC closed-loop time constant (default: each rule's own)
  --poles wn=W,zeta=Z[,alpha=A]
                 add PI and PID rows placing the closed-loop poles s² + 2·Z·W·s + W² (W in rad/s;
                 PID also a real pole at −A·W, default A = 1), with the achieved poles of the
                 sampled loop
  --crossover W --phase-margin DEG
                 add PI and PID rows putting the loop's gain crossover at W rad/s with that phase
                 margin (PID with Ti = R·Td), with the achieved margins of the loop
  --crossover W --ms M
                 the same rows with the sensitivity peak Ms = M instead of a phase margin (of
                 the solutions, the largest integral gain); --ms also adds the row below
  --ti-td-ratio R
                 Ti/Td of the loop-shaping PID (default 4)
  --ms M         add the Ms-constrained PI row: the largest integral gain with Ms <= M (M > 1)
  --relay        take the ultimate point from a relay test in the simulation instead of the model
  --samples N    Monte-Carlo samples over the uncertainty per rule, besides the corners (default 0)
  --jobs N       threads for the worst-case sweeps when they have ${MIN_PARALLEL_CASES} or more cases (default:
                 LOOPRIG_JOBS, else the machine's cores, or 1 on two cores or fewer; 1 = this
                 thread only); same results
  -h, --help     show this text
`;

interface SuggestArgs {
  file: string;
  json: boolean;
  tauc: number | null;
  lambda: number | null;
  relay: boolean;
  poles: PoleTarget | null;
  shaping: LoopShapingTarget | null;
  maxMs: number | null;
  samples: number;
  jobs: number;
  noLimits: boolean;
}

function parseSuggestArgs(args: readonly string[], env: Io['env']): SuggestArgs | 'help' {
  const { values, positionals } = parseCommandArgs('suggest', args, {
    json: { type: 'boolean' },
    tauc: { type: 'string' },
    lambda: { type: 'string' },
    relay: { type: 'boolean' },
    poles: { type: 'string' },
    crossover: { type: 'string' },
    'phase-margin': { type: 'string' },
    'ti-td-ratio': { type: 'string' },
    ms: { type: 'string' },
    samples: { type: 'string' },
    jobs: { type: 'string' },
    help: { type: 'boolean', short: 'h' },
    ...LIMIT_OPTIONS,
  });
  if (values.help) return 'help';
  onePositional('suggest', positionals);
  const samples = countOption('suggest', 'samples', values.samples, 0, 0, MAX_COUNTS.samples);
  const jobs = countOption('suggest', 'jobs', values.jobs, sweepJobs(env), 1, MAX_COUNTS.jobs);
  return {
    file: positionals[0],
    json: values.json === true,
    tauc: timeOption('suggest', 'tauc', values.tauc, { min: MIN_SAMPLE_TIME }),
    lambda: timeOption('suggest', 'lambda', values.lambda, { min: MIN_SAMPLE_TIME }),
    relay: values.relay === true,
    poles: values.poles === undefined ? null : parsePoles(values.poles),
    shaping: parseShaping(values.crossover, values['phase-margin'], values['ti-td-ratio'], values.ms),
    maxMs: values.ms === undefined ? null : parseMaxMs(values.ms),
    samples,
    jobs,
    noLimits: values['no-limits'] === true,
  };
}

/** `wn=W,zeta=Z[,alpha=A]` → a pole target; a UserError (exit 2) for anything else. */
export function parsePoles(raw: string): PoleTarget {
  const usage = `suggest: --poles ${raw}: write wn=W,zeta=Z[,alpha=A] with W in rad/s, e.g. --poles wn=0.2,zeta=0.7`;
  const got: Record<string, number> = {};
  for (const part of raw.split(',')) {
    const m = /^\s*(wn|zeta|alpha)\s*=\s*([^\s]+)\s*$/.exec(part);
    if (m === null || m[1] in got) throw new UserError(usage);
    const v = Number(m[2]);
    if (!Number.isFinite(v) || !(v > 0)) throw new UserError(`suggest: --poles: ${m[1]} must be a positive number, got ${m[2]}`);
    got[m[1]] = v;
  }
  if (got.wn === undefined || got.zeta === undefined) throw new UserError(usage);
  return { wn: got.wn, zeta: got.zeta, alpha: got.alpha ?? 1 };
}

function positive(flag: string, raw: string, max = Infinity): number {
  const v = Number(raw);
  if (!Number.isFinite(v) || !(v > 0) || !(v < max)) throw new UserError(`suggest: --${flag} must be a number > 0${max < Infinity ? ` and < ${max}` : ''}, got ${raw}`);
  return v;
}

/** --ms M: a sensitivity peak limit, a number > 1. */
function parseMaxMs(raw: string): number {
  const v = Number(raw);
  if (!Number.isFinite(v) || !(v > 1)) throw new UserError(`suggest: --ms must be a number > 1 (e.g. 1.4), got ${raw}`);
  return v;
}

/**
 * --crossover with --phase-margin or with --ms, and --ti-td-ratio → a loop-shaping target (null:
 * no --crossover; --ms alone is the Ms-constrained PI only).
 */
export function parseShaping(crossover: string | undefined, pm: string | undefined, ratio: string | undefined, ms?: string): LoopShapingTarget | null {
  if (crossover === undefined && pm === undefined) {
    if (ratio !== undefined) throw new UserError('suggest: --ti-td-ratio goes with --crossover and --phase-margin (or --ms)');
    return null;
  }
  if (crossover === undefined) throw new UserError('suggest: --phase-margin goes with --crossover W (rad/s), e.g. --crossover 0.1 --phase-margin 60');
  if (pm !== undefined && ms !== undefined) throw new UserError('suggest: with --crossover give --phase-margin DEG or --ms M as the target, not both');
  if (pm === undefined && ms === undefined) throw new UserError('suggest: --crossover W (rad/s) goes with --phase-margin DEG or --ms M, e.g. --crossover 0.1 --phase-margin 60');
  const tiTdRatio = ratio === undefined ? 4 : positive('ti-td-ratio', ratio);
  if (ms !== undefined) return { crossover: positive('crossover', crossover), ms: parseMaxMs(ms), tiTdRatio };
  return { crossover: positive('crossover', crossover), phaseMarginDeg: positive('phase-margin', pm!, 180), tiTdRatio };
}

/** A crossover at or above the Nyquist frequency π/h of the file's sample time cannot be designed for: exit 2 with the limit. */
function checkCrossover(t: LoopShapingTarget | null, h: number): void {
  if (t === null || t.crossover < Math.PI / h) return;
  throw new UserError(`suggest: --crossover ${num(t.crossover)} rad/s is at or above the Nyquist frequency π/h = ${num(Math.PI / h, 4)} rad/s of the sample time ${num(h)} s: choose a crossover below it (a tenth of it or less is usual)`);
}

/** A continuous-time pole as `-0.21±0.214j` (the pair once). */
function poleText(re: number, im: number): string {
  return Math.abs(im) < 1e-12 ? num(re, 3) : `${num(re, 3)}±${num(Math.abs(im), 3)}j`;
}

/** The slowest poles of the sampled loop (each pair once), for the design rows. */
export function achievedText(s: Suggestion, count = 4): string {
  const a = s.design?.kind === 'poles' ? s.design.achieved : null;
  if (!a) return 'no linear model';
  const shown: string[] = [];
  for (const p of a.poles) {
    if (p.im < 0 || !Number.isFinite(p.re)) continue;
    shown.push(poleText(p.re, p.im));
    if (shown.length === count) break;
  }
  return `${shown.join(', ')}${a.stable ? '' : ' (unstable)'}`;
}

/** The gains as the file writes them, e.g. `kc=1.2 ti=30 s`. */
export function gainsText(s: Suggestion): string {
  const v = s.values ?? { kc: s.gains.kc, ti: s.gains.ti, td: s.gains.td };
  const parts: string[] = [];
  for (const [k, x] of Object.entries(v)) {
    if ((k === 'ti' && x === Infinity) || ((k === 'td' || k === 'kd' || k === 'ki') && x === 0)) continue;
    parts.push(k === 'ti' || k === 'td' ? `${k}=${secs(x)}` : `${k}=${num(x)}`);
  }
  return (s.values === null ? '(ideal) ' : '') + parts.join(' ');
}

function worstText(s: Suggestion): string {
  const w = s.worstCase;
  if (w === null) return '-';
  if (w.anyDiverged) return `diverges (${w.cases} cases)`;
  const ms = w.worstMs === Infinity ? 'unstable' : num(w.worstMs, 3);
  // NaN: the trial has no setpoint step; Infinity: a case never settles.
  const os = rankedFigureText('overshootPct', w.worstOvershootPct, (x) => num(x, 3));
  const ts = rankedFigureText('settlingTime', w.worstSettlingTime, num);
  return `os ${os} ts ${ts} Ms ${ms}`;
}

/** The design rows' targets beside what the loop achieves, one section per kind of design. */
function designLines(r: SuggestResult): string[] {
  const shaping: string[] = [];
  const poles: string[] = [];
  for (const s of r.suggestions) {
    const d = s.design;
    if (d === null) continue;
    if (d.kind === 'ms') {
      const ms = s.evaluation.margins?.maxSensitivity;
      shaping.push(`  ${s.rule.label}: limit Ms ${num(d.maxMs, 3)}; achieved Ms ${ms === undefined ? '-' : num(ms, 4)}, integral gain kc/ti ${num(s.gains.kc / s.gains.ti, 4)} /s`);
    } else if (d.kind === 'shaping') {
      const t = d.target;
      const m = s.evaluation.margins;
      const got = m ? `crossover ${num(m.crossoverFrequency, 4)} rad/s, phase margin ${num(m.phaseMarginDeg, 3)}°, GM ${num(m.gainMargin, 3, 'inf')}, Ms ${num(m.maxSensitivity, 3)}` : 'no margins (no linear model)';
      const aim = 'ms' in t ? `Ms ${num(t.ms, 3)}` : `phase margin ${num(t.phaseMarginDeg, 3)}°`;
      shaping.push(`  ${s.rule.label}: target crossover ${num(t.crossover, 4)} rad/s, ${aim}${s.structure === 'pid' ? `, Ti/Td ${num(t.tiTdRatio, 3)}` : ''}; achieved ${got}`);
    } else {
      const t = d.target;
      const pair = poleText(-t.zeta * t.wn, t.wn * Math.sqrt(Math.max(0, 1 - t.zeta * t.zeta)));
      poles.push(`  ${s.rule.label}: target ${s.structure === 'pid' ? `${pair}, ${num(-t.alpha * t.wn, 3)}` : pair}; achieved ${achievedText(s)}`);
    }
  }
  const out: string[] = [];
  if (shaping.length > 0) out.push('', "loop shaping and Ms limit: target and the loop's achieved margins:", ...shaping);
  if (poles.length > 0) out.push('', 'pole placement: target and the slowest closed-loop poles of the sampled loop as it runs (rad/s, s = ln(z)/h):', ...poles);
  return out;
}

function summaryText(plant: PlantSpec, r: SuggestResult): string {
  const lines: string[] = [`${plant.name}: ${r.suggestions.length} rule gain sets, simulated on the full plant`];
  const i = r.inputs;
  if (i.fopdt) lines.push(`  first order + delay: k ${num(i.fopdt.k)}, tau1 ${secs(i.fopdt.tau1)}, theta ${secs(i.fopdt.theta)}`);
  if (i.sopdt) lines.push(`  second order + delay: k ${num(i.sopdt.k)}, tau1 ${secs(i.sopdt.tau1)}, tau2 ${secs(i.sopdt.tau2)}, theta ${secs(i.sopdt.theta)}`);
  if (i.integrating) lines.push(`  integrating + delay: kv ${num(i.integrating.kv)} /s, theta ${secs(i.integrating.theta)}`);
  if (i.ultimate) lines.push(`  ultimate point (${r.ultimateSource}): Ku ${num(i.ultimate.ku)}, Tu ${secs(i.ultimate.tu)}`);
  if (r.relay && r.ultimateModel) lines.push(`  ultimate point (model): Ku ${num(r.ultimateModel.ku)}, Tu ${secs(r.ultimateModel.tu)}`);
  lines.push('');
  const rows: string[][] = [['rule', 'gains', 'overshoot', 'settling', 'IAE', 'Ms', 'GM', 'worst case', 'flags']];
  let from = '';
  for (const s of r.suggestions) {
    const e = s.evaluation;
    const head = headlineMetrics(e.metrics);
    from ||= headlineSources(head, ['overshootPct', 'settlingTime'], num);
    rows.push([
      s.rule.label,
      gainsText(s),
      stepFigureText('overshootPct', head.overshootPct, (x) => num(x, 3)),
      stepFigureText('settlingTime', head.settlingTime, num),
      e.result.status === 'ok' ? num(e.metrics.overall.iae) : 'diverged',
      e.margins ? num(e.margins.maxSensitivity, 3) : '-',
      e.margins ? num(e.margins.gainMargin, 3, 'inf') : '-',
      worstText(s),
      [...new Set(s.flags.map((f) => f.code.toLowerCase().replace(/_/g, '-')))].join(',') || 'ok',
    ]);
  }
  lines.push(table(rows));
  // Every rule runs the same trial: with several steps the columns are the worst step of each row.
  const steps = r.suggestions[0]?.evaluation.metrics.steps.length ?? 0;
  if (steps > 1) lines.push(`overshoot and settling: the worst of the trial's ${steps} setpoint steps for each rule (first row: ${from})`);
  else if (steps === 1) lines.push(`overshoot and settling: the trial's setpoint step (${from})`);
  lines.push(...designLines(r));
  if (r.skipped.length > 0) {
    lines.push('', 'not applicable:');
    for (const k of r.skipped) lines.push(`  ${k.label}: ${k.reason}`);
  }
  for (const n of r.notes) lines.push(`note: ${n}`);
  lines.push('', r.caution);
  return `${lines.join('\n')}\n`;
}

function designJson(s: Suggestion): unknown {
  const d = s.design;
  if (d === null) return null;
  // Loop shaping: what the loop achieves is the row's margins (crossover, phase margin above).
  // The Ms limit under the name optimize and compare give theirs (ms_target).
  if (d.kind === 'ms') return { kind: d.kind, ms_target: d.maxMs };
  if (d.kind === 'shaping') {
    const t = d.target;
    return { kind: d.kind, target: { crossover: t.crossover, phase_margin_deg: 'ms' in t ? null : t.phaseMarginDeg, ms: 'ms' in t ? t.ms : null, ti_td_ratio: t.tiTdRatio } };
  }
  return {
    kind: d.kind,
    target: d.target,
    achieved_poles: d.achieved && {
      stable: d.achieved.stable,
      // Every pole of the sampled loop: z, and s = ln(z)/h (null for z = 0).
      poles: d.achieved.poles.map((p) => ({ z: [p.zRe, p.zIm], s: Number.isFinite(p.re) ? [p.re, p.im] : null })),
    },
  };
}

function suggestJson(file: string, plant: PlantSpec, r: SuggestResult): unknown {
  return {
    plant: { name: plant.name, file, form: plant.loop.controller.form },
    // The units of the output and the actuator, once, as run and compare name them.
    units: plantUnits(plant),
    approximation: r.inputs,
    ultimate_source: r.ultimateSource,
    ultimate_model: r.ultimateModel,
    relay: r.relay?.estimate ?? null,
    suggestions: r.suggestions.map((s) => {
      const e = s.evaluation;
      const head = headlineMetrics(e.metrics);
      return {
        rule: s.rule.id,
        label: s.rule.label,
        source: s.rule.source,
        structure: s.structure,
        form: s.form,
        values: s.values,
        ideal: { kc: s.gains.kc, ti: finiteOrNull(s.gains.ti), td: s.gains.td },
        rule_gains: { form: s.ruleGains.form, kc: s.ruleGains.kc, ti: finiteOrNull(s.ruleGains.ti), td: s.ruleGains.td },
        status: e.result.status,
        // Worst over the setpoint steps (null: no step, or not reached / not settled there).
        overshoot_pct: head.overshootPct === null ? null : finiteOrNull(head.overshootPct.value),
        settling_time: head.settlingTime === null ? null : finiteOrNull(head.settlingTime.value),
        rise_time: head.riseTime === null ? null : finiteOrNull(head.riseTime.value),
        worst_step_at: { overshoot_pct: head.overshootPct?.stepAt ?? null, settling_time: head.settlingTime?.stepAt ?? null, rise_time: head.riseTime?.stepAt ?? null },
        iae: finiteOrNull(e.metrics.overall.iae),
        cost: finiteOrNull(e.cost),
        max_sensitivity: e.margins ? finiteOrNull(e.margins.maxSensitivity) : null,
        gain_margin: e.margins ? finiteOrNull(e.margins.gainMargin) : null,
        phase_margin_deg: e.margins ? finiteOrNull(e.margins.phaseMarginDeg) : null,
        saturated_fraction: e.saturatedFraction,
        noise: noiseJson(e.noise),
        worst_case: s.worstCase && {
          cases: s.worstCase.cases,
          any_diverged: s.worstCase.anyDiverged,
          overshoot_pct: finiteOrNull(s.worstCase.worstOvershootPct),
          settling_time: finiteOrNull(s.worstCase.worstSettlingTime),
          iae: finiteOrNull(s.worstCase.worstIae),
          max_sensitivity: finiteOrNull(s.worstCase.worstMs),
        },
        flags: s.flags,
        design: designJson(s),
      };
    }),
    skipped: r.skipped,
    notes: r.notes,
    caution: r.caution,
  };
}

/** `looprig suggest ...` */
export async function suggestCommand(args: readonly string[], io: Io): Promise<number> {
  const options = parseSuggestArgs(args, io.env);
  if (options === 'help') {
    io.out(SUGGEST_USAGE);
    return 0;
  }
  const loaded = loadPlantFile(options.file, io);
  const { plant, text } = loaded;
  checkCrossover(options.shaping, plant.loop.sampleTime);
  const sweep = { samples: options.samples };
  // Every rule's trial, and its sweep over the uncertainty.
  const cases = sweepCaseCount(plant, { ...sweep, nominal: false }) + 1;
  const built = enforceFileBudget(loaded, options.file, io, {
    noLimits: options.noLimits,
    runs: (TUNING_RULES.length + (options.poles ? 2 : 0) + (options.shaping ? 2 : 0) + (options.maxMs ? 1 : 0)) * cases,
    given: options.samples > 0 ? { runs: `looprig: suggest: --samples ${options.samples}` } : {},
  });
  // Large worst-case sweeps go over threads: the rules are evaluated here without them and each
  // rule's sweep is then run by the pool, combined with its nominal case as suggestGains does.
  const parallel = options.jobs > 1 && cases >= MIN_PARALLEL_CASES;
  const result = suggestGains(plant, {
    context: tuningContext(plant, built.dynamics),
    tauc: options.tauc,
    lambda: options.lambda,
    ultimate: options.relay ? 'relay' : 'model',
    poles: options.poles,
    shaping: options.shaping,
    maxMs: options.maxMs,
    robustness: parallel ? false : sweep,
  });
  if (parallel) {
    const pool = new SweepPool(options.jobs);
    try {
      for (const s of result.suggestions) {
        const others = await pool.sweep({ text, fileName: options.file }, s.gains, { ...sweep, nominal: false, structure: s.structure, envelope: false });
        const e = s.evaluation;
        s.worstCase = summarise([caseFigures('nominal', {}, e.result, e.metrics, caseMs(e.margins)), ...others.cases]);
      }
    } finally {
      await pool.close();
    }
  }
  io.out(options.json ? toJson(suggestJson(options.file, plant, result)) : summaryText(plant, result));
  return 0;
}
