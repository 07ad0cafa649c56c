/** Test helper: plant files as YAML text, loaded by the real loader. */
import { loadPlant } from '../../src/model/index.js';
import type { PlantSpec } from '../../src/model/types.js';

export interface LoopText {
  actuator?: string;
  sensor?: string;
  sampleTime?: string;
  controller?: string;
  trial?: string;
}

export function plantText(model: string, loop: LoopText = {}): string {
  return [
    'name: test plant',
    'model:',
    model
      .split('\n')
      .map((l) => `  ${l}`)
      .join('\n'),
    `actuator: ${loop.actuator ?? '{ min: -100, max: 100 }'}`,
    `sensor: ${loop.sensor ?? '{ noise_std: 0 }'}`,
    'loop:',
    `  sample_time: ${loop.sampleTime ?? '0.01 s'}`,
    '  controller:',
    (loop.controller ?? '{ structure: pi, form: ideal, kc: 0.5, ti: 2 s }').startsWith('{')
      ? `    ${(loop.controller ?? '{ structure: pi, form: ideal, kc: 0.5, ti: 2 s }').slice(1, -1).split(',').map((s) => s.trim()).join('\n    ')}`
      : loop.controller!,
    '  trial:',
    `    ${(loop.trial ?? 'duration: 60 s\n    events: [{ at: 1 s, setpoint: 1 }]')}`,
    '',
  ].join('\n');
}

export function load(text: string): PlantSpec {
  const r = loadPlant(text, 'test.yaml');
  if (!r.plant) throw new Error(`plant did not load:\n${r.diagnostics.map((d) => d.message).join('\n')}\n${text}`);
  return r.plant;
}

/** A transfer-function plant (descending powers of s). */
export function transfer(num: number[], den: number[], delay = 0, loop: LoopText = {}): PlantSpec {
  return load(plantText(`type: transfer\nnumerator: [${num.join(', ')}]\ndenominator: [${den.join(', ')}]\ndelay: ${delay} s`, loop));
}
