/** The `loop.trial:` section: duration, initial conditions and the event script. */
import type { ControllerSpec, Span, TrialEvent, TrialSpec } from '../types.js';
import type { YNode } from '../yaml-doc.js';
import { readGainsOverride } from './controller.js';
import type { Reader } from './reader.js';

export const TRIAL_FIELDS = ['duration', 'initial_setpoint', 'initial_output', 'events'] as const;
const EVENT_KINDS = ['setpoint', 'setpoint_ramp', 'disturbance', 'mode', 'gains'] as const;
const EVENT_FIELDS = ['at', ...EVENT_KINDS, 'output', 'label'] as const;

export interface TrialContext {
  /** Disturbance names of the model (null when the model failed: names are not checked). */
  disturbances: readonly string[] | null;
  /** The controller (null when it failed: gains events are only checked for shape). */
  controller: ControllerSpec | null;
}

export function readTrial(r: Reader, node: YNode, owner: Span, ctx: TrialContext): TrialSpec | undefined {
  const f = r.fields(node, 'loop.trial', TRIAL_FIELDS, owner);
  if (!f) return undefined;
  const before = r.errorCount();
  const dn = f.require('duration');
  const duration = dn && r.time(dn, 'loop.trial.duration', { gt: 0 });
  const isn = f.get('initial_setpoint');
  const initialSetpoint = isn ? r.number(isn, 'loop.trial.initial_setpoint') : null;
  const ion = f.get('initial_output');
  const initialOutput = ion ? r.number(ion, 'loop.trial.initial_output') : null;
  const events: TrialEvent[] = [];
  const en = f.get('events');
  const seq = en && r.list(en, 'loop.trial.events');
  seq?.items.forEach((item, i) => readEvent(r, item, `loop.trial.events[${i}]`, duration ?? null, ctx, events));
  // Stable sort: events at the same instant keep their file order.
  const sorted = events.map((e, i) => ({ e, i })).sort((a, b) => a.e.at - b.e.at || a.i - b.i).map((x) => x.e);
  if (r.errorCount() > before || duration === undefined || initialSetpoint === undefined || initialOutput === undefined) {
    return undefined;
  }
  return { duration, initialSetpoint, initialOutput, events: sorted };
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
  const an = f.require('at', ' (the event time)');
  const at = an && r.time(an, `${path}.at`, { ge: 0 });
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
      const rf = r.fields(value, `${path}.setpoint_ramp`, ['to', 'duration'], f.keySpan(kind));
      if (!rf) return;
      const tn = rf.require('to');
      const dn = rf.require('duration');
      const to = tn && r.number(tn, `${path}.setpoint_ramp.to`);
      const d = dn && r.time(dn, `${path}.setpoint_ramp.duration`, { gt: 0 });
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
      const mode = r.choice(value, `${path}.mode`, ['manual', 'auto'] as const);
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
