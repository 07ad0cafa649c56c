/**
 * `looprig export FILE`: the file's gain set in the form and units a controller takes, and the
 * discrete velocity-form coefficients for firmware, with the difference equation written out.
 *
 * Conversions: Åström & Hägglund, Advanced PID Control, ISA 2006, ch. 3 (from memory), restated in
 * published-checks.md section 13. Proportional band and repeats per minute: common practice (ISA
 * usage; sheet section 13 [2+]; B. G. Lipták (ed.), Instrument Engineers' Handbook, vol. 2 Process
 * Control, from memory). Discrete coefficients: sheet section 14 (control/velocity-form.ts).
 *
 * Exit status: 0 printed; 2 bad arguments, a bad plant file, or a conversion that cannot be done
 * for this file (series form with Ti < 4 Td, a proportional band without spans). A refused
 * conversion is 2, not 1, because 1 means "a requirement failed" to every looprig command.
 */
import { onePositional, parseCommandArgs } from '../parse-command.js';
import { DISCRETISATION_METHODS, fromIdeal, seriesRealizable, velocityForm } from '../../control/index.js';
import type { DiscretisationMethod, VelocityForm } from '../../control/index.js';
import { plantUnits, withUnit, type PlantUnits } from '../../model/index.js';
import type { PidForm, PlantSpec } from '../../model/types.js';
import { UserError } from '../errors.js';
import { num, table } from '../format.js';
import type { Io } from '../io.js';
import { toJson } from '../json.js';
import { loadPlantFile } from '../load-plant-file.js';

export const EXPORT_USAGE = `Usage: looprig export FILE [options]

Prints the plant file's controller gains converted to the form and units your controller takes,
and optionally the discrete velocity-form coefficients for the file's sample time.

Options:
  --form F              ideal (Kc, Ti, Td) | parallel (Kp, Ki, Kd) | series (interacting);
                        default: the form the file uses
  --time-unit U         s | min for Ti, Td (and Ki per s / per min, Kd in s / min); default s
  --proportional-band   also give the gain as a proportional band, % of span
                        (needs sensor.span and finite actuator limits in the file)
  --repeats             also give the integral action as repeats per minute (= 1/Ti in min)
  --discrete            velocity-form coefficients for the file's sample time and filter
  --method M            backward | tustin | forward (default backward; forward = the law the
                        simulator runs)
  --json                one JSON document on stdout
  -h, --help            show this text

Exit status: 0 printed, 2 bad arguments or file, or a conversion that cannot be done
(series form needs Ti >= 4 Td; a proportional band needs the spans).
`;

/** Shown with every text export: simulated gains are where commissioning starts, not where it ends. */
export const EXPORT_CAUTION =
  'Caution: these gains come from a simulation of a model. Treat them as a starting point: try them on ' +
  'the equipment with its interlocks in place and a manual fallback at hand, watch the first upsets, ' +
  'and defer to local codes and licensed engineering practice.';

const FORMS: readonly PidForm[] = ['ideal', 'parallel', 'series'];

interface ExportArgs {
  file: string;
  form: PidForm | null;
  timeUnit: 's' | 'min';
  proportionalBand: boolean;
  repeats: boolean;
  discrete: boolean;
  method: DiscretisationMethod;
  json: boolean;
}

function parseExportArgs(args: readonly string[]): ExportArgs | 'help' {
  const { values, positionals } = parseCommandArgs('export', args, {
    form: { type: 'string' },
    'time-unit': { type: 'string' },
    'proportional-band': { type: 'boolean' },
    repeats: { type: 'boolean' },
    discrete: { type: 'boolean' },
    method: { type: 'string' },
    json: { type: 'boolean' },
    help: { type: 'boolean', short: 'h' },
  });
  if (values.help) return 'help';
  onePositional('export', positionals);
  const form = values.form ?? null;
  if (form !== null && !(FORMS as readonly string[]).includes(form)) {
    throw new UserError(`export: --form is '${form}'; expected one of ${FORMS.join(', ')}`);
  }
  const unit = values['time-unit'] ?? 's';
  if (unit !== 's' && unit !== 'min') throw new UserError(`export: --time-unit is '${unit}'; expected s or min`);
  const method = values.method ?? 'backward';
  if (!(DISCRETISATION_METHODS as readonly string[]).includes(method)) {
    throw new UserError(`export: --method is '${method}'; expected one of ${DISCRETISATION_METHODS.join(', ')}`);
  }
  if (values.method !== undefined && values.discrete !== true) throw new UserError('export: --method goes with --discrete');
  return {
    file: positionals[0],
    form: form as PidForm | null,
    timeUnit: unit,
    proportionalBand: values['proportional-band'] === true,
    repeats: values.repeats === true,
    discrete: values.discrete === true,
    method: method as DiscretisationMethod,
    json: values.json === true,
  };
}

/** One exported parameter: value in the stated unit. */
export interface ExportValue {
  name: string;
  value: number;
  unit: string;
  meaning: string;
}

/** Everything `export` computed. */
export interface ExportReport {
  file: string;
  plant: string;
  /** The file's units of the output and the actuator. */
  units: PlantUnits;
  structure: string;
  /** The form and values as written in the file (times in s). */
  source: { form: PidForm; values: Record<string, number> };
  form: PidForm;
  timeUnit: 's' | 'min';
  values: ExportValue[];
  proportionalBand: {
    percent: number;
    action: 'reverse' | 'direct';
    normalisedGain: number;
    sensorSpan: [number, number];
    actuatorSpan: [number, number];
  } | null;
  repeats: { perMinute: number; minutesPerRepeat: number } | null;
  discrete: VelocityForm | null;
}

const FORM_TITLE: Readonly<Record<PidForm, string>> = {
  ideal: 'ideal (ISA, non-interacting): C(s) = Kc (1 + 1/(Ti s) + Td s)',
  parallel: 'parallel (independent gains): C(s) = Kp + Ki/s + Kd s',
  series: 'series (interacting): C(s) = Kc (1 + 1/(Ti s)) (1 + Td s)',
};

/** Compute the export of a loaded plant. Throws UserError (exit 2) for a conversion that cannot be done. */
export function exportPlant(plant: PlantSpec, file: string, a: Omit<ExportArgs, 'file' | 'json'>): ExportReport {
  const c = plant.loop.controller;
  const g = c.gains;
  const form = a.form ?? c.form;
  const ideal = { kc: g.kc, ti: g.ti, td: g.td };
  if (form === 'series' && !seriesRealizable(g.ti, g.td)) {
    throw new UserError(
      `export: ${file}: no series form for these gains: the series (interacting) form needs Ti >= 4 Td, ` +
        `here Ti = ${num(g.ti)} s < 4 Td = ${num(4 * g.td)} s, so the controller's zeros are complex ` +
        '(Åström & Hägglund 2006, ch. 3). Use --form ideal or --form parallel.',
    );
  }
  const converted = fromIdeal(form, ideal);
  if (converted === null) throw new UserError(`export: ${file}: cannot convert to the ${form} form`);
  const tu = a.timeUnit === 'min' ? 60 : 1;
  const un = a.timeUnit;
  const units = plantUnits(plant);
  // The gain's unit: the controller output's per the measurement's, in the file's units where it gives them.
  const gainUnit = `${units.actuator ?? 'output'} per ${units.output ?? 'measured unit'}`;
  const values: ExportValue[] = [];
  if (form === 'parallel') {
    values.push({ name: 'Kp', value: converted.kp, unit: gainUnit, meaning: 'proportional gain' });
    values.push({ name: 'Ki', value: converted.ki * tu, unit: `${gainUnit} per ${un}`, meaning: 'integral gain (Kc/Ti)' });
    values.push({ name: 'Kd', value: converted.kd / tu, unit: `${gainUnit} times ${un}`, meaning: 'derivative gain (Kc Td)' });
  } else {
    values.push({ name: 'Kc', value: converted.kc, unit: gainUnit, meaning: 'controller gain' });
    values.push({
      name: 'Ti',
      value: converted.ti / tu,
      unit: un,
      meaning: converted.ti === Infinity ? 'integral time (no integral action)' : `integral time (${un} per repeat)`,
    });
    values.push({ name: 'Td', value: converted.td / tu, unit: un, meaning: 'derivative time' });
  }

  let proportionalBand: ExportReport['proportionalBand'] = null;
  if (a.proportionalBand) {
    const span = plant.sensor.span;
    const { min, max } = plant.actuator;
    const missing: string[] = [];
    if (span === null) missing.push('sensor.span (the measurement range [low, high])');
    if (!Number.isFinite(min) || !Number.isFinite(max)) missing.push('finite actuator.min and actuator.max (the output range)');
    if (missing.length > 0) {
      throw new UserError(`export: ${file}: a proportional band is a percentage of the spans; the file needs ${missing.join(' and ')}`);
    }
    const kp = form === 'parallel' ? converted.kp : converted.kc;
    const sy = span![1] - span![0];
    const su = max - min;
    const kn = (kp * sy) / su;
    if (kn === 0) throw new UserError(`export: ${file}: the gain is 0: the proportional band would be infinite`);
    proportionalBand = {
      percent: 100 / Math.abs(kn),
      action: kn > 0 ? 'reverse' : 'direct',
      normalisedGain: kn,
      sensorSpan: [span![0], span![1]],
      actuatorSpan: [min, max],
    };
  }

  let repeats: ExportReport['repeats'] = null;
  if (a.repeats) {
    // The integral time of the form as exported: Ti' for series, Kp/Ki for parallel.
    const tiForm = form === 'parallel' ? (converted.ki === 0 ? Infinity : converted.kp / converted.ki) : converted.ti;
    if (tiForm === Infinity) throw new UserError(`export: ${file}: the controller has no integral action, so no repeats per minute`);
    repeats = { perMinute: 60 / tiForm, minutesPerRepeat: tiForm / 60 };
  }

  const discrete = a.discrete ? velocityForm(g, plant.loop.sampleTime, a.method) : null;
  return {
    file,
    plant: plant.name,
    units,
    structure: c.named ?? c.structure,
    source: { form: c.form, values: { ...c.values } },
    form,
    timeUnit: a.timeUnit,
    values,
    proportionalBand,
    repeats,
    discrete,
  };
}

/** `looprig export ...` */
export async function exportCommand(args: readonly string[], io: Io): Promise<number> {
  const a = parseExportArgs(args);
  if (a === 'help') {
    io.out(EXPORT_USAGE);
    return 0;
  }
  const loaded = loadPlantFile(a.file, io);
  const report = exportPlant(loaded.plant, a.file, a);
  io.out(a.json ? toJson(exportJson(report)) : exportText(report));
  return 0;
}

/** The `--json` document. */
export function exportJson(r: ExportReport): unknown {
  const d = r.discrete;
  return {
    plant: { name: r.plant, file: r.file },
    // The units of the output and the actuator, once (the values' own units are spelt out beside them).
    units: r.units,
    structure: r.structure,
    source: r.source,
    form: r.form,
    time_unit: r.timeUnit,
    values: Object.fromEntries(r.values.map((v) => [v.name.toLowerCase(), { value: v.value, unit: v.unit }])),
    proportional_band: r.proportionalBand && {
      percent: r.proportionalBand.percent,
      action: r.proportionalBand.action,
      normalised_gain: r.proportionalBand.normalisedGain,
      sensor_span: r.proportionalBand.sensorSpan,
      actuator_span: r.proportionalBand.actuatorSpan,
    },
    repeats: r.repeats && { per_minute: r.repeats.perMinute, minutes_per_repeat: r.repeats.minutesPerRepeat },
    discrete: d && {
      method: d.method,
      sample_time: d.h,
      k: d.k,
      ti: d.ti,
      td: d.td,
      n: d.n,
      b: d.b,
      c: d.c,
      ci0: d.ci0,
      ci1: d.ci1,
      ad: d.ad,
      bd: d.bd,
      r0: d.r0,
      r1: d.r1,
      r2: d.r2,
      q0: d.q0,
      q1: d.q1,
      q2: d.q2,
    },
    caution: EXPORT_CAUTION,
  };
}

/** Significant digits for exported numbers: enough to type in without a visible change of behaviour. */
const DIGITS = 6;

const fmt = (x: number): string => (x === Infinity ? 'infinity (none)' : num(x, DIGITS));

/** The human-readable export. */
export function exportText(r: ExportReport): string {
  const lines: string[] = [];
  const src = Object.entries(r.source.values)
    .map(([k, v]) => `${k} ${k === 'ti' || k === 'td' ? (v === Infinity ? 'none' : `${num(v, DIGITS)} s`) : num(v, DIGITS)}`)
    .join(', ');
  lines.push(`${r.plant}  (${r.file})`);
  lines.push(`controller ${r.structure}, written in the ${r.source.form} form: ${src}`);
  if (!['p', 'pi', 'pd', 'pid'].includes(r.structure)) {
    lines.push(`(structure ${r.structure}: these are the main PID gains; the settings of its own section are as written in the file)`);
  }
  lines.push('');
  lines.push(`${FORM_TITLE[r.form]}`);
  lines.push(
    table(r.values.map((v) => ['  ' + v.name, fmt(v.value), v.value === Infinity ? '' : v.unit, v.meaning]))
      .split('\n')
      .join('\n'),
  );
  if (r.repeats) {
    lines.push(
      `  integral action: ${num(r.repeats.perMinute, DIGITS)} repeats per minute ` +
        `(= 1/Ti with Ti = ${num(r.repeats.minutesPerRepeat, DIGITS)} minutes per repeat)`,
    );
  }
  if (r.proportionalBand) {
    const pb = r.proportionalBand;
    // Reverse acting (K > 0 on e = r - y): the output falls as the measurement rises.
    const how = pb.action === 'reverse' ? 'falls' : 'rises';
    lines.push(`  proportional band: ${num(pb.percent, DIGITS)} % (${pb.action} acting: the output ${how} as the measurement rises)`);
    lines.push(
      `    PB = 100 / Kn with Kn = K x span_y / span_u = ${num(pb.normalisedGain, DIGITS)} (dimensionless, % output per % measurement);`,
    );
    lines.push(
      `    sensor span ${withUnit(`[${num(pb.sensorSpan[0])}, ${num(pb.sensorSpan[1])}]`, r.units.output)} (sensor.span), ` +
        `output span ${withUnit(`[${num(pb.actuatorSpan[0])}, ${num(pb.actuatorSpan[1])}]`, r.units.actuator)} (actuator limits)`,
    );
  }
  if (r.form === 'series' && r.source.form !== 'series') {
    lines.push('  (series values are not the ideal ones: Kc = Kc\'(1 + Td\'/Ti\'), Ti = Ti\' + Td\', Td = Ti\'Td\'/(Ti\' + Td\'))');
  }
  if (r.discrete) lines.push('', ...discreteText(r.discrete));
  lines.push('', wrap(EXPORT_CAUTION, 96));
  return `${lines.join('\n')}\n`;
}

const METHOD_TITLE: Readonly<Record<DiscretisationMethod, string>> = {
  backward: 'backward difference (integral by backward rectangle, derivative filter by backward difference)',
  tustin: 'Tustin (trapezoidal integral, derivative filter by Tustin)',
  forward: 'forward-rectangle integral, backward-difference derivative filter (the law the simulator runs)',
};

function discreteText(v: VelocityForm): string[] {
  const f = (x: number): string => num(x, 8);
  const out: string[] = [];
  out.push(`discrete velocity form, ${METHOD_TITLE[v.method]}`);
  out.push(
    `  sample time h = ${num(v.h, DIGITS)} s, from the ideal form K = ${num(v.k, DIGITS)}, Ti = ${v.ti === Infinity ? 'none' : `${num(v.ti, DIGITS)} s`}, ` +
      `Td = ${num(v.td, DIGITS)} s, N = ${num(v.n, DIGITS)}, setpoint weights b = ${num(v.b)}, c = ${num(v.c)}`,
  );
  out.push('  every sample k:');
  out.push('    e(k)  = r(k) - y(k)        ep(k) = b r(k) - y(k)        ed(k) = c r(k) - y(k)');
  out.push('    D(k)  = ad D(k-1) + bd (ed(k) - ed(k-1))');
  out.push('    du(k) = K (ep(k) - ep(k-1)) + ci0 e(k) + ci1 e(k-1) + D(k) - D(k-1)');
  out.push('    u(k)  = u(k-1) + du(k), limited to the output range; keep the limited value as u(k)');
  out.push('            (an increment form with a limited output needs no further anti-windup)');
  out.push(
    '  ' +
      table([
        ['K', f(v.k)],
        ['ci0', f(v.ci0)],
        ['ci1', f(v.ci1)],
        ['ad', f(v.ad)],
        ['bd', f(v.bd)],
      ])
        .split('\n')
        .join('\n  '),
  );
  if (v.ad < 0) out.push(`  note: ad < 0 (h > 2 Td/N): this Tustin filter rings; the backward method does not`);
  out.push('  with b = c = 1 the same law in one line:');
  out.push('    du(k) = ad du(k-1) + r0 e(k) + r1 e(k-1) + r2 e(k-2)');
  out.push(`    r0 = ${f(v.r0)}   r1 = ${f(v.r1)}   r2 = ${f(v.r2)}   ad = ${f(v.ad)}`);
  out.push('  without the derivative filter (N -> infinity, backward-difference derivative):');
  out.push('    du(k) = q0 e(k) + q1 e(k-1) + q2 e(k-2)');
  out.push(`    q0 = ${f(v.q0)}   q1 = ${f(v.q1)}   q2 = ${f(v.q2)}`);
  return out;
}

function wrap(text: string, width: number): string {
  const words = text.split(' ');
  const lines: string[] = [];
  let line = '';
  for (const w of words) {
    if (line.length > 0 && line.length + 1 + w.length > width) {
      lines.push(line);
      line = w;
    } else line = line.length > 0 ? `${line} ${w}` : w;
  }
  if (line) lines.push(line);
  return lines.join('\n');
}
