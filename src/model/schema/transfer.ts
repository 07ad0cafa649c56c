/** `type: transfer` — num(s)/den(s) e^{-L s}, coefficients in descending powers of s. */
import type { Span } from '../types.js';
import type { YMap } from '../yaml-doc.js';
import { fieldNames, fieldNode, numberField, numbersField, type SectionDef } from './fields.js';
import { LOAD_DISTURBANCE, type ModelRead } from './model-read.js';
import type { Reader } from './reader.js';
import { DELAY_RULE } from './time-range.js';
import { MODEL_LIMITS } from './size-limits.js';
import { OUTPUT_UNIT_FIELD } from './output-unit.js';

export const TRANSFER_SCHEMA: SectionDef = {
  description: 'Transfer function num(s)/den(s) e^(-L s), coefficients in descending powers of s. The input disturbance `load` adds to the input.',
  fields: {
    type: { kind: 'choice', choices: ['transfer'], required: true, description: 'Model kind.' },
    numerator: { kind: 'numbers', minItems: 1, required: true, description: 'Numerator coefficients, highest power of s first.' },
    denominator: {
      kind: 'numbers',
      minItems: 1,
      firstNonZero: true,
      required: true,
      description: 'Denominator coefficients, highest power of s first (the first must not be 0; degree >= the numerator\'s).',
    },
    delay: { kind: 'time', rule: DELAY_RULE, default: 0, description: 'Dead time L on the input (>= 0), s or with a unit.' },
    output_unit: OUTPUT_UNIT_FIELD,
  },
};

export const TRANSFER_FIELDS = fieldNames(TRANSFER_SCHEMA);

export function readTransfer(r: Reader, node: YMap, owner: Span): ModelRead | undefined {
  const s = TRANSFER_SCHEMA;
  const f = r.fields(node, 'model', TRANSFER_FIELDS, owner);
  if (!f) return undefined;
  const nn = fieldNode(f, s, 'numerator');
  const dnode = fieldNode(f, s, 'denominator');
  const numerator = nn ? numbersField(r, f, s, 'numerator', undefined) : undefined;
  const denominator = dnode ? numbersField(r, f, s, 'denominator', undefined) : undefined;
  const delay = numberField(r, f, s, 'delay', 0);
  if (numerator === undefined || denominator === undefined || delay === undefined || !nn || !dnode) return undefined;
  let ok = true;
  if (numerator.length === 0) {
    r.error('BAD_VALUE', 'model.numerator must have at least one coefficient', nn.span);
    ok = false;
  }
  if (denominator.length - 1 > MODEL_LIMITS.states) {
    r.error('BAD_VALUE', `model.denominator has degree ${denominator.length - 1}; at most ${MODEL_LIMITS.states} is accepted`, dnode.span);
    return undefined;
  }
  if (denominator.length === 0) {
    r.error('BAD_VALUE', 'model.denominator must have at least one coefficient', dnode.span);
    ok = false;
  } else if (denominator[0] === 0) {
    const first = dnode.kind === 'seq' ? dnode.items[0].span : dnode.span;
    r.error(
      'IMPROPER_TRANSFER',
      'model.denominator: the leading coefficient (highest power of s) must not be 0',
      first,
    );
    ok = false;
  }
  if (!ok) return undefined;
  // Leading zeros of the numerator do not raise its degree.
  let lead = 0;
  while (lead < numerator.length - 1 && numerator[lead] === 0) lead++;
  const numDeg = numerator.length - 1 - lead;
  const denDeg = denominator.length - 1;
  if (numDeg > denDeg) {
    r.error(
      'IMPROPER_TRANSFER',
      `improper transfer function: numerator degree ${numDeg} exceeds denominator degree ${denDeg} (more zeros than poles cannot be simulated)`,
      nn.span,
    );
    return undefined;
  }
  if (numerator.every((c) => c === 0)) r.warn('BAD_VALUE', 'model.numerator is all zeros: the input has no effect', nn.span);
  return {
    model: { type: 'transfer', numerator, denominator, delay },
    disturbances: [LOAD_DISTURBANCE],
    uncertain: { delay: true },
  };
}
