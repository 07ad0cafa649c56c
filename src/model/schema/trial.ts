/** The `loop.trial:` section: duration, initial conditions and the event script. */
import type { ControllerSpec, Span, TrialEvent, TrialSpec, TrialStart } from '../types.js';
import type { YNode } from '../yaml-doc.js';
import { GAINS_EVENT_SCHEMA, readGainsOverride } from './controller.js';
import { choiceField, fieldNames, fieldNode, numberField, type SectionDef } from './fields.js';
import type { Reader } from './reader.js';
import { MAX_TIME } from './time-range.js';

const EVENT_KINDS = ['setpoint', 'setpoint_ramp', 'disturbance', 'mode', 'gains'] as const;
const MODES = ['manual', 'auto'] as const;
const TRIAL_STARTS: readonly TrialStart[] = ['steady', 'rest'];

export const RAMP_SCHEMA: SectionDef = {
  description: 'Ramp the setpoint from its current value to `to` over `duration`.',
  fields: {
    to: { kind: 'number', required: true, description: 'Setpoint at the end of the ramp.' },
    duration: { kind: 'time', rule: { gt: 0 }, required: true, description: 'Length of the ramp (> 0), s or with a unit.' },
  },
};

export const EVENT_SCHEMA: SectionDef = {
  description: 'One scripted event at time `at`: exactly one of setpoint, setpoint_ramp, disturbance, mode, gains.',
  fields: {
    at: { kind: 'time', rule: { ge: 0 }, required: true, hint: ' (the event time)', description: 'When, from the start of the trial (>= 0, within the duration), s or with a unit.' },
    setpoint: { kind: 'number', description: 'Step the setpoint to this value.' },
    setpoint_ramp: { kind: 'section', section: RAMP_SCHEMA, description: RAMP_SCHEMA.description },
    disturbance: {
      kind: 'names',
      value: { kind: 'number' },
      minEntries: 1,
      description: 'Set disturbances (names from the model; linear kinds have `load`) to these values.',
    },
    mode: { kind: 'choice', choices: MODES, description: 'manual: hold the controller output (at `output`, or where it is); auto: bumpless return.' },
    gains: { kind: 'section', section: GAINS_EVENT_SCHEMA, description: GAINS_EVENT_SCHEMA.description },
    output: { kind: 'number', description: 'With mode: manual, the output to hold.' },
    label: { kind: 'text', description: 'With gains: a name for the new gain set.' },
  },
  oneOfGroups: EVENT_KINDS.map((k) => [k]),
  requires: { output: ['mode'], label: ['gains'] },
};

export const TRIAL_SCHEMA: SectionDef = {
  description: 'The scripted closed-loop run: its duration, initial conditions and events.',
  fields: {
    duration: { kind: 'time', rule: { gt: 0, le: MAX_TIME }, required: true, description: `Length of the trial (> 0, at most ${MAX_TIME} s), s or with a unit.` },
    initial_setpoint: { kind: 'number', description: 'Setpoint before the first event (default: the plant output at t = 0).' },
    initial_output: {
      kind: 'number',
      description:
        'Controller output at t = 0 (bumpless start). Given: the actuator starts there; a linear model settles at it (start: steady), an ode plant starts from the initial states it writes. Absent: the input that holds the initial setpoint at steady state (start: steady), else 0 within the actuator limits.',
    },
    start: {
      kind: 'choice',
      choices: TRIAL_STARTS,
      default: 'steady',
      description:
        'How the loop starts, for every model kind. steady = settled: the equilibrium whose output is the initial setpoint (else the output at the initial states), with the disturbances at their initial values and the controller taking over bumplessly at the input that holds it; with initial_output, a linear model settles at that input and an ode plant starts from its initial states. When none exists within the actuator limits (unreachable setpoint, integrating model) the trial starts at rest with a warning. rest = the initial states as written (the zero state of a linear model) and the actuator at initial_output, else 0, so that initial_output is a step at t = 0.',
    },
    events: { kind: 'list', items: { kind: 'section', section: EVENT_SCHEMA }, description: 'Events in any order (sorted by time; same-time events keep their order).' },
  },
};

export const TRIAL_FIELDS = fieldNames(TRIAL_SCHEMA);
const EVENT_FIELDS = fieldNames(EVENT_SCHEMA);

export interface TrialContext {
  /** Disturbance names of the model (null when the model failed: names are not checked). */
  disturbances: readonly string[] | null;
  /** The controller (null when it failed: gains events are only checked for shape). */
  controller: ControllerSpec | null;
}

export function readTrial(r: Reader, node: YNode, owner: Span, ctx: TrialContext): TrialSpec | undefined {
  const s = TRIAL_SCHEMA;
  const f = r.fields(node, 'loop.trial', TRIAL_FIELDS, owner);
  if (!f) return undefined;
  const before = r.errorCount();
  const duration = numberField(r, f, s, 'duration', undefined);
  const initialSetpoint = numberField(r, f, s, 'initial_setpoint', null);
  const initialOutput = numberField(r, f, s, 'initial_output', null);
  const start = choiceField<TrialStart, 'steady'>(r, f, s, 'start', 'steady');
  const events: TrialEvent[] = [];
  const en = f.get('events');
  const seq = en && r.list(en, 'loop.trial.events');
  seq?.items.forEach((item, i) => readEvent(r, item, `loop.trial.events[${i}]`, duration ?? null, ctx, events));
  // Stable sort: events at the same instant keep their file order.
  const sorted = events.map((e, i) => ({ e, i })).sort((a, b) => a.e.at - b.e.at || a.i - b.i).map((x) => x.e);
  if (r.errorCount() > before || duration === undefined || initialSetpoint === undefined || initialOutput === undefined || start === undefined) {
    return undefined;
  }
  return { duration, initialSetpoint, initialOutput, events: sorted, start };
}

function readEvent(
  r: Reader,
  node: YNode,
  path: string,
  duration: number | null,
  ctx: TrialContext,
  out: TrialEvent[],
): void {
  const f = r.fields(node, path, EVENT_FIELDS, node.span);
  if (!f) return;
  const an = fieldNode(f, EVENT_SCHEMA, 'at');
  const at = an ? numberField(r, f, EVENT_SCHEMA, 'at', undefined) : undefined;
  if (at !== undefined && duration !== null && at > duration && an) {
    r.error('EVENT_AFTER_END', `${path}.at (${at} s) is after the end of the trial (duration ${duration} s)`, an.span);
  }
  const kinds = EVENT_KINDS.filter((k) => f.has(k));
  if (kinds.length === 0) {
    r.error('MISSING_FIELD', `${path} needs one of ${EVENT_KINDS.join(', ')}`, node.span);
    return;
  }
  if (kinds.length > 1) {
    r.error('BAD_VALUE', `${path} has ${kinds.join(' and ')}; one event does one thing`, f.keySpan(kinds[1]));
    return;
  }
  const kind = kinds[0];
  const value = f.get(kind) as YNode;
  const extraOk: Record<string, readonly string[]> = { mode: ['output'], gains: ['label'] };
  for (const extra of ['output', 'label']) {
    if (f.has(extra) && !(extraOk[kind] ?? []).includes(extra)) {
      r.error('UNKNOWN_FIELD', `${path}.${extra} only goes with ${extra === 'output' ? 'mode' : 'gains'}`, f.keySpan(extra));
    }
  }
  const t = at ?? NaN;
  switch (kind) {
    case 'setpoint': {
      const v = r.number(value, `${path}.setpoint`);
      if (v !== undefined && at !== undefined) out.push({ kind: 'setpoint', at: t, value: v });
      return;
    }
    case 'setpoint_ramp': {
      const rf = r.fields(value, `${path}.setpoint_ramp`, fieldNames(RAMP_SCHEMA), f.keySpan(kind));
      if (!rf) return;
      const to = numberField(r, rf, RAMP_SCHEMA, 'to', undefined);
      const d = numberField(r, rf, RAMP_SCHEMA, 'duration', undefined);
      if (to !== undefined && d !== undefined && at !== undefined) out.push({ kind: 'setpoint_ramp', at: t, to, duration: d });
      return;
    }
    case 'disturbance': {
      const m = r.mapping(value, `${path}.disturbance`);
      if (!m) return;
      if (m.entries.length === 0) r.error('MISSING_FIELD', `${path}.disturbance names no disturbance`, value.span);
      for (const e of m.entries) {
        const v = r.number(e.value, `${path}.disturbance.${e.key}`);
        if (ctx.disturbances !== null && !ctx.disturbances.includes(e.key)) {
          r.error(
            'UNKNOWN_DISTURBANCE',
            `${path}: unknown disturbance '${e.key}'; the model has ${ctx.disturbances.join(', ') || 'no disturbances'}`,
            e.keySpan,
          );
          continue;
        }
        if (v !== undefined && at !== undefined) out.push({ kind: 'disturbance', at: t, name: e.key, value: v });
      }
      return;
    }
    case 'mode': {
      const mode = r.choice(value, `${path}.mode`, MODES);
      const on = f.get('output');
      const output = on ? r.number(on, `${path}.output`) : null;
      if (mode !== undefined && output !== undefined && at !== undefined) out.push({ kind: 'mode', at: t, mode, output });
      return;
    }
    case 'gains': {
      const ln = f.get('label');
      const label = ln ? r.string(ln, `${path}.label`) : `gains at ${at ?? '?'} s`;
      if (ctx.controller === null) return;
      const gains = readGainsOverride(r, value, `${path}.gains`, f.keySpan(kind), ctx.controller);
      if (gains && label !== undefined && at !== undefined) out.push({ kind: 'gains', at: t, gains, label });
      return;
    }
  }
}
