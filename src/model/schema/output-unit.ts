/**
 * `model.output_unit`: the engineering unit of the controlled output, a field of every model kind
 * (one definition here, listed in each kind's table so that each reader accepts it), read once by
 * the model section's dispatch (model.ts).
 */
import type { YMap } from '../yaml-doc.js';
import type { FieldDef } from './fields.js';
import type { Reader } from './reader.js';
import { readUnitLabel } from './unit-label.js';

export const OUTPUT_UNIT_FIELD: FieldDef = {
  kind: 'unit',
  description:
    "Engineering unit of the controlled output (e.g. m, degC, '%'), printed beside its values, axes and the requirements in output units; a label only, nothing is converted (default: none).",
};

/** The unit of a model mapping, undefined when absent or bad (diagnosed). */
export function readOutputUnit(r: Reader, model: YMap): string | undefined {
  const node = model.entries.find((e) => e.key === 'output_unit')?.value;
  return node === undefined ? undefined : readUnitLabel(r, node, 'model.output_unit');
}
