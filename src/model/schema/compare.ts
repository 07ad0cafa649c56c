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
import { CONTROLLER_SCHEMA, readController } from './controller.js';
import { fieldNames, fieldNode, textField, type FieldDef, type SectionDef } from './fields.js';
import type { Reader } from './reader.js';
import type { StructureContext } from './structure.js';

/** A candidate's controller: as loop.controller, but the gains may be left out (then they are tuned). */
const CANDIDATE_CONTROLLER: SectionDef = {
  ...CONTROLLER_SCHEMA,
  description: `${CONTROLLER_SCHEMA.description} Gains left out are tuned from the plant.`,
  cases: (CONTROLLER_SCHEMA.cases ?? []).map((c) => ({ ...c, required: [] })),
};

export const COMPARE_ENTRY_SCHEMA: SectionDef = {
  description: 'One candidate controller to run on the trial beside the others.',
  fields: {
    name: { kind: 'text', required: true, hint: ' (a label for the table)', description: 'Label of the candidate (unique).' },
    controller: { kind: 'section', section: CANDIDATE_CONTROLLER, required: true, description: CANDIDATE_CONTROLLER.description },
  },
};

export const COMPARE_FIELD: FieldDef = {
  kind: 'list',
  items: { kind: 'section', section: COMPARE_ENTRY_SCHEMA },
  description: 'Candidate controllers to compare side by side on the loop\'s trial (`looprig compare`).',
};

export const COMPARE_FIELDS = fieldNames(COMPARE_ENTRY_SCHEMA);

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
    const nn = f.get('name');
    const name = textField(r, f, COMPARE_ENTRY_SCHEMA, 'name', undefined);
    if (name !== undefined && nn) {
      if (seen.has(name)) r.error('DUPLICATE_NAME', `${path}.name: '${name}' is used by another candidate`, nn.span);
      seen.add(name);
    }
    const cn = fieldNode(f, COMPARE_ENTRY_SCHEMA, 'controller');
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
