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
} from '../types.js';
import type { YNode } from '../yaml-doc.js';
import type { Fields, Reader } from './reader.js';
import { baseStructure, readStructureSection, STRUCTURE_NAMES, STRUCTURE_SECTIONS, type StructureContext } from './structure.js';

export const STRUCTURES: readonly ControllerStructure[] = ['p', 'pi', 'pd', 'pid'];
export const FORMS: readonly PidForm[] = ['ideal', 'parallel', 'series'];
export const ANTI_WINDUP: readonly AntiWindup[] = ['none', 'clamp', 'back_calculation'];

/** Fields shared by the controller block and a trial `gains:` event (besides the form's terms). */
const TUNING_FIELDS = ['derivative_filter', 'setpoint_weight', 'anti_windup', 'tracking_time'] as const;
export const CONTROLLER_FIELDS = [
  'structure',
  'form',
  'kc',
  'ti',
  'td',
  'kp',
  'ki',
  'kd',
  ...TUNING_FIELDS,
  'output_limits',
  ...STRUCTURE_SECTIONS,
] as const;

/** Default derivative filter divisor N (filter time td/N): common practice, no source. */
export const DEFAULT_DERIVATIVE_FILTER = 10;

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
    const v = parallel ? r.number(iN, f.at(iKey)) : r.time(iN, f.at(iKey), { gt: 0, allowInfinity: true });
    if (v === undefined) ok = false;
    else if (!hasIntegral(structure)) {
      const active = parallel ? v !== 0 : v !== Infinity;
      if (active) r.warn('IGNORED_FIELD', `${f.at(iKey)} is ignored: structure '${structure}' has no integral action`, iN.span);
    } else out[iKey] = v;
  }
  const dN = f.get(dKey);
  if (dN) {
    const v = parallel ? r.number(dN, f.at(dKey)) : r.time(dN, f.at(dKey), { ge: 0 });
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
  const out = { ...base };
  let ok = true;
  const nn = f.get('derivative_filter');
  if (nn) {
    const v = r.number(nn, f.at('derivative_filter'), { gt: 0 });
    if (v === undefined) ok = false;
    else out.n = v;
  }
  const sw = f.get('setpoint_weight');
  if (sw) {
    const wf = r.fields(sw, f.at('setpoint_weight'), ['p', 'd'], f.keySpan('setpoint_weight'));
    if (!wf) ok = false;
    const bp = wf?.get('p');
    const cd = wf?.get('d');
    if (bp) {
      const v = r.number(bp, `${f.at('setpoint_weight')}.p`);
      if (v === undefined) ok = false;
      else out.b = v;
    }
    if (cd) {
      const v = r.number(cd, `${f.at('setpoint_weight')}.d`);
      if (v === undefined) ok = false;
      else out.c = v;
    }
  }
  const aw = f.get('anti_windup');
  if (aw) {
    const v = r.choice(aw, f.at('anti_windup'), ANTI_WINDUP);
    if (v === undefined) ok = false;
    else out.antiWindup = v;
  }
  const tt = f.get('tracking_time');
  if (tt) {
    const v = r.time(tt, f.at('tracking_time'), { gt: 0 });
    if (v === undefined) ok = false;
    else out.trackingTime = v;
  }
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
  const f = r.fields(node, options.path ?? 'loop.controller', CONTROLLER_FIELDS, owner);
  if (!f) return undefined;
  const sn = f.get('structure');
  const fn = f.get('form');
  const named = sn ? r.choice(sn, f.at('structure'), STRUCTURE_NAMES) : 'pid';
  const form = fn ? r.choice(fn, f.at('form'), FORMS) : 'ideal';
  if (named === undefined || form === undefined) return undefined;
  const structure = baseStructure(named);
  checkFamily(r, f, form);
  const values = readTerms(r, f, form, structure, options.baseValues ?? null);
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
  const ol = f.get('output_limits');
  if (ol) {
    const p = r.pair(ol, f.at('output_limits'), false, true, { allowInfinity: true, allowNegativeInfinity: true });
    if (p) [outputMin, outputMax] = p;
  }
  if (!values || !tuning || !section.ok) return undefined;
  const gains = convert(r, f, form, values, tuning);
  if (!gains) return undefined;
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
  const allowed = [...FORM_TERMS.ideal, ...FORM_TERMS.parallel, ...TUNING_FIELDS];
  const f = r.fields(node, path, allowed, owner);
  if (!f) return undefined;
  checkFamily(r, f, base.form);
  const values = readTerms(r, f, base.form, base.structure, base.values);
  const { n, b, c, antiWindup, trackingTime } = base.gains;
  const tuning = readTuning(r, f, { n, b, c, antiWindup, trackingTime });
  if (!values || !tuning) return undefined;
  return convert(r, f, base.form, values, tuning);
}
