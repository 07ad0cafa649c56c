/** The `sensor:` section: delay, noise, filter, quantisation, noise seed, measurement span. */
import type { SensorSpec, Span } from '../types.js';
import type { YNode } from '../yaml-doc.js';
import { fieldNames, numberField, pairField, type SectionDef } from './fields.js';
import type { Reader } from './reader.js';
import { DELAY_RULE } from './time-range.js';

export const DEFAULT_SENSOR: Readonly<SensorSpec> = Object.freeze({
  delay: 0,
  noiseStd: 0,
  filterTime: 0,
  resolution: 0,
  seed: 1,
  span: null,
});

export const SENSOR_SCHEMA: SectionDef = {
  description: 'The measurement the controller sees: the plant output delayed, filtered, noisy and quantised.',
  fields: {
    delay: { kind: 'time', rule: DELAY_RULE, default: 0, description: 'Measurement dead time (>= 0), s or with a unit.' },
    noise_std: { kind: 'number', rule: { ge: 0 }, default: 0, description: 'Standard deviation of white measurement noise, output units (>= 0).' },
    filter_time: { kind: 'time', rule: { ge: 0 }, default: 0, description: 'First-order measurement filter time constant (>= 0; 0 = none), s or with a unit.' },
    resolution: { kind: 'number', rule: { ge: 0 }, default: 0, description: 'Quantisation step of the measurement (>= 0; 0 = none).' },
    seed: {
      kind: 'number',
      rule: { ge: 0, le: 4294967295, integer: true },
      default: DEFAULT_SENSOR.seed,
      description: 'Seed of the noise generator (whole number 0 .. 4294967295): the same seed gives the same trace.',
    },
    span: {
      kind: 'pair',
      of: 'number',
      strict: true,
      description: 'Measurement range [low, high] of the transmitter, for proportional-band conversions.',
    },
    range: {
      kind: 'pair',
      of: 'number',
      strict: true,
      description: "The transmitter's span [low, high]: readings clip there, as a real transmitter's do (a loop driven past it sees a flat line).",
    },
  },
};

export const SENSOR_FIELDS = fieldNames(SENSOR_SCHEMA);

export function readSensor(r: Reader, node: YNode | undefined, owner: Span): SensorSpec {
  const s = SENSOR_SCHEMA;
  const out: SensorSpec = { ...DEFAULT_SENSOR };
  if (!node) return out;
  const f = r.fields(node, 'sensor', SENSOR_FIELDS, owner);
  if (!f) return out;
  const delay = numberField(r, f, s, 'delay', undefined);
  const noiseStd = numberField(r, f, s, 'noise_std', undefined);
  const filterTime = numberField(r, f, s, 'filter_time', undefined);
  const resolution = numberField(r, f, s, 'resolution', undefined);
  const seed = numberField(r, f, s, 'seed', undefined);
  const span = pairField(r, f, s, 'span', undefined);
  if (delay !== undefined) out.delay = delay;
  if (noiseStd !== undefined) out.noiseStd = noiseStd;
  if (filterTime !== undefined) out.filterTime = filterTime;
  if (resolution !== undefined) out.resolution = resolution;
  if (seed !== undefined) out.seed = seed;
  if (span !== undefined) out.span = span;
  const range = pairField(r, f, s, 'range', undefined);
  if (range !== undefined) out.range = range;
  return out;
}
