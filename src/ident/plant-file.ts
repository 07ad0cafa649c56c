/**
 * Write a fitted model as a plant file (YAML with comments, through the yaml Document API),
 * ready to tune against: the model in deviation variables around the pre-step operating point,
 * the actuator limits the user gave (never the span the log visited), the sensor noise from the
 * pre-step segment, a loop with a conservative starting PI and a setpoint-step trial.
 */
import { Document, Scalar, YAMLMap, YAMLSeq } from 'yaml';
import type { BumpData } from './bump-data.js';
import type { IdentifyResult } from './identify.js';
import { startingPi } from './starting-pi.js';

/** Where the fit came from, for the header comment. */
export interface PlantFileSource {
  /** The log file name as the user gave it. */
  fileName: string;
  /** Window start and end on the log's clock, s. */
  from: number;
  to: number;
  /** Name for the plant (default: "Fitted from FILE"). */
  name?: string;
  /**
   * The actuator's real limits in the log's input units, from the user. Absent: the file gets no
   * actuator limits. The span the log happened to visit is never used: a bump test moves the
   * input a little, and limits that tight saturate every trial.
   */
  actuator?: { min: number | null; max: number | null };
}

/** Significant digits written for fitted numbers (the fit is not better than this). */
const DIGITS = 5;

/**
 * Plant-file text for model `index` of `result` (default: the chosen one). The variables are
 * deviations from the operating point (input − u0, output − y0): the linear kinds have no
 * offset fields, and a tuning does not need one.
 */
export function buildPlantFile(result: IdentifyResult, data: BumpData, source: PlantFileSource, index = result.chosen): string {
  const m = result.models[index];
  const fit = m.fit;
  const v = fit.values;
  const a = result.analysis;
  const y0 = v[v.length - 1];
  const h = data.dt;
  const pi = startingPi(fit.kind, v, h);

  const model = new YAMLMap();
  // Values go in as Scalar nodes so they can carry a comment.
  const put = (key: string, value: unknown): void => {
    model.set(key, value instanceof YAMLSeq ? value : new Scalar(value));
  };
  const modelComments: Record<string, string> = {};
  const ci = (name: string): string => {
    const p = fit.parameters.find((q) => q.name === name);
    if (p === undefined) return '';
    if (p.atBound) return ' at the edge of the search range';
    return p.ci95 === null ? '' : ` 95 % interval ${r(p.ci95[0])} .. ${r(p.ci95[1])}`;
  };
  let typeNote = '';
  switch (fit.kind) {
    case 'first_order':
      put('type', 'first_order');
      put('gain', r(v[0]));
      put('time_constant', `${r(v[1])} s`);
      put('delay', `${r(v[2])} s`);
      modelComments.gain = ci('gain');
      modelComments.time_constant = ci('time_constant');
      modelComments.delay = ci('delay');
      break;
    case 'second_order': {
      const lagSum = v[1];
      const shape = v[2];
      if (shape <= 0.25) {
        const s = Math.sqrt(1 - 4 * shape);
        const t1 = (lagSum * (1 + s)) / 2;
        const t2 = (lagSum * (1 - s)) / 2;
        if (!(t2 > 1e-9 * t1)) {
          // The second lag vanished: the data show one lag, so write the first-order model it is.
          put('type', 'first_order');
          put('gain', r(v[0]));
          put('time_constant', `${r(t1)} s`);
          put('delay', `${r(v[3])} s`);
          typeNote = ' (the second-order fit found no second lag: written as first order)';
        } else {
          put('type', 'second_order');
          put('gain', r(v[0]));
          const seq = new YAMLSeq();
          seq.flow = true;
          seq.add(`${r(t1)} s`);
          seq.add(`${r(t2)} s`);
          put('time_constant', seq);
          put('delay', `${r(v[3])} s`);
          modelComments.time_constant = `${ci('time_constant_1')};${ci('time_constant_2')}`;
        }
      } else {
        put('type', 'second_order');
        put('gain', r(v[0]));
        put('natural_frequency', r(1 / (lagSum * Math.sqrt(shape))));
        put('damping', r(1 / (2 * Math.sqrt(shape))));
        put('delay', `${r(v[3])} s`);
        modelComments.natural_frequency = `rad/s;${ci('natural_frequency')}`;
        modelComments.damping = ci('damping');
      }
      modelComments.gain = ci('gain');
      modelComments.delay = ci('delay');
      break;
    }
    case 'integrating':
      put('type', 'integrating');
      put('gain', r(v[0]));
      put('delay', `${r(v[2])} s`);
      put('time_constant', `${r(v[1])} s`);
      modelComments.gain = `output units per second per input unit;${ci('gain')}`;
      modelComments.delay = ci('delay');
      modelComments.time_constant = ci('time_constant');
      break;
    case 'inverse_response': {
      // K (−Tz s + 1)/(T s + 1) as a transfer function in descending powers of s.
      put('type', 'transfer');
      const num = new YAMLSeq();
      num.flow = true;
      num.add(r(-v[0] * v[2]));
      num.add(r(v[0]));
      const den = new YAMLSeq();
      den.flow = true;
      den.add(r(v[1]));
      den.add(1);
      put('numerator', num);
      put('denominator', den);
      put('delay', `${r(v[3])} s`);
      modelComments.numerator = ` K (−Tz s + 1) with K = ${r(v[0])}${ci('gain')}, Tz = ${r(v[2])} s${ci('zero_time_constant')}`;
      modelComments.denominator = ` T s + 1 with T = ${r(v[1])} s${ci('time_constant')}`;
      modelComments.delay = ci('delay');
      break;
    }
  }
  for (const [key, text] of Object.entries(modelComments)) {
    const node = model.get(key, true) as Scalar | YAMLSeq | undefined;
    if (node !== undefined && text.trim() !== '' && text.trim() !== ';') node.comment = ` ${text.trim().replace(/^;\s*/, '')}`;
  }

  // Actuator: the limits the user gave, as deviations; none given, none written.
  const limits = source.actuator;
  let actuator: YAMLMap | null = null;
  if (limits !== undefined && (limits.min !== null || limits.max !== null)) {
    actuator = new YAMLMap();
    if (limits.min !== null) actuator.set('min', r(limits.min - fit.u0));
    if (limits.max !== null) actuator.set('max', r(limits.max - fit.u0));
    actuator.commentBefore = ` the actuator's limits as given (${data.inputName} ${limits.min ?? '-'} .. ${limits.max ?? '-'}), as deviations from ${r(fit.u0)}`;
  }

  const sensor = new YAMLMap();
  sensor.set('noise_std', r(a.noiseStd));
  sensor.set('seed', 1);
  sensor.commentBefore = a.noiseSource === 'pre-step'
    ? ` noise estimated from the ${a.preStepEnd} samples before the step (straight-line detrended)`
    : ' noise estimated from second differences over the whole record (no quiet pre-step segment)';

  // Trial: a setpoint step of half the response seen in the log, at a tenth of the duration.
  let amplitude = 0;
  for (let i = 0; i < fit.response.length; i++) {
    const d = fit.response[i] - y0;
    if (Math.abs(d) > Math.abs(amplitude)) amplitude = d;
  }
  const duration = Math.max(data.n * data.dt, 20 * (pi.tauC + pi.effectiveDelay), 20 * h);
  const stepAt = 0.1 * duration;
  const controller = new YAMLMap();
  controller.set('structure', 'pi');
  controller.set('form', 'ideal');
  controller.set('kc', r(pi.kc));
  controller.set('ti', `${r(pi.ti)} s`);
  controller.set('anti_windup', 'clamp');
  controller.commentBefore = ` starting PI: ${pi.rule}`;
  const event0 = new YAMLMap();
  event0.flow = true;
  event0.set('at', '0 s');
  event0.set('setpoint', 0);
  const event1 = new YAMLMap();
  event1.flow = true;
  event1.set('at', `${r(stepAt)} s`);
  event1.set('setpoint', r(amplitude / 2));
  const events = new YAMLSeq();
  events.add(event0);
  events.add(event1);
  const trial = new YAMLMap();
  trial.set('duration', `${r(duration)} s`);
  trial.set('events', events);
  trial.commentBefore = ' setpoint step of half the response seen in the log';
  const loop = new YAMLMap();
  loop.set('sample_time', `${r(h)} s`);
  if (fit.kind === 'inverse_response') {
    // The engine rounds the input delay to whole integration steps, and this model's output jumps
    // when the delayed input arrives: a tenth of the sample time keeps that jump where it belongs.
    const step = new Scalar(`${r(h / 10)} s`);
    step.commentBefore = ' a tenth of the sample time: the delay is rounded to whole steps and the output jumps when the delayed input arrives';
    loop.set('step', step);
  }
  loop.set('controller', controller);
  loop.set('trial', trial);

  const root = new YAMLMap();
  root.set('name', source.name ?? `Fitted from ${source.fileName}`);
  root.set('model', model);
  if (actuator !== null) root.set('actuator', actuator);
  root.set('sensor', sensor);
  root.set('loop', loop);
  const doc = new Document();
  doc.contents = root;
  const chosenBy = result.models.length > 1 && index === result.chosen ? `; ${result.reason}` : '';
  doc.commentBefore = [
    ` Fitted by looprig fit from ${source.fileName}`,
    ` window: ${r(source.from)} s .. ${r(source.to)} s (lines ${data.firstLine}-${data.lastLine}, ${data.n} samples every ${r(data.dt)} s${data.resampled ? ', resampled' : ''})`,
    ` columns: input ${data.inputName}, output ${data.outputName}`,
    ` model: ${fit.kind}${typeNote}${chosenBy}`,
    ` fit: NRMSE ${(100 * fit.nrmse).toPrecision(3)} % of the output range, R² ${fit.r2.toFixed(4)}, RMSE ${r(fit.rmse)}`,
    ` variables are deviations from the operating point before the step:`,
    `   ${data.inputName} = ${r(fit.u0)}, ${data.outputName} = ${r(y0)}`,
    ...(actuator === null ? [` no actuator limits: the log's span (${data.inputName} ${r(a.uMin)} .. ${r(a.uMax)}) is not the actuator's range; add actuator: { min, max } (deviations) or fit with --actuator-min/--actuator-max`] : []),
    ...m.warnings.map((w) => ` warning: ${w.message}`),
  ].join('\n');
  return String(doc);
}

function r(x: number): number {
  if (!Number.isFinite(x) || x === 0) return x;
  return +x.toPrecision(DIGITS);
}
