/**
 * Plant file text -> validated `PlantSpec` plus diagnostics. Never throws on bad input: YAML
 * syntax errors, alias bombs, oversized files and every schema error come back as diagnostics,
 * as many as can be found in one pass.
 */
import { diagnostic, hasErrors, type Diagnostic } from './diagnostics.js';
import { readActuator, valveUncertain } from './schema/actuator.js';
import { fieldNames, fieldNode, textField } from './schema/fields.js';
import { PLANT_SCHEMA } from './schema/plant.js';
import { readCompare } from './schema/compare.js';
import { readLoop } from './schema/loop.js';
import { readModel } from './schema/model.js';
import { Reader } from './schema/reader.js';
import { readSensor } from './schema/sensor.js';
import { readUncertainty } from './schema/uncertainty.js';
import type { PlantSpec } from './types.js';
import { parsePlantYaml, type PlantDocument } from './yaml-doc.js';

/** Largest plant file accepted, in characters (2 MiB). */
export const MAX_PLANT_TEXT = 2 * 1024 * 1024;

export const TOP_LEVEL_FIELDS = fieldNames(PLANT_SCHEMA);

export interface LoadResult {
  /** Present only when there is no error (warnings allowed). */
  plant?: PlantSpec;
  diagnostics: Diagnostic[];
  /** The kept YAML document (null when the text was refused before parsing). */
  doc: PlantDocument | null;
}

/**
 * Load a plant file. `fileName` is only used in messages that mention the file itself; the
 * diagnostics carry offsets, to be printed with `formatDiagnostic(d, text, fileName)`.
 */
export function loadPlant(text: string, fileName = '<plant>'): LoadResult {
  try {
    return loadUnsafe(text, fileName);
  } catch (e) {
    // A loader bug must not take the caller down; report it at the top of the file.
    const msg = e instanceof Error ? e.message : String(e);
    return { diagnostics: [diagnostic('INTERNAL_ERROR', `internal error while reading ${fileName}: ${msg}`, [0, 0])], doc: null };
  }
}

function loadUnsafe(text: string, fileName: string): LoadResult {
  if (typeof text !== 'string') throw new TypeError('loadPlant: text must be a string');
  if (text.length > MAX_PLANT_TEXT) {
    return {
      diagnostics: [
        diagnostic(
          'FILE_TOO_LARGE',
          `${fileName} is ${text.length} characters; plant files are limited to ${MAX_PLANT_TEXT} (2 MiB)`,
          [0, 0],
        ),
      ],
      doc: null,
    };
  }
  const { root, issues, doc } = parsePlantYaml(text);
  const diagnostics: Diagnostic[] = issues.map((i) => diagnostic(i.code, i.message, i.span, i.warning ? 'warning' : 'error'));
  if (hasErrors(diagnostics)) return { diagnostics, doc };
  if (root === null || root.kind !== 'map') {
    const span = root ? root.span : ([0, 0] as const);
    diagnostics.push(
      diagnostic('NOT_A_MAPPING', 'a plant file must be a mapping with at least name, model and loop', span),
    );
    return { diagnostics, doc };
  }
  const r = new Reader();
  const top = r.fields(root, '', TOP_LEVEL_FIELDS, [0, 0]);
  if (!top) return { diagnostics: [...diagnostics, ...r.diagnostics], doc };

  const name = textField(r, top, PLANT_SCHEMA, 'name', undefined);
  textField(r, top, PLANT_SCHEMA, 'description', null);

  const mn = fieldNode(top, PLANT_SCHEMA, 'model');
  const modelRead = mn && readModel(r, mn, top.keySpan('model'));
  const actuator = readActuator(r, top.get('actuator'), top.keySpan('actuator'));
  const sensor = readSensor(r, top.get('sensor'), top.keySpan('sensor'));
  const uncertainty = readUncertainty(
    r,
    top.get('uncertainty'),
    modelRead ? { ...modelRead.uncertain, ...valveUncertain(actuator) } : null,
    modelRead ? modelRead.model.type : null,
  );
  const ln = fieldNode(top, PLANT_SCHEMA, 'loop');
  const disturbances = modelRead ? modelRead.disturbances : null;
  const measurements = modelRead ? (modelRead.model.type === 'ode' ? Object.keys(modelRead.model.measurements) : []) : null;
  const loop = ln && readLoop(r, ln, top.keySpan('loop'), actuator, disturbances, measurements);
  const compare = readCompare(r, top.get('compare'), actuator, { disturbances, measurements });

  diagnostics.push(...r.diagnostics);
  if (hasErrors(diagnostics) || name === undefined || !modelRead || !loop) return { diagnostics, doc };
  const plant: PlantSpec = { name, model: modelRead.model, actuator, sensor, uncertainty, loop };
  if (compare) plant.compare = compare;
  return {
    plant,
    diagnostics,
    doc,
  };
}
