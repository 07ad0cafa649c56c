/**
 * The `loop.controller:` section. Values are read in the file's form (ideal/series: kc, ti, td;
 * parallel: kp, ki, kd) and converted to the ideal-form `GainSet` the controller law runs.
 */
import { FORM_TERMS, toIdeal } from '../pid-forms.js';
import type {
  ActuatorSpec,
  AntiWindup,
  ControllerSpec,
  ControllerStructure,
  GainSet,
  PidForm,
  Span,
  StructureName,
} from '../types.js';
import type { YNode } from '../yaml-doc.js';
import { choiceField, fieldNames, numberField, pairField, ruleOf, type FieldDef, type SectionDef } from './fields.js';
import type { Fields, Reader } from './reader.js';
import { structureLaw } from '../structure-law.js';
import { readStructureSection, STRUCTURE_NAMES, STRUCTURE_SECTION_FIELDS, type StructureContext } from './structure.js';

export const STRUCTURES: readonly ControllerStructure[] = ['p', 'pi', 'pd', 'pid'];
export const FORMS: readonly PidForm[] = ['ideal', 'parallel', 'series'];
export const ANTI_WINDUP: readonly AntiWindup[] = ['none', 'clamp', 'back_calculation'];

/** Default derivative filter divisor N (filter time td/N): common practice, no source. */
export const DEFAULT_DERIVATIVE_FILTER = 10;

export const SETPOINT_WEIGHT_SCHEMA: SectionDef = {
  description: 'Setpoint weights: the proportional term acts on p*r - y, the derivative term on d*r - y.',
  fields: {
    p: { kind: 'number', default: 1, description: 'Weight b of the setpoint in the proportional term (default 1).' },
    d: { kind: 'number', default: 0, description: 'Weight c of the setpoint in the derivative term (default 0: derivative on the measurement).' },
  },
};

/** The form's three terms: ideal and series write kc, ti, td; parallel kp, ki, kd. */
const TERM_FIELDS: Readonly<Record<string, FieldDef>> = {
  kc: { kind: 'number', description: 'Controller gain Kc (forms ideal and series), output units per measured unit.' },
  ti: {
    kind: 'time',
    rule: { gt: 0, allowInfinity: true },
    description: 'Integral time Ti (> 0; .inf or absent = no integral action), s or with a unit (forms ideal and series).',
  },
  td: { kind: 'time', rule: { ge: 0 }, description: 'Derivative time Td (>= 0; 0 or absent = none), s or with a unit (forms ideal and series).' },
  kp: { kind: 'number', description: 'Proportional gain Kp (form parallel).' },
  ki: { kind: 'number', description: 'Integral gain Ki = Kc/Ti, per second (form parallel).' },
  kd: { kind: 'number', description: 'Derivative gain Kd = Kc Td, times seconds (form parallel).' },
};

/** Fields shared by the controller block and a trial `gains:` event (besides the form's terms). */
const TUNING_FIELDS: Readonly<Record<string, FieldDef>> = {
  derivative_filter: {
    kind: 'number',
    rule: { gt: 0 },
    default: DEFAULT_DERIVATIVE_FILTER,
    description: 'Derivative filter divisor N (> 0): the derivative is filtered with time constant Td/N.',
  },
  setpoint_weight: { kind: 'section', section: SETPOINT_WEIGHT_SCHEMA, description: SETPOINT_WEIGHT_SCHEMA.description },
  anti_windup: { kind: 'choice', choices: ANTI_WINDUP, default: 'clamp', description: 'What the integral does while the actuator is at a limit.' },
  tracking_time: {
    kind: 'time',
    rule: { gt: 0 },
    description: 'Tracking time of back_calculation anti-windup (> 0; default sqrt(Ti Td), or Ti/2 without derivative), s or with a unit.',
  },
};

/** Which terms each form requires and refuses (derived from FORM_TERMS). */
const FORM_CASES = [
  { field: 'form', absent: 'ideal', values: ['ideal', 'series'], required: [FORM_TERMS.ideal[0]], forbidden: [...FORM_TERMS.parallel] },
  { field: 'form', absent: 'ideal', values: ['parallel'], required: [FORM_TERMS.parallel[0]], forbidden: [...FORM_TERMS.ideal] },
] as const;

export const CONTROLLER_SCHEMA: SectionDef = {
  description: 'The PID controller: structure, form, gains (in the form written), derivative filter, setpoint weights, anti-windup, output limits.',
  fields: {
    structure: {
      kind: 'choice',
      choices: STRUCTURE_NAMES,
      default: 'pid',
      description: 'Controller structure: p, pi, pd, pid; pi_d / i_pd (setpoint weights by name); smith_pi, feedforward, cascade, scheduled (with their section).',
    },
    form: {
      kind: 'choice',
      choices: FORMS,
      default: 'ideal',
      description: 'How the gains are written: ideal Kc(1 + 1/(Ti s) + Td s), parallel Kp + Ki/s + Kd s, series Kc(1 + 1/(Ti s))(1 + Td s).',
    },
    ...TERM_FIELDS,
    ...TUNING_FIELDS,
    output_limits: {
      kind: 'pair',
      of: 'number',
      strict: true,
      rule: { allowInfinity: true, allowNegativeInfinity: true },
      description: 'Controller output limits [low, high] (default: the actuator limits).',
    },
    ...STRUCTURE_SECTION_FIELDS,
  },
  cases: FORM_CASES,
};

export const CONTROLLER_FIELDS = fieldNames(CONTROLLER_SCHEMA);

/** A trial `gains:` event: new values for some of the controller's fields, in the controller's form. */
export const GAINS_EVENT_SCHEMA: SectionDef = {
  description: "New gains from this instant, in the controller's form (fields left out keep their value); the switch is bumpless.",
  fields: { ...TERM_FIELDS, ...TUNING_FIELDS },
};


const hasIntegral = (s: ControllerStructure): boolean => s === 'pi' || s === 'pid';
const hasDerivative = (s: ControllerStructure): boolean => s === 'pd' || s === 'pid';

/** Report the other form family's terms (kp in an ideal block, kc in a parallel one). */
function checkFamily(r: Reader, f: Fields, form: PidForm): void {
  const own = FORM_TERMS[form];
  const other = form === 'parallel' ? FORM_TERMS.ideal : FORM_TERMS.parallel;
  for (const k of other) {
    if (f.has(k)) {
      r.error(
        'UNKNOWN_FIELD',
        `field '${k}' in ${f.path} belongs to the ${form === 'parallel' ? 'ideal and series forms' : 'parallel form'}; form ${form} uses ${own.join(', ')}`,
        f.keySpan(k),
      );
    }
  }
}

/**
 * Read the form's three terms from `f`, starting from `base` (a gains event overrides only the
 * terms it names). Terms the structure does not have are forced off, with a warning when set.
 */
function readTerms(
  r: Reader,
  f: Fields,
  form: PidForm,
  structure: ControllerStructure,
  base: Readonly<Record<string, number>> | null,
): Record<string, number> | undefined {
  const [pKey, iKey, dKey] = FORM_TERMS[form];
  const parallel = form === 'parallel';
  const out: Record<string, number> = base
    ? { ...base }
    : { [pKey]: NaN, [iKey]: parallel ? 0 : Infinity, [dKey]: 0 };
  let ok = true;
  const pn = base ? f.get(pKey) : f.require(pKey, ` (the proportional gain of form ${form})`);
  if (pn) {
    const v = r.number(pn, f.at(pKey));
    if (v === undefined) ok = false;
    else out[pKey] = v;
  } else if (!base) ok = false;
  const iN = f.get(iKey);
  if (iN) {
    const v = parallel ? r.number(iN, f.at(iKey)) : r.time(iN, f.at(iKey), ruleOf(CONTROLLER_SCHEMA, 'ti'));
    if (v === undefined) ok = false;
    else if (!hasIntegral(structure)) {
      const active = parallel ? v !== 0 : v !== Infinity;
      if (active) r.warn('IGNORED_FIELD', `${f.at(iKey)} is ignored: structure '${structure}' has no integral action`, iN.span);
    } else out[iKey] = v;
  }
  const dN = f.get(dKey);
  if (dN) {
    const v = parallel ? r.number(dN, f.at(dKey)) : r.time(dN, f.at(dKey), ruleOf(CONTROLLER_SCHEMA, 'td'));
    if (v === undefined) ok = false;
    else if (!hasDerivative(structure)) {
      if (v !== 0) r.warn('IGNORED_FIELD', `${f.at(dKey)} is ignored: structure '${structure}' has no derivative action`, dN.span);
    } else out[dKey] = v;
  }
  if (!hasIntegral(structure)) out[iKey] = parallel ? 0 : Infinity;
  if (!hasDerivative(structure)) out[dKey] = 0;
  return ok ? out : undefined;
}

interface Tuning {
  n: number;
  b: number;
  c: number;
  antiWindup: AntiWindup;
  trackingTime: number;
}

function readTuning(r: Reader, f: Fields, base: Tuning): Tuning | undefined {
  const s = GAINS_EVENT_SCHEMA;
  const out = { ...base };
  let ok = true;
  const n = numberField(r, f, s, 'derivative_filter', null);
  if (n === undefined) ok = false;
  else if (n !== null) out.n = n;
  const sw = f.get('setpoint_weight');
  if (sw) {
    const ws = SETPOINT_WEIGHT_SCHEMA;
    const wf = r.fields(sw, f.at('setpoint_weight'), fieldNames(ws), f.keySpan('setpoint_weight'));
    if (!wf) ok = false;
    else {
      const b = numberField(r, wf, ws, 'p', null);
      const c = numberField(r, wf, ws, 'd', null);
      if (b === undefined || c === undefined) ok = false;
      if (typeof b === 'number') out.b = b;
      if (typeof c === 'number') out.c = c;
    }
  }
  const aw = choiceField<AntiWindup, null>(r, f, s, 'anti_windup', null);
  if (aw === undefined) ok = false;
  else if (aw !== null) out.antiWindup = aw;
  const tt = numberField(r, f, s, 'tracking_time', null);
  if (tt === undefined) ok = false;
  else if (tt !== null) out.trackingTime = tt;
  return ok ? out : undefined;
}

function convert(r: Reader, f: Fields, form: PidForm, values: Record<string, number>, tuning: Tuning): GainSet | undefined {
  try {
    const ideal = toIdeal(form, values);
    return { ...ideal, ...tuning };
  } catch (e) {
    const msg = e instanceof Error ? e.message : String(e);
    r.error('FORM_CONVERSION', `${f.path}: ${msg}`, f.keySpan(FORM_TERMS[form][0]));
    return undefined;
  }
}

/** Options of `readController` beyond the plain loop controller. */
export interface ControllerReadOptions {
  /** Dotted path used in messages (default 'loop.controller'). */
  path?: string;
  /** Names the structure sections may refer to (default: not checked). */
  structure?: StructureContext;
  /** Values used for the form's terms the block leaves out (then kc/kp is not required). */
  baseValues?: Readonly<Record<string, number>>;
}

export function readController(
  r: Reader,
  node: YNode,
  owner: Span,
  actuator: ActuatorSpec,
  options: ControllerReadOptions = {},
): ControllerSpec | undefined {
  const s = CONTROLLER_SCHEMA;
  const f = r.fields(node, options.path ?? 'loop.controller', CONTROLLER_FIELDS, owner);
  if (!f) return undefined;
  const named = choiceField<StructureName, StructureName>(r, f, s, 'structure', 'pid');
  const form = choiceField<PidForm, PidForm>(r, f, s, 'form', 'ideal');
  if (named === undefined || form === undefined) return undefined;
  // Terms are read for the widest law the structure may run; the law itself follows from them.
  const terms = structureLaw(named, true);
  checkFamily(r, f, form);
  const values = readTerms(r, f, form, terms, options.baseValues ?? null);
  const tuning = readTuning(r, f, {
    n: DEFAULT_DERIVATIVE_FILTER,
    b: 1,
    c: 0,
    antiWindup: 'clamp',
    trackingTime: NaN,
  });
  // PI-D and I-PD are setpoint weights with names (b 1, c 0 and b 0, c 0).
  if (tuning && (named === 'pi_d' || named === 'i_pd')) {
    if (f.has('setpoint_weight')) {
      r.warn('IGNORED_FIELD', `${f.at('setpoint_weight')} is ignored: structure '${named}' fixes the weights`, f.keySpan('setpoint_weight'));
    }
    tuning.b = named === 'pi_d' ? 1 : 0;
    tuning.c = 0;
  }
  const section = tuning
    ? readStructureSection(r, f, named, tuning, options.structure ?? { disturbances: null, measurements: null })
    : { ok: false };
  let outputMin = actuator.min;
  let outputMax = actuator.max;
  const limits = pairField(r, f, s, 'output_limits', null);
  if (limits) [outputMin, outputMax] = limits;
  if (!values || !tuning || !section.ok) return undefined;
  const gains = convert(r, f, form, values, tuning);
  if (!gains) return undefined;
  const rows = section.ext?.kind === 'scheduled' ? section.ext.table : [];
  const structure = structureLaw(named, gains.td > 0 || rows.some((row) => row.gains !== null && row.gains.td > 0));
  const spec: ControllerSpec = { structure, form, values, gains, outputMin, outputMax };
  if (named !== structure) spec.named = named;
  if (section.ext) spec.extension = section.ext;
  return spec;
}

/**
 * Read a trial `gains:` block (in the controller's form) into a full GainSet: the controller's
 * settings with the named fields replaced.
 */
export function readGainsOverride(r: Reader, node: YNode, path: string, owner: Span, base: ControllerSpec): GainSet | undefined {
  const f = r.fields(node, path, fieldNames(GAINS_EVENT_SCHEMA), owner);
  if (!f) return undefined;
  checkFamily(r, f, base.form);
  const values = readTerms(r, f, base.form, base.structure, base.values);
  const { n, b, c, antiWindup, trackingTime } = base.gains;
  const tuning = readTuning(r, f, { n, b, c, antiWindup, trackingTime });
  if (!values || !tuning) return undefined;
  return convert(r, f, base.form, values, tuning);
}
