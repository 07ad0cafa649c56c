/** The `model:` section: dispatch on `type` to one reader per model kind. */
import type { ModelType, Span } from '../types.js';
import type { YMap, YNode } from '../yaml-doc.js';
import type { FieldDef, SectionDef } from './fields.js';
import { FIRST_ORDER_SCHEMA, readFirstOrder } from './first-order.js';
import { INTEGRATING_SCHEMA, readIntegrating } from './integrating.js';
import type { ModelRead } from './model-read.js';
import { ODE_SCHEMA, readOde } from './ode.js';
import { readOutputUnit } from './output-unit.js';
import type { Reader } from './reader.js';
import { readSecondOrder, SECOND_ORDER_SCHEMA } from './second-order.js';
import { readStateSpace, STATE_SPACE_SCHEMA } from './state-space.js';
import { readTransfer, TRANSFER_SCHEMA } from './transfer.js';

/** One table per model kind, selected by `type`. */
export const MODEL_VARIANTS: Readonly<Record<ModelType, SectionDef>> = {
  ode: ODE_SCHEMA,
  transfer: TRANSFER_SCHEMA,
  first_order: FIRST_ORDER_SCHEMA,
  second_order: SECOND_ORDER_SCHEMA,
  integrating: INTEGRATING_SCHEMA,
  state_space: STATE_SPACE_SCHEMA,
};

export const MODEL_TYPES: readonly ModelType[] = Object.keys(MODEL_VARIANTS) as ModelType[];

export const MODEL_FIELD: FieldDef = {
  kind: 'variants',
  variants: MODEL_VARIANTS,
  required: true,
  description: `The process model; \`type\` selects the kind: ${Object.keys(MODEL_VARIANTS).join(', ')}.`,
};

export function readModel(r: Reader, node: YNode, owner: Span): ModelRead | undefined {
  const m = r.mapping(node, 'model');
  if (!m) return undefined;
  const typeEntry = m.entries.find((e) => e.key === 'type');
  if (!typeEntry) {
    r.error('MISSING_FIELD', `missing field 'type' in model; expected one of ${MODEL_TYPES.join(', ')}`, owner);
    return undefined;
  }
  const type = r.choice(typeEntry.value, 'model.type', MODEL_TYPES);
  const read = readKind(r, type, m, owner);
  // Every kind's table lists output_unit, so its reader has accepted the key; read it once here.
  const unit = readOutputUnit(r, m);
  if (read !== undefined && unit !== undefined) read.model.outputUnit = unit;
  return read;
}

function readKind(r: Reader, type: ModelType | undefined, m: YMap, owner: Span): ModelRead | undefined {
  switch (type) {
    case 'ode':
      return readOde(r, m, owner);
    case 'transfer':
      return readTransfer(r, m, owner);
    case 'first_order':
      return readFirstOrder(r, m, owner);
    case 'second_order':
      return readSecondOrder(r, m, owner);
    case 'integrating':
      return readIntegrating(r, m, owner);
    case 'state_space':
      return readStateSpace(r, m, owner);
    default:
      return undefined;
  }
}
