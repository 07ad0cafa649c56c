/**
 * The top-level `compare:` list: candidate controllers to run on the loop's trial side by side.
 *
 *   compare:
 *     - name: single PI
 *       controller: { structure: pi, kc: 2, ti: 60 s }
 *     - name: cascade
 *       controller: { structure: cascade, cascade: { inner_measurement: jacket_temperature } }
 *
 * `controller` is read exactly as `loop.controller`. A candidate without kc (kp) gets tuned
 * gains (`autoGains`); its spec then carries placeholder terms.
 */
import { FORM_TERMS } from '../pid-forms.js';
import type { ActuatorSpec, CompareCandidateSpec, PidForm } from '../types.js';
import type { YNode } from '../yaml-doc.js';
import { readController } from './controller.js';
import type { Reader } from './reader.js';
import type { StructureContext } from './structure.js';

export const COMPARE_FIELDS = ['name', 'controller'] as const;

/** Placeholder terms of a candidate whose gains are to be tuned. */
function placeholder(form: PidForm): Record<string, number> {
  return form === 'parallel' ? { kp: 1, ki: 0, kd: 0 } : { kc: 1, ti: Infinity, td: 0 };
}

export function readCompare(
  r: Reader,
  node: YNode | undefined,
  actuator: ActuatorSpec,
  ctx: StructureContext,
): CompareCandidateSpec[] | undefined {
  if (!node) return undefined;
  const seq = r.list(node, 'compare');
  if (!seq) return undefined;
  const out: CompareCandidateSpec[] = [];
  const seen = new Set<string>();
  seq.items.forEach((item, i) => {
    const path = `compare[${i}]`;
    const f = r.fields(item, path, COMPARE_FIELDS, item.span);
    if (!f) return;
    const nn = f.require('name', ' (a label for the table)');
    const name = nn && r.string(nn, `${path}.name`);
    if (name !== undefined && nn) {
      if (seen.has(name)) r.error('DUPLICATE_NAME', `${path}.name: '${name}' is used by another candidate`, nn.span);
      seen.add(name);
    }
    const cn = f.require('controller');
    if (!cn || name === undefined) return;
    let autoGains = false;
    let form: PidForm = 'ideal';
    if (cn.kind === 'map') {
      const formEntry = cn.entries.find((e) => e.key === 'form');
      if (formEntry && formEntry.value.kind === 'scalar' && formEntry.value.value === 'parallel') form = 'parallel';
      const keys = new Set(cn.entries.map((e) => e.key));
      const [pKey, iKey, dKey] = FORM_TERMS[form];
      autoGains = !keys.has(pKey);
      if (autoGains && (keys.has(iKey) || keys.has(dKey))) {
        r.error('MISSING_FIELD', `missing field '${pKey}' in ${path}.controller: give ${pKey} with ${iKey}/${dKey}, or no gains to have them tuned`, f.keySpan('controller'));
        return;
      }
    }
    const controller = readController(r, cn, f.keySpan('controller'), actuator, {
      path: `${path}.controller`,
      structure: ctx,
      baseValues: autoGains ? placeholder(form) : undefined,
    });
    if (controller) out.push({ name, controller, autoGains });
  });
  return out;
}
