/** The `actuator:` section: position limits, rate limit (units per second) and the valve as it is: stiction, backlash, lag, characteristic. */
import type { ActuatorSpec, Span } from '../types.js';
import type { YNode } from '../yaml-doc.js';
import { choiceField, fieldNames, numberField, sectionOf, textField, type SectionDef } from './fields.js';
import type { Fields, Reader } from './reader.js';

export const DEFAULT_ACTUATOR: Readonly<ActuatorSpec> = Object.freeze({ min: -Infinity, max: Infinity, rateLimit: Infinity });

const STICTION_SCHEMA: SectionDef = {
  description:
    'Valve stiction, the two-parameter model of He, Wang, Pottmann & Qin (2007): the stem moves only when the command leaves the static band ' +
    'around it, and then lands the dynamic band behind the command. In the slip-jump/stick-band terms of Choudhury, Thornhill & Shah (2005): ' +
    'S = static + dynamic, J = static - dynamic. Input units; dynamic <= static.',
  fields: {
    static: { kind: 'number', rule: { ge: 0 }, required: true, description: 'Static band (>= 0): the command must move this far from the stem to break it loose.' },
    dynamic: { kind: 'number', rule: { ge: 0 }, required: true, description: 'Dynamic band (0 <= dynamic <= static): how far behind the command the stem lands after a slip.' },
  },
};

export const ACTUATOR_SCHEMA: SectionDef = {
  description: 'The final control element between the controller and the plant input: position limits and a rate limit.',
  fields: {
    min: { kind: 'number', rule: { allowNegativeInfinity: true }, description: 'Lowest input the actuator delivers (default: none).' },
    max: { kind: 'number', rule: { allowInfinity: true }, description: 'Highest input the actuator delivers (default: none); must exceed min.' },
    rate_limit: {
      kind: 'number',
      rule: { gt: 0, allowInfinity: true },
     
      description: 'Largest rate of change of the input, units per second (> 0; default: none).',
    },
    stiction: { kind: 'section', section: STICTION_SCHEMA, description: STICTION_SCHEMA.description },
    backlash: {
      kind: 'number',
      rule: { ge: 0 },
      description: 'Backlash (dead-band) width, input units (>= 0; default none): the stiction model with static = dynamic = width/2.',
    },
    characteristic: {
      kind: 'choice',
      choices: ['linear', 'equal_percentage', 'quick_opening'],
      default: 'linear',
      description:
        'Valve characteristic on the fraction of travel f between min and max: linear f, equal_percentage R^(f-1), quick_opening sqrt(f) (needs finite min and max).',
    },
    rangeability: { kind: 'number', rule: { gt: 1 }, default: 50, description: 'Rangeability R of the equal-percentage characteristic (> 1).' },
    lag: { kind: 'time', rule: { ge: 0 }, default: 0, description: 'Positioner and actuator lag, first order (>= 0; 0 = none), s or with a unit.' },
    unit: {
      kind: 'unit',
      description:
        "Engineering unit of the actuator position and the controller output (e.g. '%', m3/h), printed beside their values and axes; a label only, nothing is converted (default: none).",
    },
  },
};

export const ACTUATOR_FIELDS = fieldNames(ACTUATOR_SCHEMA);

export function readActuator(r: Reader, node: YNode | undefined, owner: Span): ActuatorSpec {
  const s = ACTUATOR_SCHEMA;
  const out: ActuatorSpec = { ...DEFAULT_ACTUATOR };
  if (!node) return out;
  const f = r.fields(node, 'actuator', ACTUATOR_FIELDS, owner);
  if (!f) return out;
  const min = numberField(r, f, s, 'min', undefined);
  const max = numberField(r, f, s, 'max', undefined);
  const rate = numberField(r, f, s, 'rate_limit', undefined);
  if (min !== undefined) out.min = min;
  if (max !== undefined) out.max = max;
  if (rate !== undefined) out.rateLimit = rate;
  const unit = textField(r, f, s, 'unit', undefined);
  if (unit !== undefined) out.unit = unit;
  const mx = f.get('max');
  if (min !== undefined && max !== undefined && !(min < max) && mx) {
    r.error('BAD_VALUE', `actuator.min (${min}) must be below actuator.max (${max})`, mx.span);
  }
  readValve(r, f, out);
  return out;
}

/** The valve fields: stiction or backlash, characteristic and rangeability, lag. */
function readValve(r: Reader, f: Fields, out: ActuatorSpec): void {
  const s = ACTUATOR_SCHEMA;
  const travel = out.max - out.min;
  const wider = (band: number, what: string, span: Span): void => {
    if (Number.isFinite(travel) && band > travel) r.error('BAD_VALUE', `${what} (${band}) is wider than the actuator range (${travel})`, span);
  };
  const st = f.get('stiction');
  if (st) {
    const sf = r.fields(st, f.at('stiction'), fieldNames(sectionOf(s, 'stiction')), f.keySpan('stiction'));
    if (sf) {
      const ss = sectionOf(s, 'stiction');
      const fs = numberField(r, sf, ss, 'static', undefined);
      const fd = numberField(r, sf, ss, 'dynamic', undefined);
      if (fs !== undefined && fd !== undefined) {
        const dn = sf.get('dynamic');
        if (fd > fs && dn) r.error('BAD_VALUE', `actuator.stiction.dynamic (${fd}) must not exceed static (${fs})`, dn.span);
        else out.stiction = { static: fs, dynamic: fd };
        wider(fs + fd, 'actuator.stiction static + dynamic', st.span);
      }
    }
  }
  const backlash = numberField(r, f, s, 'backlash', undefined);
  if (backlash !== undefined) {
    const bn = f.get('backlash');
    if (st && bn) r.error('BAD_VALUE', 'give actuator.stiction or actuator.backlash, not both (backlash is stiction with static = dynamic = width/2)', bn.span);
    else out.backlash = backlash;
    if (bn) wider(backlash, 'actuator.backlash', bn.span);
  }
  const ch = choiceField<NonNullable<ActuatorSpec['characteristic']>, undefined>(r, f, s, 'characteristic', undefined);
  if (ch !== undefined) {
    out.characteristic = ch;
    const cn = f.get('characteristic');
    if (ch !== 'linear' && !Number.isFinite(travel) && cn) {
      r.error('BAD_VALUE', `actuator.characteristic ${ch} works on the fraction of travel: give finite actuator.min and actuator.max`, cn.span);
    }
  }
  const rangeability = numberField(r, f, s, 'rangeability', undefined);
  if (rangeability !== undefined) out.rangeability = rangeability;
  const lag = numberField(r, f, s, 'lag', undefined);
  if (lag !== undefined) out.lag = lag;
}

/**
 * The valve's bands as names the `uncertainty:` section may give ranges for (dotted, so no ode
 * parameter can take them): `stiction.static`, `stiction.dynamic` with stiction, `backlash.width`
 * with backlash. Value: whether it is a time (never).
 */
export function valveUncertain(actuator: ActuatorSpec): Record<string, boolean> {
  const out: Record<string, boolean> = {};
  if (actuator.stiction !== undefined) {
    out['stiction.static'] = false;
    out['stiction.dynamic'] = false;
  }
  if (actuator.backlash !== undefined) out['backlash.width'] = false;
  return out;
}
