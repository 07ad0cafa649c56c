/**
 * `type: second_order` — K e^{-L s} / ((T1 s + 1)(T2 s + 1)) with `time_constant: [T1, T2]`, or
 * K wn^2 e^{-L s} / (s^2 + 2 zeta wn s + wn^2) with `natural_frequency` (rad/s) and `damping`.
 */
import type { Span } from '../types.js';
import type { YMap } from '../yaml-doc.js';
import { fieldNames, numberField, ruleOf, type SectionDef } from './fields.js';
import { LOAD_DISTURBANCE, type ModelRead } from './model-read.js';
import type { Reader } from './reader.js';
import { DELAY_RULE } from './time-range.js';
import { OUTPUT_UNIT_FIELD } from './output-unit.js';

export const SECOND_ORDER_SCHEMA: SectionDef = {
  description:
    'Second-order process with dead time: K e^(-L s) / ((T1 s + 1)(T2 s + 1)) with time_constant: [T1, T2], or K wn^2 e^(-L s) / (s^2 + 2 zeta wn s + wn^2) with natural_frequency and damping.',
  fields: {
    type: { kind: 'choice', choices: ['second_order'], required: true, description: 'Model kind.' },
    gain: { kind: 'number', required: true, description: 'Steady-state gain K, output units per input unit.' },
    time_constant: { kind: 'times', count: 2, rule: { gt: 0 }, description: 'The two lags [T1, T2] (each > 0), s or with units.' },
    natural_frequency: { kind: 'number', rule: { gt: 0 }, description: 'Natural frequency wn (> 0), rad/s; goes with damping.' },
    damping: { kind: 'number', description: 'Damping ratio zeta (negative = unstable); goes with natural_frequency.' },
    delay: { kind: 'time', rule: DELAY_RULE, default: 0, description: 'Dead time L on the input (>= 0), s or with a unit.' },
    output_unit: OUTPUT_UNIT_FIELD,
  },
  oneOfGroups: [['time_constant'], ['natural_frequency', 'damping']],
};

export const SECOND_ORDER_FIELDS = fieldNames(SECOND_ORDER_SCHEMA);

export function readSecondOrder(r: Reader, node: YMap, owner: Span): ModelRead | undefined {
  const s = SECOND_ORDER_SCHEMA;
  const f = r.fields(node, 'model', SECOND_ORDER_FIELDS, owner);
  if (!f) return undefined;
  const gain = numberField(r, f, s, 'gain', undefined);
  const delay = numberField(r, f, s, 'delay', 0);
  const tcNode = f.get('time_constant');
  const wnNode = f.get('natural_frequency');
  const zNode = f.get('damping');
  let ok = gain !== undefined && delay !== undefined;
  let timeConstants: [number, number] | null = null;
  let naturalFrequency: number | null = null;
  let damping: number | null = null;
  if (tcNode && (wnNode || zNode)) {
    r.error(
      'BAD_VALUE',
      'model: give either time_constant: [t1, t2] or natural_frequency and damping, not both',
      f.keySpan(wnNode ? 'natural_frequency' : 'damping'),
    );
    ok = false;
  } else if (tcNode) {
    const seq = r.list(tcNode, 'model.time_constant');
    if (!seq) ok = false;
    else if (seq.items.length !== 2) {
      r.error('WRONG_TYPE', `model.time_constant must be a list of two times [t1, t2], got ${seq.items.length}`, seq.span);
      ok = false;
    } else {
      const t1 = r.time(seq.items[0], 'model.time_constant[0]', ruleOf(s, 'time_constant'));
      const t2 = r.time(seq.items[1], 'model.time_constant[1]', ruleOf(s, 'time_constant'));
      if (t1 === undefined || t2 === undefined) ok = false;
      else timeConstants = [t1, t2];
    }
  } else if (wnNode || zNode) {
    const wn = wnNode ? r.number(wnNode, 'model.natural_frequency', ruleOf(s, 'natural_frequency')) : undefined;
    const z = zNode ? numberField(r, f, s, 'damping', undefined) : undefined;
    if (!wnNode) r.error('MISSING_FIELD', "missing field 'natural_frequency' in model (damping needs it)", f.ownerSpan);
    if (!zNode) r.error('MISSING_FIELD', "missing field 'damping' in model (natural_frequency needs it)", f.ownerSpan);
    if (z !== undefined && z < 0 && zNode) r.warn('BAD_VALUE', 'model.damping is negative: the plant is unstable', zNode.span);
    if (wn === undefined || z === undefined) ok = false;
    else {
      naturalFrequency = wn;
      damping = z;
    }
  } else {
    r.error(
      'MISSING_FIELD',
      "missing field 'time_constant' (or 'natural_frequency' and 'damping') in model",
      f.ownerSpan,
    );
    ok = false;
  }
  if (!ok || gain === undefined || delay === undefined) return undefined;
  const uncertain: Record<string, boolean> = { gain: false, delay: true };
  if (naturalFrequency !== null) {
    uncertain.natural_frequency = false;
    uncertain.damping = false;
  }
  return {
    model: { type: 'second_order', gain, timeConstants, naturalFrequency, damping, delay },
    disturbances: [LOAD_DISTURBANCE],
    uncertain,
  };
}
