/** The `model:` section: dispatch on `type` to one reader per model kind. */
import type { ModelType, Span } from '../types.js';
import type { YNode } from '../yaml-doc.js';
import { readFirstOrder } from './first-order.js';
import { readIntegrating } from './integrating.js';
import type { ModelRead } from './model-read.js';
import { readOde } from './ode.js';
import type { Reader } from './reader.js';
import { readSecondOrder } from './second-order.js';
import { readStateSpace } from './state-space.js';
import { readTransfer } from './transfer.js';

export const MODEL_TYPES: readonly ModelType[] = [
  'ode',
  'transfer',
  'first_order',
  'second_order',
  'integrating',
  'state_space',
];

export function readModel(r: Reader, node: YNode, owner: Span): ModelRead | undefined {
  const m = r.mapping(node, 'model');
  if (!m) return undefined;
  const typeEntry = m.entries.find((e) => e.key === 'type');
  if (!typeEntry) {
    r.error('MISSING_FIELD', `missing field 'type' in model; expected one of ${MODEL_TYPES.join(', ')}`, owner);
    return undefined;
  }
  const type = r.choice(typeEntry.value, 'model.type', MODEL_TYPES);
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
