/**
 * What changed in a plant file between two versions, field by field, as written (a time stays
 * "30 s", an expression stays its text), grouped by the part of the loop it belongs to. Layout
 * and comments are not changes; a list of plain values (a numerator, a range) is one field.
 */
import { parse } from 'yaml';

/** The part of the file a field belongs to, in report order. */
export type ChangeSection = 'controller' | 'model' | 'actuator' | 'sensor' | 'requirements' | 'trial' | 'uncertainty' | 'loop' | 'file';

export const SECTION_ORDER: readonly ChangeSection[] = ['controller', 'model', 'actuator', 'sensor', 'requirements', 'trial', 'uncertainty', 'loop', 'file'];

/** One changed field. `before`/`after` null: the field is absent on that side. */
export interface FieldChange {
  section: ChangeSection;
  /** Dotted path in the file, e.g. "loop.controller.kc", "loop.trial.events[1].at". */
  path: string;
  before: string | null;
  after: string | null;
}

type Leaf = string;

function isScalar(v: unknown): boolean {
  return v === null || typeof v !== 'object';
}

function show(v: unknown): string {
  if (typeof v === 'string') return v;
  if (Array.isArray(v)) return `[${v.map(show).join(', ')}]`;
  return String(v);
}

/** Every leaf of a parsed YAML value by dotted path (a list of plain values is one leaf). */
function leaves(v: unknown, path: string, out: Map<string, Leaf>): void {
  if (Array.isArray(v)) {
    if (v.every(isScalar)) {
      out.set(path, show(v));
      return;
    }
    v.forEach((x, i) => leaves(x, `${path}[${i}]`, out));
    return;
  }
  if (v !== null && typeof v === 'object') {
    const entries = Object.entries(v as Record<string, unknown>);
    if (entries.length === 0) out.set(path, '{}');
    for (const [k, x] of entries) leaves(x, path === '' ? k : `${path}.${k}`, out);
    return;
  }
  out.set(path, show(v));
}

function sectionOf(path: string): ChangeSection {
  const head = path.split(/[.[]/)[0];
  if (path.startsWith('loop.controller')) return 'controller';
  if (path.startsWith('loop.requirements')) return 'requirements';
  if (path.startsWith('loop.trial')) return 'trial';
  if (head === 'model' || head === 'actuator' || head === 'sensor' || head === 'uncertainty' || head === 'loop') return head;
  return 'file';
}

/** The fields of a plant file's text (empty for text that is not a YAML mapping). */
function fieldsOf(text: string | null): Map<string, Leaf> {
  const out = new Map<string, Leaf>();
  if (text === null) return out;
  let doc: unknown;
  try {
    doc = parse(text);
  } catch {
    return out;
  }
  if (doc !== null && typeof doc === 'object' && !Array.isArray(doc)) leaves(doc, '', out);
  return out;
}

/** The changed fields between two versions of a file (null text: the file is absent there). */
export function plantChanges(before: string | null, after: string | null): FieldChange[] {
  const a = fieldsOf(before);
  const b = fieldsOf(after);
  const out: FieldChange[] = [];
  const paths = [...new Set([...a.keys(), ...b.keys()])];
  for (const path of paths) {
    const x = a.get(path) ?? null;
    const y = b.get(path) ?? null;
    if (x !== y) out.push({ section: sectionOf(path), path, before: x, after: y });
  }
  // Report order: by section, then as the fields come in the old version (new fields after them).
  return out.sort((p, q) => SECTION_ORDER.indexOf(p.section) - SECTION_ORDER.indexOf(q.section));
}
