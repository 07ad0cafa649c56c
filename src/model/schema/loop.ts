/** The `loop:` section: sampling, integration, controller, trial, requirements. */
import type { ActuatorSpec, IntegratorName, LoopSpec, Span } from '../types.js';
import type { YNode } from '../yaml-doc.js';
import { readController } from './controller.js';
import type { Reader } from './reader.js';
import { readRequirements } from './requirements.js';
import { readTrial } from './trial.js';

export const LOOP_FIELDS = ['sample_time', 'step', 'integrator', 'controller', 'trial', 'requirements'] as const;
export const INTEGRATORS: readonly IntegratorName[] = ['rk4', 'heun', 'euler'];

export function readLoop(
  r: Reader,
  node: YNode,
  owner: Span,
  actuator: ActuatorSpec,
  disturbances: readonly string[] | null,
  measurements: readonly string[] | null = null,
): LoopSpec | undefined {
  const f = r.fields(node, 'loop', LOOP_FIELDS, owner);
  if (!f) return undefined;
  const before = r.errorCount();
  const sn = f.require('sample_time', ' (the controller sample time, e.g. 0.1 s)');
  const sampleTime = sn && r.time(sn, 'loop.sample_time', { gt: 0 });
  const stn = f.get('step');
  const step = stn ? r.time(stn, 'loop.step', { gt: 0 }) : null;
  if (stn && step != null && sampleTime !== undefined && step > sampleTime) {
    r.error(
      'STEP_EXCEEDS_SAMPLE',
      `sample time shorter than the integration step (loop.step ${step} s > loop.sample_time ${sampleTime} s)`,
      stn.span,
    );
  }
  const inn = f.get('integrator');
  const integrator = inn ? r.choice(inn, 'loop.integrator', INTEGRATORS) : 'rk4';
  const cn = f.require('controller');
  const controller = cn && readController(r, cn, f.keySpan('controller'), actuator, { structure: { disturbances, measurements } });
  const tn = f.require('trial', ' (at least a duration)');
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
