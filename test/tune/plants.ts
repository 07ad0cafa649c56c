/** Plant files for the tune tests, written inline and loaded through the real loader. */
import { expect } from 'vitest';
import { loadPlant } from '../../src/model/index.js';
import type { PlantSpec } from '../../src/model/types.js';

/** Load plant-file text; fails the test on any loader error. */
export function plantFrom(text: string, name = 'inline.yaml'): PlantSpec {
  const r = loadPlant(text, name);
  const errors = r.diagnostics.filter((d) => d.severity === 'error');
  expect(errors.map((d) => d.message)).toEqual([]);
  return r.plant!;
}

/**
 * FOPDT reference plant K exp(-L s)/(T s + 1) with a setpoint step at 1 s and a load step at
 * 15 s, no actuator limits unless given, PI controller in `form`.
 */
export function fopdtPlant(opts: { k?: number; t?: number; l?: number; form?: string; limits?: [number, number]; structure?: string; uncertainty?: string; ts?: number; duration?: number } = {}): PlantSpec {
  const { k = 1, t = 1, l = 0.2, form = 'ideal', structure = 'pi', ts = 0.02, duration = 30 } = opts;
  const actuator = opts.limits ? `actuator: { min: ${opts.limits[0]}, max: ${opts.limits[1]} }\n` : '';
  const gains = form === 'parallel' ? 'kp: 1\n    ki: 0.5' : 'kc: 1\n    ti: 2 s';
  return plantFrom(`name: FOPDT reference
model:
  type: first_order
  gain: ${k}
  time_constant: ${t} s
  delay: ${l} s
${actuator}${opts.uncertainty ? `uncertainty: ${opts.uncertainty}\n` : ''}loop:
  sample_time: ${ts} s
  controller:
    structure: ${structure}
    form: ${form}
    ${gains}
  trial:
    duration: ${duration} s
    initial_setpoint: 0
    events:
      - { at: 1 s, setpoint: 1 }
      - { at: 15 s, disturbance: { load: 0.5 } }
`);
}

/** 1/(s+1)^3, the well-behaved reference plant of the trade-off checks. */
export function lagCubedPlant(structure = 'pid'): PlantSpec {
  return plantFrom(`name: Third-order lag
model:
  type: transfer
  numerator: [1]
  denominator: [1, 3, 3, 1]
loop:
  sample_time: 0.01 s
  controller:
    structure: ${structure}
    kc: 1
    ti: 2 s
    td: 0.5 s
    derivative_filter: 10
  trial:
    duration: 30 s
    initial_setpoint: 0
    events:
      - { at: 1 s, setpoint: 1 }
`);
}
