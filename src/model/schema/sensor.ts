/** The `sensor:` section: delay, noise, filter, quantisation, noise seed, measurement span. */
import type { SensorSpec, Span } from '../types.js';
import type { YNode } from '../yaml-doc.js';
import type { Reader } from './reader.js';

export const SENSOR_FIELDS = ['delay', 'noise_std', 'filter_time', 'resolution', 'seed', 'span'] as const;

export const DEFAULT_SENSOR: Readonly<SensorSpec> = Object.freeze({
  delay: 0,
  noiseStd: 0,
  filterTime: 0,
  resolution: 0,
  seed: 1,
  span: null,
});

export function readSensor(r: Reader, node: YNode | undefined, owner: Span): SensorSpec {
  const out: SensorSpec = { ...DEFAULT_SENSOR };
  if (!node) return out;
  const f = r.fields(node, 'sensor', SENSOR_FIELDS, owner);
  if (!f) return out;
  const get = <T>(key: string, read: (n: YNode) => T | undefined): T | undefined => {
    const n = f.get(key);
    return n ? read(n) : undefined;
  };
  const delay = get('delay', (n) => r.time(n, 'sensor.delay', { ge: 0 }));
  const noiseStd = get('noise_std', (n) => r.number(n, 'sensor.noise_std', { ge: 0 }));
  const filterTime = get('filter_time', (n) => r.time(n, 'sensor.filter_time', { ge: 0 }));
  const resolution = get('resolution', (n) => r.number(n, 'sensor.resolution', { ge: 0 }));
  const seed = get('seed', (n) => r.number(n, 'sensor.seed', { ge: 0, le: 4294967295, integer: true }));
  const span = get('span', (n) => r.pair(n, 'sensor.span', false, true));
  if (delay !== undefined) out.delay = delay;
  if (noiseStd !== undefined) out.noiseStd = noiseStd;
  if (filterTime !== undefined) out.filterTime = filterTime;
  if (resolution !== undefined) out.resolution = resolution;
  if (seed !== undefined) out.seed = seed;
  if (span !== undefined) out.span = span;
  return out;
}
