/** The `loop:` section: sampling, integration, controller, trial, requirements. */
import type { ActuatorSpec, IntegratorName, LoopSpec, Span } from '../types.js';
import type { YNode } from '../yaml-doc.js';
import { CONTROLLER_SCHEMA, readController } from './controller.js';
import { choiceField, fieldNames, fieldNode, numberField, type SectionDef } from './fields.js';
import type { Reader } from './reader.js';
import { readRequirements, REQUIREMENTS_SCHEMA } from './requirements.js';
import { readTrial, TRIAL_SCHEMA } from './trial.js';
import { MAX_TIME, MIN_SAMPLE_TIME, MIN_STEP } from './time-range.js';

export const INTEGRATORS: readonly IntegratorName[] = ['rk4', 'heun', 'euler'];

export const LOOP_SCHEMA: SectionDef = {
  description: 'The control loop: sampling, integration, the controller, the trial to run and its requirements.',
  fields: {
    sample_time: {
      kind: 'time',
      rule: { ge: MIN_SAMPLE_TIME, le: MAX_TIME },
      required: true,
      hint: ' (the controller sample time, e.g. 0.1 s)',
      description: `Controller sample time (${MIN_SAMPLE_TIME} s to ${MAX_TIME} s), s or with a unit.`,
    },
    step: { kind: 'time', rule: { ge: MIN_STEP }, description: `Integration step (>= ${MIN_STEP} s, at most the sample time); default: chosen from the plant.` },
    integrator: { kind: 'choice', choices: INTEGRATORS, default: 'rk4', description: 'Fixed-step integration method.' },
    controller: { kind: 'section', section: CONTROLLER_SCHEMA, required: true, description: CONTROLLER_SCHEMA.description },
    trial: { kind: 'section', section: TRIAL_SCHEMA, required: true, hint: ' (at least a duration)', description: TRIAL_SCHEMA.description },
    requirements: { kind: 'section', section: REQUIREMENTS_SCHEMA, description: REQUIREMENTS_SCHEMA.description },
  },
};

export const LOOP_FIELDS = fieldNames(LOOP_SCHEMA);

export function readLoop(
  r: Reader,
  node: YNode,
  owner: Span,
  actuator: ActuatorSpec,
  disturbances: readonly string[] | null,
  measurements: readonly string[] | null = null,
): LoopSpec | undefined {
  const s = LOOP_SCHEMA;
  const f = r.fields(node, 'loop', LOOP_FIELDS, owner);
  if (!f) return undefined;
  const before = r.errorCount();
  const sampleTime = numberField(r, f, s, 'sample_time', undefined);
  const stn = f.get('step');
  const step = numberField(r, f, s, 'step', null);
  if (stn && step != null && sampleTime !== undefined && step > sampleTime) {
    r.error(
      'STEP_EXCEEDS_SAMPLE',
      `sample time shorter than the integration step (loop.step ${step} s > loop.sample_time ${sampleTime} s)`,
      stn.span,
    );
  }
  const integrator = choiceField<IntegratorName, IntegratorName>(r, f, s, 'integrator', 'rk4');
  const cn = fieldNode(f, s, 'controller');
  const controller = cn && readController(r, cn, f.keySpan('controller'), actuator, { structure: { disturbances, measurements } });
  const tn = fieldNode(f, s, 'trial');
  const trial = tn && readTrial(r, tn, f.keySpan('trial'), { disturbances, controller: controller ?? null });
  const requirements = readRequirements(r, f.get('requirements'), f.keySpan('requirements'));
  if (
    r.errorCount() > before ||
    sampleTime === undefined ||
    step === undefined ||
    integrator === undefined ||
    !controller ||
    !trial
  ) {
    return undefined;
  }
  return { sampleTime, step, integrator, controller, trial, requirements };
}
