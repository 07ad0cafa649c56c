/**
 * `type: ode` — a nonlinear plant written as expressions:
 * dx_i/dt = f_i(t, x, u, d, p), y = g(t, x, u, d, p).
 */
import { parseExpression } from '../expr/parser.js';
import { RESERVED_NAMES } from '../expr/functions.js';
import type { Expr, Span } from '../types.js';
import type { YMap, YNode } from '../yaml-doc.js';
import { fieldNames, fieldNode, numberField, type NameRule, type SectionDef } from './fields.js';
import type { ModelRead } from './model-read.js';
import { describe, type Reader } from './reader.js';
import { DELAY_RULE } from './time-range.js';
import { MODEL_LIMITS } from './size-limits.js';
import { OUTPUT_UNIT_FIELD } from './output-unit.js';

const IDENT = /^[A-Za-z_][A-Za-z0-9_]*$/;

/** Names declared by an ode model (parameters, states, input, disturbances). */
export const ODE_NAME: NameRule = { pattern: IDENT, reserved: RESERVED_NAMES };
/** Measurement names only need to be names (they are not used inside expressions). */
const MEASUREMENT_NAME: NameRule = { pattern: IDENT };

export const ODE_STATE_SCHEMA: SectionDef = {
  description: 'One state variable.',
  fields: { initial: { kind: 'number', required: true, description: 'Value at t = 0.' } },
};

export const ODE_SCHEMA: SectionDef = {
  description:
    'Nonlinear plant written as expressions: dx/dt = f(t, x, u, d, p) per state, y = g(t, x, u, d, p). Expressions use the declared names, t, and the built-in functions and constants.',
  fields: {
    type: { kind: 'choice', choices: ['ode'], required: true, description: 'Model kind.' },
    params: { kind: 'names', names: ODE_NAME, value: { kind: 'number' }, description: 'Named constants: name -> number.' },
    states: {
      kind: 'names',
      names: ODE_NAME,
      value: { kind: 'section', section: ODE_STATE_SCHEMA },
      minEntries: 1,
      required: true,
      description: 'State variables, in order: name -> { initial }.',
    },
    input: {
      kind: 'text',
      name: ODE_NAME,
      required: true,
      hint: ' (the name of the manipulated variable in the expressions)',
      description: 'Name of the manipulated variable (the actuator output) in the expressions.',
    },
    disturbances: { kind: 'names', names: ODE_NAME, value: { kind: 'number' }, description: 'Named disturbances and their initial values.' },
    derivatives: { kind: 'names', names: ODE_NAME, value: { kind: 'expression' }, required: true, description: 'One expression per state: state name -> d(state)/dt.' },
    output: {
      kind: 'expression',
      required: true,
      hint: ' (the controlled variable, an expression)',
      description: 'The controlled variable, an expression.',
    },
    measurements: {
      kind: 'names',
      names: MEASUREMENT_NAME,
      value: { kind: 'expression' },
      description: 'Further named measurements (e.g. the inner variable of a cascade): name -> expression.',
    },
    delay: { kind: 'time', rule: DELAY_RULE, default: 0, description: 'Dead time on the manipulated input (>= 0), s or with a unit.' },
    output_unit: OUTPUT_UNIT_FIELD,
  },
};

export const ODE_FIELDS = fieldNames(ODE_SCHEMA);

/** `r.mapping`, refusing (at the mapping, before reading its entries) more than `max` entries. */
function cappedMapping(r: Reader, node: YNode, path: string, max: number): YMap | null {
  const m = r.mapping(node, path);
  if (m === null || m.entries.length <= max) return m;
  r.error('BAD_VALUE', `${path} has ${m.entries.length} entries; at most ${max} are accepted`, node.span);
  return null;
}

export function readOde(r: Reader, node: YMap, owner: Span): ModelRead | undefined {
  const S = ODE_SCHEMA;
  const f = r.fields(node, 'model', ODE_FIELDS, owner);
  if (!f) return undefined;
  const before = r.errorCount();
  const declared = new Map<string, string>(); // name -> what declared it
  const declare = (name: string, what: string, span: Span): boolean => {
    if (!ODE_NAME.pattern.test(name)) {
      r.error('BAD_NAME', `${what} name '${name}' must be a name of letters, digits and _ (not starting with a digit)`, span);
      return false;
    }
    if (ODE_NAME.reserved?.has(name)) {
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

  // No prototype: a parameter may be called __proto__ (a plain object would swallow it as a
  // prototype assignment and lose the value).
  const params: Record<string, number> = Object.create(null) as Record<string, number>;
  const pn = f.get('params');
  if (pn) {
    const m = cappedMapping(r, pn, 'model.params', MODEL_LIMITS.params);
    for (const e of m?.entries ?? []) {
      const v = r.number(e.value, `model.params.${e.key}`);
      if (declare(e.key, 'parameter', e.keySpan) && v !== undefined) params[e.key] = v;
    }
  }

  const states: { name: string; initial: number }[] = [];
  // States whose name was refused: their derivatives are skipped without further noise.
  const badStates = new Set<string>();
  const sn = fieldNode(f, S, 'states');
  if (sn) {
    const m = cappedMapping(r, sn, 'model.states', MODEL_LIMITS.states);
    if (m && m.entries.length === 0) r.error('MISSING_FIELD', 'model.states must declare at least one state', sn.span);
    for (const e of m?.entries ?? []) {
      const ok = declare(e.key, 'state', e.keySpan);
      if (!ok) badStates.add(e.key);
      const sf = r.fields(e.value, `model.states.${e.key}`, fieldNames(ODE_STATE_SCHEMA), e.keySpan);
      const initial = sf ? numberField(r, sf, ODE_STATE_SCHEMA, 'initial', undefined) : undefined;
      if (ok && initial !== undefined) states.push({ name: e.key, initial });
    }
  }

  let input = '';
  const inn = fieldNode(f, S, 'input');
  if (inn) {
    const s = r.string(inn, 'model.input');
    if (s !== undefined && declare(s, 'input', inn.span)) input = s;
  }

  const disturbances: { name: string; initial: number }[] = [];
  const dn = f.get('disturbances');
  if (dn) {
    const m = cappedMapping(r, dn, 'model.disturbances', MODEL_LIMITS.disturbances);
    for (const e of m?.entries ?? []) {
      const v = r.number(e.value, `model.disturbances.${e.key}`);
      if (declare(e.key, 'disturbance', e.keySpan) && v !== undefined) disturbances.push({ name: e.key, initial: v });
    }
  }

  const delay = numberField(r, f, S, 'delay', 0);

  // Expressions may use every declared name (even ones whose value failed) plus t, so that one
  // bad number does not also produce "unknown name" noise.
  const names = new Set<string>([...declared.keys(), 't']);
  const expr = (n: YNode, path: string): Expr | undefined => readExpression(r, n, path, names);

  const derivatives: Expr[] = [];
  const dv = fieldNode(f, S, 'derivatives');
  if (dv) {
    const m = cappedMapping(r, dv, 'model.derivatives', MODEL_LIMITS.states);
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

  const on = fieldNode(f, S, 'output');
  const output = on ? expr(on, 'model.output') : undefined;

  const measurements: Record<string, Expr> = {};
  const mn = f.get('measurements');
  if (mn) {
    const m = cappedMapping(r, mn, 'model.measurements', MODEL_LIMITS.measurements);
    for (const e of m?.entries ?? []) {
      if (!MEASUREMENT_NAME.pattern.test(e.key)) {
        r.error('BAD_NAME', `measurement name '${e.key}' must be a name of letters, digits and _`, e.keySpan);
        continue;
      }
      const x = expr(e.value, `model.measurements.${e.key}`);
      if (x) measurements[e.key] = x;
    }
  }

  if (r.errorCount() > before || output === undefined || delay === undefined) return undefined;
  const uncertain: Record<string, boolean> = Object.create(null) as Record<string, boolean>;
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
