/** `type: state_space` — dx = A x + B u, y = C x + D u (single input, single output). */
import type { Span } from '../types.js';
import type { YMap } from '../yaml-doc.js';
import { LOAD_DISTURBANCE, type ModelRead } from './model-read.js';
import type { Reader } from './reader.js';

export const STATE_SPACE_FIELDS = ['type', 'a', 'b', 'c', 'd', 'delay'] as const;

export function readStateSpace(r: Reader, node: YMap, owner: Span): ModelRead | undefined {
  const f = r.fields(node, 'model', STATE_SPACE_FIELDS, owner);
  if (!f) return undefined;
  const an = f.require('a');
  const bn = f.require('b');
  const cn = f.require('c');
  const dn = f.get('d');
  const d = dn ? r.number(dn, 'model.d') : 0;
  const dl = f.get('delay');
  const delay = dl ? r.time(dl, 'model.delay', { ge: 0 }) : 0;
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
  const b = bn && r.numbers(bn, 'model.b');
  const c = cn && r.numbers(cn, 'model.c');
  if (a === undefined || b === undefined || c === undefined || d === undefined || delay === undefined) return undefined;
  const n = a.length;
  let ok = true;
  if (n === 0 && an) {
    r.error('DIMENSION_MISMATCH', 'model.a must have at least one row', an.span);
    ok = false;
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
