/**
 * `type: ode` — a nonlinear plant written as expressions:
 * dx_i/dt = f_i(t, x, u, d, p), y = g(t, x, u, d, p).
 */
import { parseExpression } from '../expr/parser.js';
import { RESERVED_NAMES } from '../expr/functions.js';
import type { Expr, Span } from '../types.js';
import type { YMap, YNode } from '../yaml-doc.js';
import type { ModelRead } from './model-read.js';
import { describe, type Reader } from './reader.js';

export const ODE_FIELDS = [
  'type',
  'params',
  'states',
  'input',
  'disturbances',
  'derivatives',
  'output',
  'measurements',
  'delay',
] as const;

const IDENT = /^[A-Za-z_][A-Za-z0-9_]*$/;

export function readOde(r: Reader, node: YMap, owner: Span): ModelRead | undefined {
  const f = r.fields(node, 'model', ODE_FIELDS, owner);
  if (!f) return undefined;
  const before = r.errorCount();
  const declared = new Map<string, string>(); // name -> what declared it
  const declare = (name: string, what: string, span: Span): boolean => {
    if (!IDENT.test(name)) {
      r.error('BAD_NAME', `${what} name '${name}' must be a name of letters, digits and _ (not starting with a digit)`, span);
      return false;
    }
    if (RESERVED_NAMES.has(name)) {
      r.error('BAD_NAME', `${what} name '${name}' is reserved (t, pi, e and the function names)`, span);
      return false;
    }
    const prev = declared.get(name);
    if (prev !== undefined) {
      r.error('DUPLICATE_NAME', `${what} name '${name}' is already used by a ${prev}`, span);
      return false;
    }
    declared.set(name, what);
    return true;
  };

  const params: Record<string, number> = {};
  const pn = f.get('params');
  if (pn) {
    const m = r.mapping(pn, 'model.params');
    for (const e of m?.entries ?? []) {
      const v = r.number(e.value, `model.params.${e.key}`);
      if (declare(e.key, 'parameter', e.keySpan) && v !== undefined) params[e.key] = v;
    }
  }

  const states: { name: string; initial: number }[] = [];
  // States whose name was refused: their derivatives are skipped without further noise.
  const badStates = new Set<string>();
  const sn = f.require('states');
  if (sn) {
    const m = r.mapping(sn, 'model.states');
    if (m && m.entries.length === 0) r.error('MISSING_FIELD', 'model.states must declare at least one state', sn.span);
    for (const e of m?.entries ?? []) {
      const ok = declare(e.key, 'state', e.keySpan);
      if (!ok) badStates.add(e.key);
      const sf = r.fields(e.value, `model.states.${e.key}`, ['initial'], e.keySpan);
      const iv = sf?.require('initial');
      const initial = iv && r.number(iv, `model.states.${e.key}.initial`);
      if (ok && initial !== undefined) states.push({ name: e.key, initial });
    }
  }

  let input = '';
  const inn = f.require('input', ' (the name of the manipulated variable in the expressions)');
  if (inn) {
    const s = r.string(inn, 'model.input');
    if (s !== undefined && declare(s, 'input', inn.span)) input = s;
  }

  const disturbances: { name: string; initial: number }[] = [];
  const dn = f.get('disturbances');
  if (dn) {
    const m = r.mapping(dn, 'model.disturbances');
    for (const e of m?.entries ?? []) {
      const v = r.number(e.value, `model.disturbances.${e.key}`);
      if (declare(e.key, 'disturbance', e.keySpan) && v !== undefined) disturbances.push({ name: e.key, initial: v });
    }
  }

  const dl = f.get('delay');
  const delay = dl ? r.time(dl, 'model.delay', { ge: 0 }) : 0;

  // Expressions may use every declared name (even ones whose value failed) plus t, so that one
  // bad number does not also produce "unknown name" noise.
  const names = new Set<string>([...declared.keys(), 't']);
  const expr = (n: YNode, path: string): Expr | undefined => readExpression(r, n, path, names);

  const derivatives: Expr[] = [];
  const dv = f.require('derivatives');
  if (dv) {
    const m = r.mapping(dv, 'model.derivatives');
    if (m) {
      const byName = new Map<string, Expr | undefined>();
      for (const e of m.entries) {
        if (badStates.has(e.key)) continue;
        if (declared.get(e.key) !== 'state') {
          r.error(
            'UNKNOWN_FIELD',
            `model.derivatives.${e.key}: '${e.key}' is not a state; states are ${states.map((s) => s.name).join(', ') || '(none)'}`,
            e.keySpan,
          );
          continue;
        }
        byName.set(e.key, expr(e.value, `model.derivatives.${e.key}`));
      }
      for (const s of states) {
        if (!byName.has(s.name)) {
          r.error('MISSING_FIELD', `missing derivative for state '${s.name}' in model.derivatives`, f.keySpan('derivatives'));
          continue;
        }
        const x = byName.get(s.name);
        if (x) derivatives.push(x);
      }
    }
  }

  const on = f.require('output', ' (the controlled variable, an expression)');
  const output = on && expr(on, 'model.output');

  const measurements: Record<string, Expr> = {};
  const mn = f.get('measurements');
  if (mn) {
    const m = r.mapping(mn, 'model.measurements');
    for (const e of m?.entries ?? []) {
      if (!IDENT.test(e.key)) {
        r.error('BAD_NAME', `measurement name '${e.key}' must be a name of letters, digits and _`, e.keySpan);
        continue;
      }
      const x = expr(e.value, `model.measurements.${e.key}`);
      if (x) measurements[e.key] = x;
    }
  }

  if (r.errorCount() > before || output === undefined || delay === undefined) return undefined;
  const uncertain: Record<string, boolean> = {};
  for (const k of Object.keys(params)) uncertain[k] = false;
  return {
    model: { type: 'ode', params, states, input, disturbances, derivatives, output, measurements, delay },
    disturbances: disturbances.map((d) => d.name),
    uncertain,
  };
}

/**
 * Read one expression from a scalar (text, or a bare number), reporting errors at the exact
 * column inside the scalar.
 */
export function readExpression(r: Reader, n: YNode, path: string, names: ReadonlySet<string>): Expr | undefined {
  if (n.kind === 'scalar' && typeof n.value === 'number') {
    if (!Number.isFinite(n.value)) {
      r.error('BAD_VALUE', `${path} must be finite, got ${n.value}`, n.span);
      return undefined;
    }
    return { kind: 'num', value: n.value, span: n.span };
  }
  if (n.kind !== 'scalar' || typeof n.value !== 'string') {
    r.error('WRONG_TYPE', `${path} must be an expression (text), not ${describe(n)}`, n.span);
    return undefined;
  }
  if (n.tag !== undefined && n.tag !== 'tag:yaml.org,2002:str') {
    r.error(
      'EXPR_SYNTAX',
      `${path}: YAML read '${n.tag.replace(/^tag:yaml\.org,2002:/, '!!')}' as a tag; put an expression starting with '!' in quotes`,
      n.span,
    );
    return undefined;
  }
  const res = parseExpression(n.value, { names, offset: n.offsetOf });
  for (const e of res.errors) r.error(e.code, `${path}: ${e.message}`, e.span);
  return res.expr ?? undefined;
}
