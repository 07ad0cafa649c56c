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
  ControllerStructure,
  GainSet,
  ScheduleEntry,
  StructureExtension,
  StructureName,
} from '../types.js';
import type { YNode } from '../yaml-doc.js';
import type { Fields, Reader } from './reader.js';

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

/** The PID law a structure name runs: its terms are read as for this plain structure. */
export function baseStructure(name: StructureName): ControllerStructure {
  switch (name) {
    case 'p':
    case 'pi':
    case 'pd':
    case 'pid':
      return name;
    case 'smith_pi':
      return 'pi';
    default:
      return 'pid';
  }
}

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
  const keys = ['gain', 'time_constant', 'delay', 'gain_factor', 'time_constant_factor', 'delay_factor'];
  const sf = r.fields(node, path, keys, f.keySpan('smith'));
  if (!sf) return undefined;
  const gain = optionalNumber(r, sf, 'gain');
  if (gain === 0) r.error('BAD_VALUE', `${sf.at('gain')} must not be 0`, sf.get('gain')!.span);
  const timeConstant = optionalTime(r, sf, 'time_constant', { ge: 0 });
  const delay = optionalTime(r, sf, 'delay', { ge: 0 });
  const gainFactor = optionalNumber(r, sf, 'gain_factor', { gt: 0 }, 1);
  const timeConstantFactor = optionalNumber(r, sf, 'time_constant_factor', { gt: 0 }, 1);
  const delayFactor = optionalNumber(r, sf, 'delay_factor', { ge: 0 }, 1);
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
  const sf = r.fields(node, path, ['disturbance', 'gain', 'lead_lag', 'delay'], f.keySpan('feedforward'));
  if (!sf) return undefined;
  const dn = sf.require('disturbance', ' (the name of the measured disturbance)');
  const disturbance = dn && checkDisturbance(r, dn, sf.at('disturbance'), ctx);
  const gain = optionalNumber(r, sf, 'gain');
  let leadLag: { lead: number | null; lag: number | null } | null | undefined = null;
  const ln = sf.get('lead_lag');
  if (ln) {
    if (ln.kind === 'scalar' && ln.value === 'model') leadLag = { lead: null, lag: null };
    else {
      const lf = r.fields(ln, sf.at('lead_lag'), ['lead', 'lag'], sf.keySpan('lead_lag'));
      if (!lf) leadLag = undefined;
      else {
        const lead = optionalTime(r, lf, 'lead', { ge: 0 });
        const lag = optionalTime(r, lf, 'lag', { gt: 0 });
        leadLag = lead === undefined || lag === undefined ? undefined : { lead, lag };
      }
    }
  }
  const dl = sf.get('delay');
  const delay = dl ? r.time(dl, sf.at('delay'), { ge: 0 }) : leadLag !== null && leadLag !== undefined ? null : 0;
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
  const ti = tin ? r.time(tin, gf.at('ti'), { gt: 0, allowInfinity: true }) : Infinity;
  const tdn = gf.get('td');
  const td = tdn ? r.time(tdn, gf.at('td'), { ge: 0 }) : 0;
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
  const sf = r.fields(node, path, ['inner_measurement', 'inner', 'setpoint_limits'], f.keySpan('cascade'));
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
    const g = readIdealGains(r, inn, sf.at('inner'), sf.keySpan('inner'), ['kc', 'ti'], { ...tuning, b: 1, c: 0 });
    inner = g === undefined ? undefined : g.gains;
  }
  let setpointMin = -Infinity;
  let setpointMax = Infinity;
  const ln = sf.get('setpoint_limits');
  if (ln) {
    const p = r.pair(ln, sf.at('setpoint_limits'), false, true, { allowInfinity: true, allowNegativeInfinity: true });
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
  const sf = r.fields(node, path, ['variable', 'table'], f.keySpan('schedule'));
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
    const g = readIdealGains(r, item, rp, item.span, ['at', 'kc', 'ti', 'td'], tuning);
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
