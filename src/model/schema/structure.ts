/**
 * The richer controller structures inside `loop.controller` (and `compare[i].controller`):
 *
 *   structure: smith_pi       smith: { gain, time_constant, delay, gain_factor, time_constant_factor, delay_factor }
 *   structure: feedforward    feedforward: { disturbance, gain, lead_lag: model | { lead, lag }, delay }
 *   structure: cascade        cascade: { inner_measurement, inner: { kc, ti }, setpoint_limits: [lo, hi] }
 *   structure: scheduled      schedule: { variable: setpoint | measurement | <disturbance>, table: [{ at, kc, ti, td }, ...] }
 *
 * Every model-derived value may be left out (null in the spec): tune/ fills it from the plant's
 * low-order approximation. Gains in `inner` and `table` are in the ideal form (kc, ti, td).
 */
import type {
  GainSet,
  ScheduleEntry,
  StructureExtension,
  StructureName,
} from '../types.js';
import type { YNode } from '../yaml-doc.js';
import { fieldNames, ruleOf, type FieldDef, type SectionDef } from './fields.js';
import type { Fields, Reader } from './reader.js';
import { DELAY_RULE } from './time-range.js';

/** Every structure name accepted, in the order messages list them. */
export const STRUCTURE_NAMES: readonly StructureName[] = [
  'p',
  'pi',
  'pd',
  'pid',
  'pi_d',
  'i_pd',
  'smith_pi',
  'feedforward',
  'cascade',
  'scheduled',
];

/** The section each extended structure reads its settings from. */
export const STRUCTURE_SECTIONS = ['smith', 'feedforward', 'cascade', 'schedule'] as const;
const SECTION_OF: Readonly<Partial<Record<StructureName, (typeof STRUCTURE_SECTIONS)[number]>>> = {
  smith_pi: 'smith',
  feedforward: 'feedforward',
  cascade: 'cascade',
  scheduled: 'schedule',
};

const MODEL_VALUE = 'Left out: taken from the plant\'s low-order approximation.';

export const SMITH_SCHEMA: SectionDef = {
  description: 'Smith predictor internal model (first order with dead time) and detuning factors; values left out come from the plant.',
  fields: {
    gain: { kind: 'number', description: `Model gain (not 0). ${MODEL_VALUE}` },
    time_constant: { kind: 'time', rule: { ge: 0 }, description: `Model time constant (>= 0), s or with a unit. ${MODEL_VALUE}` },
    delay: { kind: 'time', rule: DELAY_RULE, description: `Model dead time (>= 0), s or with a unit. ${MODEL_VALUE}` },
    gain_factor: { kind: 'number', rule: { gt: 0 }, default: 1, description: 'Factor on the model gain (> 0), to rehearse a wrong model.' },
    time_constant_factor: { kind: 'number', rule: { gt: 0 }, default: 1, description: 'Factor on the model time constant (> 0).' },
    delay_factor: { kind: 'number', rule: { ge: 0 }, default: 1, description: 'Factor on the model dead time (>= 0).' },
  },
};

export const LEAD_LAG_SCHEMA: SectionDef = {
  description: 'Lead-lag (lead s + 1)/(lag s + 1) of the feedforward.',
  fields: {
    lead: { kind: 'time', rule: { ge: 0 }, description: `Lead time (>= 0), s or with a unit. ${MODEL_VALUE}` },
    lag: { kind: 'time', rule: { gt: 0 }, description: `Lag time (> 0), s or with a unit. ${MODEL_VALUE}` },
  },
};

export const FEEDFORWARD_SCHEMA: SectionDef = {
  description: 'Feedforward from a measured disturbance: static gain, lead-lag and delay.',
  fields: {
    disturbance: {
      kind: 'text',
      required: true,
      hint: ' (the name of the measured disturbance)',
      description: 'The measured disturbance (a name from the model).',
    },
    gain: { kind: 'number', description: `Static feedforward gain. ${MODEL_VALUE}` },
    lead_lag: {
      kind: 'either',
      options: [
        { kind: 'choice', choices: ['model'] },
        { kind: 'section', section: LEAD_LAG_SCHEMA },
      ],
      description: "Dynamic compensation: 'model' (from the plant) or { lead, lag }.",
    },
    delay: { kind: 'time', rule: DELAY_RULE, description: 'Delay of the feedforward path (>= 0), s or with a unit.' },
  },
};

export const CASCADE_INNER_SCHEMA: SectionDef = {
  description: 'Inner PI controller (ideal form); left out: tuned from the plant.',
  fields: {
    kc: { kind: 'number', description: 'Inner controller gain.' },
    ti: { kind: 'time', rule: { gt: 0, allowInfinity: true }, description: 'Inner integral time (> 0; .inf = none), s or with a unit.' },
  },
};

export const CASCADE_SCHEMA: SectionDef = {
  description: 'Cascade: an inner PI loop on a plant measurement; the outer controller sets its setpoint.',
  fields: {
    inner_measurement: {
      kind: 'text',
      required: true,
      hint: ' (a name from model.measurements)',
      description: 'The inner measured variable (a name from model.measurements).',
    },
    inner: { kind: 'section', section: CASCADE_INNER_SCHEMA, description: CASCADE_INNER_SCHEMA.description },
    setpoint_limits: {
      kind: 'pair',
      of: 'number',
      strict: true,
      rule: { allowInfinity: true, allowNegativeInfinity: true },
      description: 'Limits [low, high] on the inner setpoint.',
    },
  },
};

export const SCHEDULE_ROW_SCHEMA: SectionDef = {
  description: 'One row of the gain schedule (ideal form); a row with only `at` is tuned from the plant there.',
  fields: {
    at: { kind: 'number', required: true, hint: ' (the value of the scheduling variable)', description: 'Value of the scheduling variable (rows in increasing order).' },
    kc: { kind: 'number', description: 'Controller gain at this row.' },
    ti: { kind: 'time', rule: { gt: 0, allowInfinity: true }, description: 'Integral time at this row (> 0; .inf = none), s or with a unit.' },
    td: { kind: 'time', rule: { ge: 0 }, description: 'Derivative time at this row (>= 0), s or with a unit.' },
  },
};

export const SCHEDULE_SCHEMA: SectionDef = {
  description: 'Gain schedule: gains interpolated linearly in a scheduling variable.',
  fields: {
    variable: { kind: 'text', default: 'setpoint', description: "Scheduling variable: 'setpoint', 'measurement' or a disturbance name." },
    table: {
      kind: 'list',
      items: { kind: 'section', section: SCHEDULE_ROW_SCHEMA },
      required: true,
      hint: ' (rows { at, kc, ti, td }; a row with only at is tuned)',
      description: 'Rows { at, kc, ti, td } in increasing order of at (at least one).',
    },
  },
};

/** The structure sections as fields of the controller table. */
export const STRUCTURE_SECTION_FIELDS: Readonly<Record<(typeof STRUCTURE_SECTIONS)[number], FieldDef>> = {
  smith: { kind: 'section', section: SMITH_SCHEMA, description: `structure smith_pi: ${SMITH_SCHEMA.description}` },
  feedforward: { kind: 'section', section: FEEDFORWARD_SCHEMA, description: `structure feedforward: ${FEEDFORWARD_SCHEMA.description}` },
  cascade: { kind: 'section', section: CASCADE_SCHEMA, description: `structure cascade: ${CASCADE_SCHEMA.description}` },
  schedule: { kind: 'section', section: SCHEDULE_SCHEMA, description: `structure scheduled: ${SCHEDULE_SCHEMA.description}` },
};

/** Names the structure sections may refer to. null = unknown (the model failed): not checked. */
export interface StructureContext {
  disturbances: readonly string[] | null;
  measurements: readonly string[] | null;
}

/**
 * Read the section of an extended structure (and warn about sections of other structures).
 * `tuning` supplies the settings (filter, weights, anti-windup) of gains read inside a section.
 * Returns undefined for a plain structure or on error (errors are reported).
 */
export function readStructureSection(
  r: Reader,
  f: Fields,
  name: StructureName,
  tuning: Omit<GainSet, 'kc' | 'ti' | 'td'>,
  ctx: StructureContext,
): { ext?: StructureExtension; ok: boolean } {
  const own = SECTION_OF[name];
  for (const s of STRUCTURE_SECTIONS) {
    if (s !== own && f.has(s)) {
      r.warn('IGNORED_FIELD', `${f.at(s)} is ignored: structure '${name}' does not use it`, f.keySpan(s));
    }
  }
  if (own === undefined) return { ok: true };
  const node = f.get(own);
  const path = f.at(own);
  const before = r.errorCount();
  let ext: StructureExtension | undefined;
  switch (name) {
    case 'smith_pi':
      ext = readSmith(r, node, path, f);
      break;
    case 'feedforward':
      ext = node ? readFeedforward(r, node, path, f, ctx) : missing(r, f, own, ' (at least the measured disturbance)');
      break;
    case 'cascade':
      ext = node ? readCascade(r, node, path, f, tuning, ctx) : missing(r, f, own, ' (at least inner_measurement)');
      break;
    case 'scheduled':
      ext = node ? readSchedule(r, node, path, f, tuning, ctx) : missing(r, f, own, ' (variable and table)');
      break;
    default:
      break;
  }
  return r.errorCount() > before || ext === undefined ? { ok: false } : { ext, ok: true };
}

function missing(r: Reader, f: Fields, key: string, hint: string): undefined {
  f.require(key, hint);
  return undefined;
}

function optionalTime(r: Reader, sf: Fields, key: string, rule: { gt?: number; ge?: number }): number | null | undefined {
  const n = sf.get(key);
  return n ? r.time(n, sf.at(key), rule) : null;
}

function optionalNumber(r: Reader, sf: Fields, key: string, rule: { gt?: number; ge?: number } = {}, dflt: number | null = null): number | null | undefined {
  const n = sf.get(key);
  return n ? r.number(n, sf.at(key), rule) : dflt;
}

function readSmith(r: Reader, node: YNode | undefined, path: string, f: Fields): StructureExtension | undefined {
  if (!node) {
    return { kind: 'smith_pi', gain: null, timeConstant: null, delay: null, gainFactor: 1, timeConstantFactor: 1, delayFactor: 1 };
  }
  const S = SMITH_SCHEMA;
  const sf = r.fields(node, path, fieldNames(S), f.keySpan('smith'));
  if (!sf) return undefined;
  const gain = optionalNumber(r, sf, 'gain');
  if (gain === 0) r.error('BAD_VALUE', `${sf.at('gain')} must not be 0`, sf.get('gain')!.span);
  const timeConstant = optionalTime(r, sf, 'time_constant', ruleOf(S, 'time_constant'));
  const delay = optionalTime(r, sf, 'delay', ruleOf(S, 'delay'));
  const gainFactor = optionalNumber(r, sf, 'gain_factor', ruleOf(S, 'gain_factor'), 1);
  const timeConstantFactor = optionalNumber(r, sf, 'time_constant_factor', ruleOf(S, 'time_constant_factor'), 1);
  const delayFactor = optionalNumber(r, sf, 'delay_factor', ruleOf(S, 'delay_factor'), 1);
  if (
    gain === undefined ||
    timeConstant === undefined ||
    delay === undefined ||
    gainFactor == null ||
    timeConstantFactor == null ||
    delayFactor == null
  ) {
    return undefined;
  }
  return { kind: 'smith_pi', gain, timeConstant, delay, gainFactor, timeConstantFactor, delayFactor };
}

function checkDisturbance(r: Reader, node: YNode, path: string, ctx: StructureContext): string | undefined {
  const name = r.string(node, path);
  if (name === undefined) return undefined;
  if (ctx.disturbances !== null && !ctx.disturbances.includes(name)) {
    r.error(
      'UNKNOWN_DISTURBANCE',
      `${path}: the model has no disturbance '${name}'${ctx.disturbances.length ? ` (it has ${ctx.disturbances.join(', ')})` : ''}`,
      node.span,
    );
    return undefined;
  }
  return name;
}

function readFeedforward(r: Reader, node: YNode, path: string, f: Fields, ctx: StructureContext): StructureExtension | undefined {
  const sf = r.fields(node, path, fieldNames(FEEDFORWARD_SCHEMA), f.keySpan('feedforward'));
  if (!sf) return undefined;
  const dn = sf.require('disturbance', ' (the name of the measured disturbance)');
  const disturbance = dn && checkDisturbance(r, dn, sf.at('disturbance'), ctx);
  const gain = optionalNumber(r, sf, 'gain');
  let leadLag: { lead: number | null; lag: number | null } | null | undefined = null;
  const ln = sf.get('lead_lag');
  if (ln) {
    if (ln.kind === 'scalar' && ln.value === 'model') leadLag = { lead: null, lag: null };
    else {
      const lf = r.fields(ln, sf.at('lead_lag'), fieldNames(LEAD_LAG_SCHEMA), sf.keySpan('lead_lag'));
      if (!lf) leadLag = undefined;
      else {
        const lead = optionalTime(r, lf, 'lead', ruleOf(LEAD_LAG_SCHEMA, 'lead'));
        const lag = optionalTime(r, lf, 'lag', ruleOf(LEAD_LAG_SCHEMA, 'lag'));
        leadLag = lead === undefined || lag === undefined ? undefined : { lead, lag };
      }
    }
  }
  const dl = sf.get('delay');
  const delay = dl ? r.time(dl, sf.at('delay'), ruleOf(FEEDFORWARD_SCHEMA, 'delay')) : leadLag !== null && leadLag !== undefined ? null : 0;
  if (disturbance === undefined || gain === undefined || leadLag === undefined || delay === undefined) return undefined;
  return { kind: 'feedforward', disturbance, gain, leadLag, delay };
}

function readIdealGains(
  r: Reader,
  node: YNode,
  path: string,
  owner: readonly [number, number],
  keys: readonly string[],
  tuning: Omit<GainSet, 'kc' | 'ti' | 'td'>,
  extra: string[] = [],
): { gains: GainSet | null; fields: Fields } | undefined {
  const gf = r.fields(node, path, [...keys, ...extra], owner);
  if (!gf) return undefined;
  const kn = gf.get('kc');
  const kc = kn ? r.number(kn, gf.at('kc')) : null;
  const tin = gf.get('ti');
  const ti = tin ? r.time(tin, gf.at('ti'), ruleOf(SCHEDULE_ROW_SCHEMA, 'ti')) : Infinity;
  const tdn = gf.get('td');
  const td = tdn ? r.time(tdn, gf.at('td'), ruleOf(SCHEDULE_ROW_SCHEMA, 'td')) : 0;
  if (kc === undefined || ti === undefined || td === undefined) return undefined;
  if (kc === null) {
    if (tin || tdn) r.error('MISSING_FIELD', `missing field 'kc' in ${path} (ti and td without kc)`, gf.ownerSpan);
    return tin || tdn ? undefined : { gains: null, fields: gf };
  }
  return { gains: { ...tuning, kc, ti, td }, fields: gf };
}

function readCascade(
  r: Reader,
  node: YNode,
  path: string,
  f: Fields,
  tuning: Omit<GainSet, 'kc' | 'ti' | 'td'>,
  ctx: StructureContext,
): StructureExtension | undefined {
  const sf = r.fields(node, path, fieldNames(CASCADE_SCHEMA), f.keySpan('cascade'));
  if (!sf) return undefined;
  const mn = sf.require('inner_measurement', ' (a name from model.measurements)');
  let innerMeasurement: string | undefined;
  if (mn) {
    innerMeasurement = r.string(mn, sf.at('inner_measurement'));
    if (innerMeasurement !== undefined && ctx.measurements !== null && !ctx.measurements.includes(innerMeasurement)) {
      r.error(
        'BAD_CHOICE',
        `${sf.at('inner_measurement')} is '${innerMeasurement}'; ${
          ctx.measurements.length ? `expected one of ${ctx.measurements.join(', ')}` : 'the model has no measurements (an ode model lists them in model.measurements)'
        }`,
        mn.span,
      );
      innerMeasurement = undefined;
    }
  }
  let inner: GainSet | null | undefined = null;
  const inn = sf.get('inner');
  if (inn) {
    const g = readIdealGains(r, inn, sf.at('inner'), sf.keySpan('inner'), fieldNames(CASCADE_INNER_SCHEMA), { ...tuning, b: 1, c: 0 });
    inner = g === undefined ? undefined : g.gains;
  }
  let setpointMin = -Infinity;
  let setpointMax = Infinity;
  const ln = sf.get('setpoint_limits');
  if (ln) {
    const p = r.pair(ln, sf.at('setpoint_limits'), false, true, ruleOf(CASCADE_SCHEMA, 'setpoint_limits'));
    if (!p) return undefined;
    [setpointMin, setpointMax] = p;
  }
  if (innerMeasurement === undefined || inner === undefined) return undefined;
  return { kind: 'cascade', innerMeasurement, inner, setpointMin, setpointMax };
}

function readSchedule(
  r: Reader,
  node: YNode,
  path: string,
  f: Fields,
  tuning: Omit<GainSet, 'kc' | 'ti' | 'td'>,
  ctx: StructureContext,
): StructureExtension | undefined {
  const sf = r.fields(node, path, fieldNames(SCHEDULE_SCHEMA), f.keySpan('schedule'));
  if (!sf) return undefined;
  let variable: string | undefined = 'setpoint';
  const vn = sf.get('variable');
  if (vn) {
    const v = r.string(vn, sf.at('variable'));
    if (v === undefined) variable = undefined;
    else if (v === 'setpoint' || v === 'measurement') variable = v;
    else variable = checkDisturbance(r, vn, sf.at('variable'), ctx);
  }
  const tn = sf.require('table', ' (rows { at, kc, ti, td }; a row with only at is tuned)');
  const seq = tn && r.list(tn, sf.at('table'));
  const table: ScheduleEntry[] = [];
  let ok = !!seq;
  seq?.items.forEach((item, i) => {
    const rp = `${sf.at('table')}[${i}]`;
    const g = readIdealGains(r, item, rp, item.span, fieldNames(SCHEDULE_ROW_SCHEMA), tuning);
    if (!g) {
      ok = false;
      return;
    }
    const an = g.fields.require('at', ' (the value of the scheduling variable)');
    const at = an && r.number(an, `${rp}.at`);
    if (at === undefined) {
      ok = false;
      return;
    }
    if (table.length > 0 && !(at > table[table.length - 1].at)) {
      r.error('BAD_VALUE', `${rp}.at must be above the previous row's (${table[table.length - 1].at}): rows in increasing order`, an!.span);
      ok = false;
      return;
    }
    table.push({ at, gains: g.gains });
  });
  if (seq && seq.items.length === 0) {
    r.error('BAD_VALUE', `${sf.at('table')} needs at least one row`, seq.span);
    ok = false;
  }
  if (!ok || variable === undefined) return undefined;
  return { kind: 'scheduled', variable, table };
}
