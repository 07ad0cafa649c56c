/**
 * `looprig bump-plan [FILE] [figures]`: plan a bump test before any data exists: the step size
 * for a readable response, the sample interval, how long to hold each step, and a PRBS
 * alternative (ident/test-plan.ts). The test is printed as a `trial:` the user can rehearse on
 * the simulation first; --out writes a plant file that runs it (the given FILE with its trial
 * replaced, or a first-order file made from the figures).
 */
import { parseDocument } from 'yaml';
import { planBumpTest } from '../../ident/index.js';
import type { PlanFigures, PlanMove, TestPlan } from '../../ident/index.js';
import { parseDuration } from '../../model/index.js';
import { lowOrderOf, tuningContext } from '../../tune/index.js';
import { UserError } from '../errors.js';
import { num } from '../format.js';
import type { Io } from '../io.js';
import { snakeKeys, toJson } from '../json.js';
import { loadPlantFile } from '../load-plant-file.js';
import { parseCommandArgs } from '../parse-command.js';
import { writeOutput } from '../write-output.js';

/** Help text of `bump-plan`. */
export const BUMP_PLAN_USAGE = `looprig bump-plan [FILE] - plan a bump test before logging one

Usage:
  looprig bump-plan FILE [options]          figures from the plant file (its linear model at
                                            the trial's operating point, sensor noise, actuator)
  looprig bump-plan --gain K --time-constant T --delay L --noise S [options]

Options (each overrides what FILE says):
  --gain K            static gain, output units per input unit (the slope per second with
                      --integrating)
  --time-constant T   dominant time constant (units allowed: 90s, 1.5min)
  --delay L           dead time (0 allowed)
  --integrating       the output ramps instead of settling
  --noise S           output noise standard deviation, output units
  --input U           actuator position at the operating point (default: the file's initial
                      output, or 0)
  --actuator-min U    actuator limits
  --actuator-max U
  --snr R             response to noise ratio to aim for (default 10)
  --prbs              make the trial the PRBS test instead of the steps
  --out FILE          write a plant file that runs the test as its trial (never over an
                      existing file)
  --json              print one JSON document on stdout
  -h, --help          show this text

Exit status: 0 planned; 2 bad arguments or figures.
`;

/** \`looprig bump-plan ...\` */
export async function bumpPlanCommand(args: readonly string[], io: Io): Promise<number> {
  const { values, positionals } = parseCommandArgs('bump-plan', args, {
    gain: { type: 'string' },
    'time-constant': { type: 'string' },
    delay: { type: 'string' },
    integrating: { type: 'boolean' },
    noise: { type: 'string' },
    input: { type: 'string' },
    'actuator-min': { type: 'string' },
    'actuator-max': { type: 'string' },
    snr: { type: 'string' },
    prbs: { type: 'boolean' },
    out: { type: 'string' },
    json: { type: 'boolean' },
    help: { type: 'boolean', short: 'h' },
  });
  if (values.help) {
    io.out(BUMP_PLAN_USAGE);
    return 0;
  }
  if (positionals.length > 1) throw new UserError(`bump-plan: one FILE at most, got ${positionals.length}`);
  const file = positionals[0] ?? null;
  const fromFile = file !== null ? figuresOfFile(file, io) : null;
  const number = (flag: string, raw: string | undefined): number | null => {
    if (raw === undefined) return null;
    const v = Number(raw);
    if (raw.trim() === '' || !Number.isFinite(v)) throw new UserError(`bump-plan: --${flag} ${raw}: expected a number`);
    return v;
  };
  const time = (flag: string, raw: string | undefined): number | null => {
    if (raw === undefined) return null;
    let v: number;
    try {
      v = parseDuration(raw);
    } catch {
      throw new UserError(`bump-plan: --${flag} ${raw}: not a time (write e.g. 90, 90s, 1.5min)`);
    }
    if (!(v >= 0) || !Number.isFinite(v)) throw new UserError(`bump-plan: --${flag} must be a time of 0 or more, got ${raw}`);
    return v;
  };
  const integrating = values.integrating === true || (fromFile?.integrating ?? false);
  const gain = number('gain', values.gain) ?? fromFile?.gain ?? null;
  const timeConstant = time('time-constant', values['time-constant']) ?? fromFile?.timeConstant ?? null;
  const delay = time('delay', values.delay) ?? fromFile?.delay ?? null;
  const noise = number('noise', values.noise) ?? fromFile?.noiseStd ?? null;
  const missing: string[] = [];
  if (gain === null) missing.push('--gain K');
  if (!integrating && timeConstant === null) missing.push('--time-constant T');
  if (delay === null) missing.push('--delay L');
  if (noise === null) missing.push('--noise S');
  if (missing.length > 0) throw new UserError(`bump-plan: give ${missing.join(', ')} (or a plant FILE to take them from)`);
  if (gain === 0) throw new UserError('bump-plan: --gain must not be 0 (the output would not respond)');
  if (!integrating && !(timeConstant! > 0)) throw new UserError('bump-plan: --time-constant must be positive (or pass --integrating)');
  if (noise! < 0) throw new UserError('bump-plan: --noise must be 0 or more');
  const snr = number('snr', values.snr);
  if (snr !== null && !(snr > 0)) throw new UserError('bump-plan: --snr must be positive');
  const figures: PlanFigures = {
    gain: gain!,
    timeConstant: timeConstant ?? 0,
    delay: delay!,
    integrating,
    noiseStd: noise!,
    operatingInput: number('input', values.input) ?? fromFile?.operatingInput ?? 0,
    inputMin: number('actuator-min', values['actuator-min']) ?? fromFile?.inputMin ?? null,
    inputMax: number('actuator-max', values['actuator-max']) ?? fromFile?.inputMax ?? null,
    signalToNoise: snr ?? undefined,
  };
  if (figures.inputMin !== null && figures.inputMax !== null && !(figures.inputMin < figures.inputMax)) {
    throw new UserError('bump-plan: --actuator-min must be below --actuator-max');
  }
  const plan = planBumpTest(figures);
  const usePrbs = values.prbs === true;
  const trialText = trialYaml(plan, usePrbs);
  const out = values.out ?? null;
  if (out !== null) {
    let taken: boolean;
    try {
      taken = io.exists(out);
    } catch (error) {
      throw new UserError(`bump-plan: cannot tell whether ${out} exists (${(error as Error).message}); not written`);
    }
    if (taken) throw new UserError(`bump-plan: ${out} exists; choose another --out`);
    const text = file !== null ? withTrial(io.readText(file), plan, usePrbs) : newPlantFile(figures, plan, usePrbs);
    writeOutput(io, out, text, {}, 'bump-plan');
  }
  if (values.json === true) {
    io.out(toJson({ figures: snakeKeys(figures), plan: snakeKeys(plan), trial: trialText, out }));
    return 0;
  }
  io.out(summary(figures, plan, file, fromFile?.notes ?? []));
  io.out(`\nthe ${usePrbs ? 'PRBS' : 'step'} test as a trial (put it under loop: and rehearse it with looprig run):\n${trialText}`);
  if (out !== null) io.out(`wrote ${out} (try it: looprig run ${out})\n`);
  return 0;
}

/** What a plant file says about the test, with notes from reading it. */
type FileFigures = Omit<PlanFigures, 'signalToNoise'> & { notes: string[] };

/** Figures from a plant file: the low-order model of its linearisation at the trial's operating point. */
function figuresOfFile(path: string, io: Io): FileFigures {
  const spec = loadPlantFile(path, io).plant;
  const ctx = tuningContext(spec);
  if (ctx.linear === null) throw new UserError(`bump-plan: ${path}: no linear model at the trial's operating point; give --gain, --time-constant and --delay`);
  // An open-loop test: no controller sample hold in the delay.
  const low = lowOrderOf(ctx.linear, { sampleTime: 0, sensor: spec.sensor });
  const a = spec.actuator;
  const common = {
    noiseStd: spec.sensor.noiseStd,
    operatingInput: spec.loop.trial.initialOutput ?? 0,
    inputMin: Number.isFinite(a.min) ? a.min : null,
    inputMax: Number.isFinite(a.max) ? a.max : null,
    notes: [...ctx.notes, ...low.notes],
  };
  if (low.fopdt !== null) return { gain: low.fopdt.k, timeConstant: low.fopdt.tau1, delay: low.fopdt.theta, integrating: false, ...common };
  if (low.integrating !== null) return { gain: low.integrating.kv, timeConstant: 0, delay: low.integrating.theta, integrating: true, ...common };
  throw new UserError(`bump-plan: ${path}: no first-order or integrating approximation of the plant; give --gain, --time-constant and --delay`);
}

function summary(f: PlanFigures, p: TestPlan, file: string | null, notes: readonly string[]): string {
  const lines = [
    `plant: ${file ?? 'figures given'}: ${f.integrating ? `integrating, slope ${num(f.gain)} per s per input unit` : `gain ${num(f.gain)}, time constant ${num(f.timeConstant)} s`}, dead time ${num(f.delay)} s, noise σ ${num(f.noiseStd)}`,
    `operating point: input ${num(f.operatingInput)}${f.inputMin !== null || f.inputMax !== null ? `, actuator ${f.inputMin ?? '-'} .. ${f.inputMax ?? '-'}` : ''}`,
    '',
    `sample interval  ${num(p.sampleInterval)} s (a tenth of the time constant, at most half the dead time)`,
    `step             ${num(p.step)} (expected response ${num(p.expectedResponse)}, ${num(p.signalToNoise, 3)} × the noise)`,
    `timing           ${num(p.rest)} s at rest, the step held ${num(p.hold)} s, then back for as long: ${num(p.duration)} s in all`,
    `PRBS alternative register of ${p.prbs.bits} bits (period ${p.prbs.period} clocks), clock ${num(p.prbs.clock)} s, amplitude ±${num(p.prbs.amplitude)}, two periods: ${num(p.prbs.duration)} s`,
    '                 (clock ≤ 2.8 τ/2, period ≥ 2π·3·τ: Rivera & Jun, IEEE Control Systems Magazine 20(3) 2000)',
  ];
  for (const w of p.warnings) lines.push(`warning: ${w}`);
  for (const n of notes) lines.push(`note: ${n}`);
  return `${lines.join('\n')}\n`;
}

function moves(p: TestPlan, prbs: boolean): PlanMove[] {
  return prbs ? p.prbs.moves : p.moves;
}

function r(x: number): number {
  return +x.toPrecision(8);
}

/** The test as a `trial:` block (manual output moves), indented under `loop:`. */
function trialYaml(p: TestPlan, prbs: boolean): string {
  const lines = [
    '  trial:',
    `    duration: ${r(prbs ? p.prbs.duration : p.duration)} s`,
    `    initial_output: ${r(moves(p, prbs)[0].output)}`,
    '    events:',
    ...moves(p, prbs).map((m) => `      - { at: ${r(m.at)} s, mode: manual, output: ${r(m.output)} }`),
  ];
  return `${lines.join('\n')}\n`;
}

/** The events as YAML data for the Document API. */
function trialData(p: TestPlan, prbs: boolean): Record<string, unknown> {
  return {
    duration: `${r(prbs ? p.prbs.duration : p.duration)} s`,
    initial_output: r(moves(p, prbs)[0].output),
    events: moves(p, prbs).map((m) => ({ at: `${r(m.at)} s`, mode: 'manual', output: r(m.output) })),
  };
}

/** The plant file with its trial replaced by the test (comments elsewhere kept). */
function withTrial(text: string, p: TestPlan, prbs: boolean): string {
  const doc = parseDocument(text);
  const node = doc.createNode(trialData(p, prbs));
  for (const item of (node as unknown as { get(k: string, keep: boolean): { items: { flow: boolean }[] } }).get('events', true).items) item.flow = true;
  doc.setIn(['loop', 'trial'], node);
  doc.deleteIn(['loop', 'requirements']);
  return String(doc);
}

/** A first-order plant file from the figures that runs the test. */
function newPlantFile(f: PlanFigures, p: TestPlan, prbs: boolean): string {
  const model = f.integrating
    ? `  type: integrating\n  gain: ${r(f.gain)}\n  delay: ${r(f.delay)} s\n`
    : `  type: first_order\n  gain: ${r(f.gain)}\n  time_constant: ${r(f.timeConstant)} s\n  delay: ${r(f.delay)} s\n`;
  const act = f.inputMin !== null || f.inputMax !== null
    ? `actuator: {${f.inputMin !== null ? ` min: ${r(f.inputMin)}` : ''}${f.inputMin !== null && f.inputMax !== null ? ',' : ''}${f.inputMax !== null ? ` max: ${r(f.inputMax)}` : ''} }\n`
    : '';
  return [
    '# Bump-test rehearsal written by looprig bump-plan from rough figures: run it with looprig run',
    '# to see what the test will show. The model is in deviation variables around the operating point;',
    '# the actuator positions in the trial are absolute, as given.',
    'name: Bump-test rehearsal',
    'model:',
    model.trimEnd(),
    act.trimEnd(),
    `sensor: { noise_std: ${r(f.noiseStd)}, seed: 1 }`,
    'loop:',
    `  sample_time: ${r(p.sampleInterval)} s`,
    '  controller: { structure: pi, form: ideal, kc: 1, ti: 100 s }   # unused: the test runs in manual',
    trialYaml(p, prbs).trimEnd(),
    '',
  ].filter((l) => l !== '').join('\n') + '\n';
}

