/** The `loop.requirements:` section: limits a trial must meet. */
import type { Requirements, Span } from '../types.js';
import type { YNode } from '../yaml-doc.js';
import type { NumberRule, Reader } from './reader.js';

interface ReqField {
  key: Exclude<keyof Requirements, 'worstCase'>;
  time: boolean;
  rule: NumberRule;
}

/** File key -> spec key, whether it is a time, and its range. */
const REQUIREMENT_FIELDS: Readonly<Record<string, ReqField>> = {
  overshoot_pct: { key: 'overshootPct', time: false, rule: { ge: 0 } },
  rise_time: { key: 'riseTime', time: true, rule: { gt: 0 } },
  settling_time: { key: 'settlingTime', time: true, rule: { gt: 0 } },
  steady_state_error: { key: 'steadyStateError', time: false, rule: { ge: 0 } },
  iae: { key: 'iae', time: false, rule: { ge: 0 } },
  max_output: { key: 'maxOutput', time: false, rule: {} },
  saturated_time: { key: 'saturatedTime', time: true, rule: { ge: 0 } },
  max_sensitivity: { key: 'maxSensitivity', time: false, rule: { ge: 1 } },
  gain_margin: { key: 'gainMargin', time: false, rule: { gt: 0 } },
  phase_margin_deg: { key: 'phaseMarginDeg', time: false, rule: { gt: 0, lt: 180 } },
  bandwidth: { key: 'bandwidth', time: false, rule: { gt: 0 } },
  damping_ratio: { key: 'dampingRatio', time: false, rule: { ge: 0 } },
  settling_band: { key: 'settlingBand', time: false, rule: { gt: 0, lt: 1 } },
};

export const REQUIREMENTS_KEYS: readonly string[] = [...Object.keys(REQUIREMENT_FIELDS), 'worst_case'];

/** Default settling band (2 % of the step): common practice, no source. */
export const DEFAULT_SETTLING_BAND = 0.02;

export function readRequirements(r: Reader, node: YNode | undefined, owner: Span): Requirements {
  const out: Requirements = {};
  if (node) {
    const f = r.fields(node, 'loop.requirements', REQUIREMENTS_KEYS, owner);
    for (const e of f?.map.entries ?? []) {
      if (e.key === 'worst_case') {
        const v = r.boolean(e.value, 'loop.requirements.worst_case');
        if (v !== undefined) out.worstCase = v;
        continue;
      }
      if (!Object.prototype.hasOwnProperty.call(REQUIREMENT_FIELDS, e.key)) continue;
      const spec = REQUIREMENT_FIELDS[e.key];
      const v = r.numberOrTime(e.value, `loop.requirements.${e.key}`, spec.time, spec.rule);
      if (v !== undefined) out[spec.key] = v;
    }
  }
  if (out.settlingBand === undefined) out.settlingBand = DEFAULT_SETTLING_BAND;
  return out;
}
