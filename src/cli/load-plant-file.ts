/**
 * Read a plant file, apply `--set` overrides, and load it, turning diagnostics into stderr lines
 * (`FILE:LINE:COL: message`) and a `UserError` with exit status 2 when the file has errors.
 */
import { parseDocument } from 'yaml';
import { formatDiagnostic, loadPlant, MAX_PLANT_TEXT, parseDuration } from '../model/index.js';
import type { PlantSpec, PidForm } from '../model/types.js';
import { UserError } from './errors.js';
import { EncodingError, type Io } from './io.js';
import { readFailure } from './read-bounded.js';

/**
 * Largest plant file read, bytes: the loader's character limit at up to 4 UTF-8 bytes each. Here,
 * not in read-bounded.ts, which the start-up path loads: the limit comes from model/.
 */
export const MAX_PLANT_BYTES = 4 * MAX_PLANT_TEXT;

export interface LoadedPlant {
  plant: PlantSpec;
  /** The file text as read (before overrides). */
  text: string;
  /** Loader warnings, formatted `FILE:LINE:COL: warning: message`. */
  warnings: string[];
}

/** Controller fields `--set` may override, by the form the file uses. Times may carry units. */
const SETTABLE: Readonly<Record<PidForm, readonly string[]>> = {
  ideal: ['kc', 'ti', 'td', 'derivative_filter', 'tracking_time'],
  series: ['kc', 'ti', 'td', 'derivative_filter', 'tracking_time'],
  parallel: ['kp', 'ki', 'kd', 'derivative_filter', 'tracking_time'],
};
const TIME_FIELDS = new Set(['ti', 'td', 'tracking_time']);

/** One parsed `--set NAME=VALUE`. */
export interface Override {
  name: string;
  raw: string;
}

/** Split `NAME=VALUE` arguments; a malformed one is a usage error. */
export function parseOverrides(args: readonly string[]): Override[] {
  return args.map((arg) => {
    const eq = arg.indexOf('=');
    const name = eq > 0 ? arg.slice(0, eq).trim() : '';
    const raw = eq > 0 ? arg.slice(eq + 1).trim() : '';
    if (name === '' || raw === '') throw new UserError(`--set expects NAME=VALUE, got '${arg}'`);
    return { name, raw };
  });
}

function readOrFail(path: string, io: Io): string {
  try {
    return io.readText(path, MAX_PLANT_BYTES);
  } catch (error) {
    if (error instanceof EncodingError) {
      io.err(`${error.message}\n`);
      throw new UserError('', UserError.USAGE);
    }
    throw new UserError(`cannot read ${path}: ${readFailure(error)}`);
  }
}

/** Value of one override as it goes into the file: seconds for times, a plain number otherwise. */
function overrideValue(o: Override): number {
  if (TIME_FIELDS.has(o.name)) {
    try {
      return parseDuration(o.raw);
    } catch {
      throw new UserError(`--set ${o.name}=${o.raw}: not a time (write e.g. 40, 40s, 1.5min)`);
    }
  }
  const v = Number(o.raw);
  if (o.raw === '' || !Number.isFinite(v)) throw new UserError(`--set ${o.name}=${o.raw}: not a number`);
  return v;
}

/**
 * Load `path`; print its diagnostics to stderr; apply the overrides through the file text (so the
 * loader validates them like any written value).
 */
export function loadPlantFile(path: string, io: Io, overrides: readonly Override[] = []): LoadedPlant {
  const text = readOrFail(path, io);
  const first = loadPlant(text, path);
  const errors = first.diagnostics.filter((d) => d.severity === 'error');
  const warnings = first.diagnostics.filter((d) => d.severity !== 'error').map((d) => formatDiagnostic(d, text, path));
  if (errors.length > 0 || first.plant === undefined) {
    for (const d of first.diagnostics) io.err(`${formatDiagnostic(d, text, path)}\n`);
    throw new UserError('', UserError.USAGE);
  }
  for (const w of warnings) io.err(`${w}\n`);
  if (overrides.length === 0) return { plant: first.plant, text, warnings };

  const form = first.plant.loop.controller.form;
  const allowed = SETTABLE[form];
  for (const o of overrides) {
    if (!allowed.includes(o.name)) {
      throw new UserError(`--set ${o.name}: unknown controller field for the ${form} form (allowed: ${allowed.join(', ')})`);
    }
  }
  const doc = parseDocument(text);
  for (const o of overrides) doc.setIn(['loop', 'controller', o.name], overrideValue(o));
  const edited = String(doc);
  const second = loadPlant(edited, path);
  const bad = second.diagnostics.filter((d) => d.severity === 'error');
  if (bad.length > 0 || second.plant === undefined) {
    // The file itself loaded cleanly, so these come from the overrides: positions in the edited
    // text would mislead, so name the overrides instead.
    const sets = overrides.map((o) => `${o.name}=${o.raw}`).join(' ');
    for (const d of bad) io.err(`--set ${sets}: ${d.message}\n`);
    throw new UserError('', UserError.USAGE);
  }
  const before = new Set(first.diagnostics.map((d) => d.message));
  for (const d of second.diagnostics) {
    if (before.has(d.message)) continue;
    const w = `--set: warning: ${d.message}`;
    io.err(`${w}\n`);
    warnings.push(w);
  }
  return { plant: second.plant, text, warnings };
}
