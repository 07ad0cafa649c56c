/**
 * The plant file's fields as data: one table per section giving each field's name, type, range,
 * choices, whether it is required, its default and a description. The readers in this folder
 * take field names, types, ranges and required-ness from these tables (through the helpers
 * below), and json-schema.ts turns the same tables into the editor schema, so the two cannot
 * drift apart. Checks that need more than one field (or the expression language) stay in the
 * readers' code; json-schema.ts lists them as validator-only.
 */
import type { Fields, NumberRule, Reader } from './reader.js';
import type { YNode } from '../yaml-doc.js';
import { readUnitLabel } from './unit-label.js';

/** How a field's value is written. */
export type FieldType =
  /** A plain number (no unit). */
  | { kind: 'number'; rule?: NumberRule }
  /** A time: number of seconds or text with a unit ("90 s", "1.5 min"). */
  | { kind: 'time'; rule?: NumberRule }
  /** Text; with `name`, a name the expressions use (pattern, reserved words). */
  | { kind: 'text'; name?: NameRule }
  /** An engineering unit label (unit-label.ts: short text, no control characters). */
  | { kind: 'unit' }
  | { kind: 'boolean' }
  | { kind: 'choice'; choices: readonly string[] }
  /** An expression of the plant file's expression language (text, or a bare number). */
  | { kind: 'expression' }
  /** A list of numbers; `firstNonZero`: the first entry must not be 0. */
  | { kind: 'numbers'; minItems?: number; firstNonZero?: boolean }
  /** A list of lists of numbers (rows). */
  | { kind: 'matrix' }
  /** [low, high]: numbers, times, or (uncertainty) either. */
  | { kind: 'pair'; of: 'number' | 'time' | 'number_or_time'; strict: boolean; rule?: NumberRule }
  /** A fixed-length list of times. */
  | { kind: 'times'; count: number; rule?: NumberRule }
  /** A mapping with the fields of another table. */
  | { kind: 'section'; section: SectionDef }
  /** A mapping from names the file chooses to values of one type. */
  | { kind: 'names'; value: FieldType; names?: NameRule; minEntries?: number }
  /** A list of items of one type. */
  | { kind: 'list'; items: FieldType }
  /** A mapping whose `type` field selects one of several tables (the model). */
  | { kind: 'variants'; variants: Readonly<Record<string, SectionDef>> }
  /** Any one of several forms (e.g. the word `model` or a mapping). */
  | { kind: 'either'; options: readonly FieldType[] };

/** Rules on the names of a `names` mapping. */
export interface NameRule {
  /** Names must match this. */
  pattern: RegExp;
  /** Names that are refused (reserved words). */
  reserved?: ReadonlySet<string>;
}

/** One field of a section. */
export type FieldDef = FieldType & {
  description: string;
  required?: boolean;
  /** Appended to the "missing field" message when a required field is absent. */
  hint?: string;
  /** The value used when the field is absent (documentation and schema `default`). */
  default?: unknown;
};

/** Fields present together or not at all, with `field` selecting which (controller form). */
export interface FieldCase {
  /** The choice field that selects the case, and its value when absent. */
  field: string;
  absent: string;
  /** The values of `field` this case applies to. */
  values: readonly string[];
  /** Fields this case requires. */
  required: readonly string[];
  /** Fields this case refuses. */
  forbidden: readonly string[];
}

/** One mapping of the plant file. */
export interface SectionDef {
  description: string;
  fields: Readonly<Record<string, FieldDef>>;
  /** Exactly one of these groups of fields must be present, each group in full. */
  oneOfGroups?: readonly (readonly string[])[];
  /** Field -> the fields it needs beside it. */
  requires?: Readonly<Record<string, readonly string[]>>;
  cases?: readonly FieldCase[];
}

/** The field names of a section, in table order. */
export function fieldNames(section: SectionDef): string[] {
  return Object.keys(section.fields);
}

function def(section: SectionDef, key: string): FieldDef {
  const d = Object.prototype.hasOwnProperty.call(section.fields, key) ? section.fields[key] : undefined;
  if (!d) throw new RangeError(`no field '${key}' in the table`);
  return d;
}

/**
 * The node of `key`: required fields report MISSING_FIELD (with the table's hint) when absent.
 * Returns null when absent (and not required), undefined when a required field is missing.
 */
export function fieldNode(f: Fields, section: SectionDef, key: string): YNode | null | undefined {
  const d = def(section, key);
  if (d.required) return f.require(key, d.hint ?? '');
  return f.get(key) ?? null;
}

/**
 * Read a scalar field as its table says (number, time, text, boolean or choice).
 * Absent and not required: `absent`. Missing when required, or bad: undefined (diagnosed).
 */
export function readScalarField<A>(
  r: Reader,
  f: Fields,
  section: SectionDef,
  key: string,
  absent: A,
): number | string | boolean | A | undefined {
  const d = def(section, key);
  const node = fieldNode(f, section, key);
  if (node === undefined) return undefined;
  if (node === null) return absent;
  const path = f.at(key);
  switch (d.kind) {
    case 'number':
      return r.number(node, path, d.rule ?? {});
    case 'time':
      return r.time(node, path, d.rule ?? {});
    case 'text':
      return r.string(node, path);
    case 'unit':
      return readUnitLabel(r, node, path);
    case 'boolean':
      return r.boolean(node, path);
    case 'choice':
      return r.choice(node, path, d.choices);
    default:
      throw new RangeError(`field '${key}' is a ${d.kind}, not a scalar`);
  }
}

/** `readScalarField` for number and time fields. */
export function numberField<A>(r: Reader, f: Fields, section: SectionDef, key: string, absent: A): number | A | undefined {
  const d = def(section, key);
  if (d.kind !== 'number' && d.kind !== 'time') throw new RangeError(`field '${key}' is not a number or time`);
  return readScalarField(r, f, section, key, absent) as number | A | undefined;
}

/** `readScalarField` for choice fields. */
export function choiceField<T extends string, A>(r: Reader, f: Fields, section: SectionDef, key: string, absent: A): T | A | undefined {
  if (def(section, key).kind !== 'choice') throw new RangeError(`field '${key}' is not a choice`);
  return readScalarField(r, f, section, key, absent) as T | A | undefined;
}

/** `readScalarField` for text and unit fields. */
export function textField<A>(r: Reader, f: Fields, section: SectionDef, key: string, absent: A): string | A | undefined {
  const kind = def(section, key).kind;
  if (kind !== 'text' && kind !== 'unit') throw new RangeError(`field '${key}' is not text`);
  return readScalarField(r, f, section, key, absent) as string | A | undefined;
}

/** A [low, high] field as its table says. */
export function pairField<A>(r: Reader, f: Fields, section: SectionDef, key: string, absent: A): [number, number] | A | undefined {
  const d = def(section, key);
  if (d.kind !== 'pair' || d.of === 'number_or_time') throw new RangeError(`field '${key}' is not a number or time pair`);
  const node = fieldNode(f, section, key);
  if (node === undefined) return undefined;
  if (node === null) return absent;
  return r.pair(node, f.at(key), d.of === 'time', d.strict, d.rule ?? {});
}

/** A list-of-numbers field as its table says. */
export function numbersField<A>(r: Reader, f: Fields, section: SectionDef, key: string, absent: A): number[] | A | undefined {
  if (def(section, key).kind !== 'numbers') throw new RangeError(`field '${key}' is not a list of numbers`);
  const node = fieldNode(f, section, key);
  if (node === undefined) return undefined;
  if (node === null) return absent;
  return r.numbers(node, f.at(key));
}

/** The table of a `section` field (for reading nested mappings). */
export function sectionOf(section: SectionDef, key: string): SectionDef {
  const d = def(section, key);
  if (d.kind === 'section') return d.section;
  if (d.kind === 'names' && d.value.kind === 'section') return d.value.section;
  if (d.kind === 'list' && d.items.kind === 'section') return d.items.section;
  throw new RangeError(`field '${key}' has no table of its own`);
}

/** The numeric range of a number, time, times or pair field (empty when it has none). */
export function ruleOf(section: SectionDef, key: string): NumberRule {
  const d = def(section, key);
  if (d.kind === 'number' || d.kind === 'time' || d.kind === 'times' || d.kind === 'pair') return d.rule ?? {};
  throw new RangeError(`field '${key}' has no numeric range`);
}
