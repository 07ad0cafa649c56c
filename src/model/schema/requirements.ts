/** The `loop.requirements:` section: limits a trial must meet. */
import type { Requirements, Span } from '../types.js';
import type { YNode } from '../yaml-doc.js';
import { fieldNames, type FieldDef, type SectionDef } from './fields.js';
import type { Reader } from './reader.js';

/** Default settling band (2 % of the step): common practice, no source. */
export const DEFAULT_SETTLING_BAND = 0.02;

/** File key -> spec key (the table below gives type, range and meaning). */
const SPEC_KEYS: Readonly<Record<string, keyof Requirements>> = {
  overshoot_pct: 'overshootPct',
  rise_time: 'riseTime',
  settling_time: 'settlingTime',
  steady_state_error: 'steadyStateError',
  iae: 'iae',
  max_output: 'maxOutput',
  saturated_time: 'saturatedTime',
  max_sensitivity: 'maxSensitivity',
  gain_margin: 'gainMargin',
  phase_margin_deg: 'phaseMarginDeg',
  bandwidth: 'bandwidth',
  damping_ratio: 'dampingRatio',
  settling_band: 'settlingBand',
  worst_case: 'worstCase',
};

export const REQUIREMENTS_SCHEMA: SectionDef = {
  description:
    'Limits the trial must meet, checked by `looprig check` (absent = not required). Time-domain figures come from the simulated trial (every setpoint step, worst reported), frequency-domain figures from the loop linearised at the start of the trial.',
  fields: {
    overshoot_pct: { kind: 'number', rule: { ge: 0 }, description: 'Largest overshoot after a setpoint step, % of the step (at most).' },
    rise_time: { kind: 'time', rule: { gt: 0 }, description: '10-90 % rise time after a setpoint step (at most), s or with a unit.' },
    settling_time: { kind: 'time', rule: { gt: 0 }, description: 'Time to enter and stay in the settling band after a step (at most), s or with a unit.' },
    steady_state_error: { kind: 'number', rule: { ge: 0 }, description: 'Remaining |setpoint - output| at the end of a step segment (at most), output units.' },
    iae: { kind: 'number', rule: { ge: 0 }, description: 'Integral of |error| over the whole trial (at most), output units x s.' },
    max_output: { kind: 'number', description: 'Largest |controller output| over the trial (at most), actuator units.' },
    saturated_time: { kind: 'time', rule: { ge: 0 }, description: 'Time the actuator spends at a limit (at most), s or with a unit.' },
    max_sensitivity: { kind: 'number', rule: { ge: 1 }, description: 'Peak of |S| = |1/(1 + L)|, Ms (at most; >= 1).' },
    gain_margin: { kind: 'number', rule: { gt: 0 }, description: 'Gain margin as a factor (at least).' },
    phase_margin_deg: { kind: 'number', rule: { gt: 0, lt: 180 }, description: 'Phase margin, degrees (at least; 0 .. 180).' },
    bandwidth: { kind: 'number', rule: { gt: 0 }, description: 'Bandwidth: lowest frequency where |S| reaches 1/sqrt(2), rad/s (at least).' },
    damping_ratio: { kind: 'number', rule: { ge: 0 }, description: 'Smallest damping ratio of the dominant closed-loop poles (at least).' },
    settling_band: {
      kind: 'number',
      rule: { gt: 0, lt: 1 },
      default: DEFAULT_SETTLING_BAND,
      description: 'Settling band as a fraction of the step (0 .. 1, default 0.02).',
    },
    worst_case: {
      kind: 'boolean',
      default: false,
      description: 'Also check every requirement as its worst case over the uncertainty ranges (nominal and every corner).',
    },
  },
};

export const REQUIREMENTS_KEYS: readonly string[] = fieldNames(REQUIREMENTS_SCHEMA);

export function readRequirements(r: Reader, node: YNode | undefined, owner: Span): Requirements {
  const out: Requirements = {};
  if (node) {
    const f = r.fields(node, 'loop.requirements', REQUIREMENTS_KEYS, owner);
    for (const e of f?.map.entries ?? []) {
      if (!Object.prototype.hasOwnProperty.call(REQUIREMENTS_SCHEMA.fields, e.key)) continue;
      const d: FieldDef = REQUIREMENTS_SCHEMA.fields[e.key];
      const path = `loop.requirements.${e.key}`;
      const v =
        d.kind === 'boolean'
          ? r.boolean(e.value, path)
          : d.kind === 'time' || d.kind === 'number'
            ? r.numberOrTime(e.value, path, d.kind === 'time', d.rule ?? {})
            : undefined;
      if (v !== undefined) (out as Record<string, number | boolean>)[SPEC_KEYS[e.key]] = v;
    }
  }
  if (out.settlingBand === undefined) out.settlingBand = DEFAULT_SETTLING_BAND;
  return out;
}
