/**
 * The plant file's JSON Schema (draft-07), generated from the same tables the loader reads with
 * (fields.ts and the section files), for editors: completion, hover text and red squiggles via
 * the yaml-language-server modeline `# yaml-language-server: $schema=<path>`.
 *
 * The schema sees the file as JSON data (`yamlJsonView`): YAML's .inf / -.inf / .nan appear as
 * the text '.inf' / '-.inf' / '.nan'. What it checks: structure, field names (unknown fields are
 * refused), types, choices, required fields, numeric ranges, time texts (units and sign by
 * pattern), names of declared variables, one-of groups (second_order's two forms, one kind per
 * trial event) and the controller's form families. What only the loader checks is listed in
 * VALIDATOR_ONLY.
 */
import { durationPattern } from '../units.js';
import type { FieldDef, FieldType, NameRule, SectionDef } from './fields.js';
import type { NumberRule } from './reader.js';
import { PLANT_SCHEMA } from './plant.js';
import { MAX_UNIT_LENGTH, UNIT_PATTERN } from './unit-label.js';

/** JSON Schema as plain data. */
export type JsonSchema = { [key: string]: unknown };

/** Checks the loader makes that the JSON Schema does not express, with the reason. */
export const VALIDATOR_ONLY: Readonly<Record<string, string>> = {
  yaml: 'YAML syntax, alias budget and nesting depth are properties of the text, checked before there is any data to validate',
  expressions: 'expression syntax, known function and variable names, and argument counts need the expression grammar',
  cross_references:
    'names that refer to other sections (derivatives of declared states, trial disturbances, uncertainty names, cascade measurements, feedforward disturbances, duplicate names across params/states/input/disturbances, unique compare names) need the model read first',
  order_relations:
    'relations between two values (low < high in pairs, actuator min < max, step <= sample_time, events within the duration, increasing schedule rows) compare two numbers of the data',
  model_shape: 'matrix dimensions of state_space and the degree of a transfer function relate the lengths of several lists',
  form_conversion: 'parallel gains with mixed signs (no ideal form) and a gains event using the other form family depend on the values and on the controller block',
  time_ranges: 'upper bounds on times written with a unit, and -0 written as a time, are not expressed by the time pattern',
};

const NUMBER_INFINITY = '.inf';
const NUMBER_NEG_INFINITY = '-.inf';

function numberSchema(rule: NumberRule = {}): JsonSchema {
  const n: JsonSchema = { type: rule.integer ? 'integer' : 'number' };
  if (rule.gt !== undefined) n.exclusiveMinimum = rule.gt;
  if (rule.ge !== undefined) n.minimum = rule.ge;
  if (rule.lt !== undefined) n.exclusiveMaximum = rule.lt;
  if (rule.le !== undefined) n.maximum = rule.le;
  const inf: string[] = [];
  if (rule.allowInfinity) inf.push(NUMBER_INFINITY);
  if (rule.allowNegativeInfinity) inf.push(NUMBER_NEG_INFINITY);
  return inf.length === 0 ? n : { anyOf: [n, { enum: inf }] };
}

function timeText(rule: NumberRule = {}): JsonSchema {
  const lower = rule.gt !== undefined ? rule.gt : rule.ge;
  const sign = lower === undefined || lower < 0 ? 'any' : rule.gt !== undefined && rule.gt >= 0 ? 'positive' : 'non_negative';
  return {
    type: 'string',
    pattern: durationPattern({ sign, infinity: rule.allowInfinity === true, negativeInfinity: rule.allowNegativeInfinity === true }),
  };
}

function timeSchema(rule: NumberRule = {}): JsonSchema {
  return { anyOf: [numberSchema(rule), timeText(rule)] };
}

function nameSchema(rule: NameRule): JsonSchema {
  const s: JsonSchema = { pattern: rule.pattern.source };
  if (rule.reserved && rule.reserved.size > 0) s.not = { enum: [...rule.reserved].sort() };
  return s;
}

function typeSchema(t: FieldType): JsonSchema {
  switch (t.kind) {
    case 'number':
      return numberSchema(t.rule);
    case 'time':
      return timeSchema(t.rule);
    case 'text':
      return t.name ? { type: 'string', ...nameSchema(t.name) } : { type: 'string' };
    case 'unit':
      return { type: 'string', minLength: 1, maxLength: MAX_UNIT_LENGTH, pattern: UNIT_PATTERN };
    case 'boolean':
      return { type: 'boolean' };
    case 'choice':
      return { enum: [...t.choices] };
    case 'expression':
      // A number, or text that is not one of the JSON view's stand-ins for non-finite numbers.
      return { anyOf: [{ type: 'number' }, { type: 'string', not: { enum: [NUMBER_INFINITY, NUMBER_NEG_INFINITY, '.nan'] } }] };
    case 'numbers': {
      const s: JsonSchema = { type: 'array', items: { type: 'number' } };
      if (t.minItems !== undefined) s.minItems = t.minItems;
      if (t.firstNonZero) {
        s.items = [{ type: 'number', not: { const: 0 } }];
        s.additionalItems = { type: 'number' };
      }
      return s;
    }
    case 'matrix':
      return { type: 'array', items: { type: 'array', items: { type: 'number' } } };
    case 'pair': {
      const item =
        t.of === 'number'
          ? numberSchema(t.rule)
          : t.of === 'time'
            ? timeSchema(t.rule)
            : { anyOf: [numberSchema(t.rule), timeText({ ge: 0, ...t.rule })] };
      return { type: 'array', minItems: 2, maxItems: 2, items: item };
    }
    case 'times':
      return { type: 'array', minItems: t.count, maxItems: t.count, items: timeSchema(t.rule) };
    case 'section':
      return sectionSchema(t.section);
    case 'names': {
      const s: JsonSchema = { type: 'object', additionalProperties: typeSchema(t.value) };
      if (t.names) s.propertyNames = nameSchema(t.names);
      if (t.minEntries !== undefined) s.minProperties = t.minEntries;
      return s;
    }
    case 'list':
      return { type: 'array', items: typeSchema(t.items) };
    case 'variants': {
      const kinds = Object.keys(t.variants);
      return {
        type: 'object',
        required: ['type'],
        properties: { type: { enum: kinds, description: `Model kind: ${kinds.join(', ')}.` } },
        allOf: kinds.map((k) => ({
          if: { properties: { type: { const: k } }, required: ['type'] },
          then: sectionSchema(t.variants[k]),
        })),
      };
    }
    case 'either':
      return { anyOf: t.options.map(typeSchema) };
  }
}

function fieldSchema(d: FieldDef): JsonSchema {
  const s = typeSchema(d);
  const out: JsonSchema = { description: d.description, ...s };
  if (d.default !== undefined) out.default = d.default;
  return out;
}

function sectionSchema(section: SectionDef): JsonSchema {
  const properties: Record<string, JsonSchema> = {};
  const required: string[] = [];
  for (const [k, d] of Object.entries(section.fields)) {
    properties[k] = fieldSchema(d);
    if (d.required) required.push(k);
  }
  const s: JsonSchema = { type: 'object', description: section.description, properties, additionalProperties: false };
  if (required.length > 0) s.required = required;
  const allOf: JsonSchema[] = [];
  if (section.oneOfGroups) s.oneOf = section.oneOfGroups.map((g) => ({ required: [...g] }));
  if (section.requires) s.dependencies = Object.fromEntries(Object.entries(section.requires).map(([k, v]) => [k, [...v]]));
  for (const c of section.cases ?? []) {
    // When the selecting field is absent its default applies: only the default's case matches then.
    const cond: JsonSchema = { properties: { [c.field]: { enum: [...c.values] } } };
    if (!c.values.includes(c.absent)) cond.required = [c.field];
    const then: JsonSchema = {};
    if (c.required.length > 0) then.required = [...c.required];
    if (c.forbidden.length > 0) then.not = { anyOf: c.forbidden.map((k) => ({ required: [k] })) };
    allOf.push({ if: cond, then });
  }
  if (allOf.length > 0) s.allOf = allOf;
  return s;
}

/** The JSON Schema of a plant file. */
export function plantJsonSchema(): JsonSchema {
  return {
    $schema: 'http://json-schema.org/draft-07/schema#',
    title: 'looprig plant file',
    ...sectionSchema(PLANT_SCHEMA),
  };
}
