/** `type: state_space` — dx = A x + B u, y = C x + D u (single input, single output). */
import type { Span } from '../types.js';
import type { YMap } from '../yaml-doc.js';
import { fieldNames, fieldNode, numberField, numbersField, type SectionDef } from './fields.js';
import { LOAD_DISTURBANCE, type ModelRead } from './model-read.js';
import type { Reader } from './reader.js';
import { DELAY_RULE } from './time-range.js';
import { MODEL_LIMITS } from './size-limits.js';
import { OUTPUT_UNIT_FIELD } from './output-unit.js';

export const STATE_SPACE_SCHEMA: SectionDef = {
  description: 'Linear state space, one input and one output: dx/dt = A x + B u, y = C x + D u. The input disturbance `load` adds to the input.',
  fields: {
    type: { kind: 'choice', choices: ['state_space'], required: true, description: 'Model kind.' },
    a: { kind: 'matrix', required: true, description: 'A, n x n, as a list of rows.' },
    b: { kind: 'numbers', required: true, description: 'B, n entries (input column).' },
    c: { kind: 'numbers', required: true, description: 'C, n entries (output row).' },
    d: { kind: 'number', default: 0, description: 'D, direct feed-through.' },
    delay: { kind: 'time', rule: DELAY_RULE, default: 0, description: 'Dead time on the input (>= 0), s or with a unit.' },
    output_unit: OUTPUT_UNIT_FIELD,
  },
};

export const STATE_SPACE_FIELDS = fieldNames(STATE_SPACE_SCHEMA);

export function readStateSpace(r: Reader, node: YMap, owner: Span): ModelRead | undefined {
  const s = STATE_SPACE_SCHEMA;
  const f = r.fields(node, 'model', STATE_SPACE_FIELDS, owner);
  if (!f) return undefined;
  const an = fieldNode(f, s, 'a');
  const bn = fieldNode(f, s, 'b');
  const cn = fieldNode(f, s, 'c');
  const d = numberField(r, f, s, 'd', 0);
  const delay = numberField(r, f, s, 'delay', 0);
  let a: number[][] | undefined;
  if (an) {
    const rows = r.list(an, 'model.a');
    if (rows) {
      const out: number[][] = [];
      let ok = true;
      rows.items.forEach((row, i) => {
        const v = r.numbers(row, `model.a[${i}]`);
        if (v === undefined) ok = false;
        else out.push(v);
      });
      if (ok) a = out;
    }
  }
  const b = bn ? numbersField(r, f, s, 'b', undefined) : undefined;
  const c = cn ? numbersField(r, f, s, 'c', undefined) : undefined;
  if (a === undefined || b === undefined || c === undefined || d === undefined || delay === undefined) return undefined;
  const n = a.length;
  let ok = true;
  if (n === 0 && an) {
    r.error('DIMENSION_MISMATCH', 'model.a must have at least one row', an.span);
    ok = false;
  }
  if (n > MODEL_LIMITS.states && an) {
    r.error('BAD_VALUE', `model.a has ${n} rows; models of at most ${MODEL_LIMITS.states} states are accepted`, an.span);
    return undefined;
  }
  a.forEach((row, i) => {
    if (row.length !== n && an && an.kind === 'seq') {
      r.error('DIMENSION_MISMATCH', `model.a must be square: row ${i} has ${row.length} entries, expected ${n}`, an.items[i].span);
      ok = false;
    }
  });
  if (b.length !== n && bn) {
    r.error('DIMENSION_MISMATCH', `model.b has ${b.length} entries; model.a has ${n} rows`, bn.span);
    ok = false;
  }
  if (c.length !== n && cn) {
    r.error('DIMENSION_MISMATCH', `model.c has ${c.length} entries; model.a has ${n} rows`, cn.span);
    ok = false;
  }
  if (!ok) return undefined;
  return {
    model: { type: 'state_space', a, b, c, d, delay },
    disturbances: [LOAD_DISTURBANCE],
    uncertain: { d: false, delay: true },
  };
}
