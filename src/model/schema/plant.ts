/** The top level of a plant file: the table every other section hangs from. */
import { ACTUATOR_SCHEMA } from './actuator.js';
import { COMPARE_FIELD } from './compare.js';
import type { SectionDef } from './fields.js';
import { LOOP_SCHEMA } from './loop.js';
import { MODEL_FIELD } from './model.js';
import { SENSOR_SCHEMA } from './sensor.js';
import { UNCERTAINTY_FIELD } from './uncertainty.js';

export const PLANT_SCHEMA: SectionDef = {
  description:
    'A looprig plant file: the process model, actuator and sensor, uncertainty ranges, and the loop (controller, trial, requirements). Times are seconds or text with a unit (ms, s, min, h).',
  fields: {
    name: { kind: 'text', required: true, description: 'Name of the plant, shown in reports.' },
    description: { kind: 'text', description: 'One or two sentences about the process.' },
    model: MODEL_FIELD,
    actuator: { kind: 'section', section: ACTUATOR_SCHEMA, description: ACTUATOR_SCHEMA.description },
    sensor: { kind: 'section', section: SENSOR_SCHEMA, description: SENSOR_SCHEMA.description },
    uncertainty: UNCERTAINTY_FIELD,
    loop: {
      kind: 'section',
      section: LOOP_SCHEMA,
      required: true,
      hint: ' (sample_time, controller and trial)',
      description: LOOP_SCHEMA.description,
    },
    compare: COMPARE_FIELD,
  },
};
