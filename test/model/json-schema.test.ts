/**
 * The editor JSON Schema and the loader agree: the schema is generated from the loader's tables,
 * the committed copy is up to date, every valid plant passes both, every bad-input fixture is
 * refused by both (or is listed as validator-only with its reason), and systematic mutations of
 * the bundled plants (a required field removed, an unknown field added, a wrong type, a bad
 * choice) are refused by both.
 */
import { Ajv } from 'ajv';
import fc from 'fast-check';
import { readdirSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { stringify } from 'yaml';
import {
  durationPattern,
  loadPlant,
  PLANT_SCHEMA,
  plantJsonSchema,
  tryParseDuration,
  VALIDATOR_ONLY,
  yamlJsonView,
  type FieldType,
  type SectionDef,
} from '../../src/model/index.js';

const root = new URL('../../', import.meta.url).pathname;
const yamlFiles = (dir: string): string[] =>
  readdirSync(join(root, dir))
    .filter((f) => /\.ya?ml$/.test(f))
    .sort()
    .map((f) => join(dir, f));

// strictTuples off: `denominator` constrains its first entry with a one-item tuple and leaves the
// rest open (draft-07 has no other way to say "first entry"); strictRequired off: the one-of
// groups list required fields without repeating their definitions.
const ajv = new Ajv({ strict: true, strictTuples: false, strictRequired: false, allErrors: true });
const validate = ajv.compile(plantJsonSchema());

function schemaAccepts(text: string): boolean {
  const data = yamlJsonView(text);
  return data !== undefined && validate(data) === true;
}

function loaderAccepts(text: string): boolean {
  return loadPlant(text).plant !== undefined;
}

describe('the committed schema file', () => {
  it('plants/plant.schema.json is exactly the generated schema (regenerate: looprig schema > plants/plant.schema.json)', () => {
    const committed = readFileSync(join(root, 'plants/plant.schema.json'), 'utf8');
    expect(committed).toBe(`${JSON.stringify(plantJsonSchema(), null, 2)}\n`);
  });

  it('every bundled plant names it in a yaml-language-server modeline on its first line', () => {
    for (const f of yamlFiles('plants')) {
      expect(readFileSync(join(root, f), 'utf8').split('\n')[0], f).toBe('# yaml-language-server: $schema=./plant.schema.json');
    }
  });

  it('descriptions on every field: the schema is documentation too', () => {
    const missing: string[] = [];
    const walk = (s: SectionDef, path: string): void => {
      for (const [k, d] of Object.entries(s.fields)) {
        if (!d.description || d.description.length < 5) missing.push(`${path}${k}`);
        const inner = (t: FieldType): void => {
          if (t.kind === 'section') walk(t.section, `${path}${k}.`);
          if (t.kind === 'names' || t.kind === 'list') inner(t.kind === 'names' ? t.value : t.items);
          if (t.kind === 'variants') for (const [n, v] of Object.entries(t.variants)) walk(v, `${path}${k}(${n}).`);
          if (t.kind === 'either') t.options.forEach(inner);
        };
        inner(d);
      }
    };
    walk(PLANT_SCHEMA, '');
    expect(missing).toEqual([]);
  });
});

describe('schema and loader accept the same valid files', () => {
  for (const f of [...yamlFiles('plants'), ...yamlFiles('test/fixtures/plants'), ...yamlFiles('test/fixtures/check')]) {
    it(`${f}: both accept`, () => {
      const text = readFileSync(join(root, f), 'utf8');
      expect(loaderAccepts(text)).toBe(true);
      const ok = schemaAccepts(text);
      expect(ok, JSON.stringify(validate.errors?.slice(0, 3))).toBe(true);
    });
  }
});

/**
 * Every bad-input fixture: refused by the schema ('schema'), or out of the schema's reach (the
 * VALIDATOR_ONLY key that gives the reason). The loader refuses every one.
 */
const BAD_CASES: Readonly<Record<string, 'schema' | keyof typeof VALIDATOR_ONLY>> = {
  'alias-bomb.yaml': 'yaml',
  'bad-unit.yaml': 'schema',
  'event-after-end.yaml': 'order_relations',
  'improper-transfer.yaml': 'model_shape',
  'missing-field.yaml': 'schema',
  'bad-output-unit.yaml': 'schema',
  'negative-time-constant.yaml': 'schema',
  'not-a-mapping.yaml': 'schema',
  'step-exceeds-sample.yaml': 'order_relations',
  'ti-not-positive.yaml': 'schema',
  'unbalanced-paren.yaml': 'expressions',
  'unknown-disturbance.yaml': 'cross_references',
  'unknown-field.yaml': 'schema',
  'unknown-function.yaml': 'expressions',
  'unknown-name.yaml': 'expressions',
  'unknown-type.yaml': 'schema',
  'wrong-type.yaml': 'schema',
  'yaml-syntax.yaml': 'yaml',
};

describe('bad input: both refuse, or the case is listed as validator-only with its reason', () => {
  const files = readdirSync(join(root, 'test/fixtures/bad')).filter((f) => f.endsWith('.yaml')).sort();

  it('the table covers every fixture', () => {
    expect(Object.keys(BAD_CASES).sort()).toEqual(files);
  });

  for (const f of files) {
    const kind = BAD_CASES[f];
    it(`${f}: loader refuses; ${kind === 'schema' ? 'schema refuses' : `validator-only (${kind})`}`, () => {
      const text = readFileSync(join(root, 'test/fixtures/bad', f), 'utf8');
      expect(loaderAccepts(text)).toBe(false);
      if (kind === 'schema') {
        expect(schemaAccepts(text)).toBe(false);
      } else {
        expect(VALIDATOR_ONLY[kind]).toMatch(/\w/);
        // Out of the schema's reach: it has no data to check (YAML layer) or lets the file through.
        if (kind === 'yaml') expect(yamlJsonView(text)).toBeUndefined();
        else expect(schemaAccepts(text)).toBe(true);
      }
    });
  }
});

// ---------------------------------------------------------------- mutations

type Data = Record<string, unknown>;

/** Mutations of one file's data: path + mutate function, each expected to make the file invalid. */
function mutations(data: Data): { what: string; apply: (d: Data) => void }[] {
  const out: { what: string; apply: (d: Data) => void }[] = [];
  const at = (d: Data, path: (string | number)[]): Data => path.reduce<any>((o, k) => o[k], d);
  const visit = (value: unknown, section: SectionDef, path: (string | number)[]): void => {
    if (value === null || typeof value !== 'object' || Array.isArray(value)) return;
    const obj = value as Data;
    out.push({ what: `${path.join('.')}: unknown field`, apply: (d) => (at(d, path).no_such_field = 1) });
    for (const [k, def] of Object.entries(section.fields)) {
      const here = [...path, k];
      if (!(k in obj)) continue;
      if (def.required) out.push({ what: `${here.join('.')}: removed`, apply: (d) => delete at(d, path)[k] });
      visitField(obj[k], def, here);
    }
  };
  const visitField = (value: unknown, t: FieldType, path: (string | number)[]): void => {
    const set = (v: unknown) => (d: Data) => {
      at(d, path.slice(0, -1))[path[path.length - 1]] = v;
    };
    switch (t.kind) {
      case 'number':
      case 'time':
        out.push({ what: `${path.join('.')}: a list`, apply: set([1, 2]) });
        out.push({ what: `${path.join('.')}: a mapping`, apply: set({ a: 1 }) });
        break;
      case 'choice':
        if (t.choices.length > 1 || path[path.length - 1] !== 'type') out.push({ what: `${path.join('.')}: unknown choice`, apply: set('no_such_choice') });
        break;
      case 'text':
        out.push({ what: `${path.join('.')}: a number`, apply: set(12) });
        break;
      case 'unit':
        out.push({ what: `${path.join('.')}: a number`, apply: set(12) });
        out.push({ what: `${path.join('.')}: empty`, apply: set(' ') });
        out.push({ what: `${path.join('.')}: too long`, apply: set('metres of water column') });
        out.push({ what: `${path.join('.')}: a control character`, apply: set('m\u001b[2J') });
        break;
      case 'numbers':
        out.push({ what: `${path.join('.')}: text entry`, apply: set(['x']) });
        break;
      case 'section':
        out.push({ what: `${path.join('.')}: a list`, apply: set([1]) });
        visit(value, t.section, path);
        break;
      case 'names':
        if (value && typeof value === 'object') {
          for (const k of Object.keys(value as Data)) {
            if (t.value.kind === 'section') visit((value as Data)[k], t.value.section, [...path, k]);
            if (t.value.kind === 'number') out.push({ what: `${path.join('.')}.${k}: a list`, apply: set({ ...(value as Data), [k]: [1] }) });
          }
        }
        break;
      case 'list':
        if (Array.isArray(value) && t.items.kind === 'section') {
          const items = t.items;
          value.forEach((v, i) => visit(v, items.section, [...path, i]));
        }
        break;
      case 'variants': {
        const type = (value as Data | null)?.type;
        if (typeof type === 'string' && t.variants[type]) {
          out.push({ what: `${path.join('.')}.type: unknown kind`, apply: (d) => (at(d, path).type = 'no_such_kind') });
          visit(value, t.variants[type], path);
        }
        break;
      }
      default:
        break;
    }
  };
  visit(data, PLANT_SCHEMA, []);
  return out;
}

describe('mutations of the bundled plants: schema and loader both refuse', () => {
  for (const f of yamlFiles('plants')) {
    it(`${f}`, () => {
      const text = readFileSync(join(root, f), 'utf8');
      const base = yamlJsonView(text) as Data;
      const list = mutations(base);
      expect(list.length).toBeGreaterThan(30);
      const disagree: string[] = [];
      for (const m of list) {
        const d = structuredClone(base);
        m.apply(d);
        const mutated = stringify(d);
        const loader = loaderAccepts(mutated);
        const schema = schemaAccepts(mutated);
        if (loader || schema) disagree.push(`${m.what}: loader ${loader ? 'accepts' : 'refuses'}, schema ${schema ? 'accepts' : 'refuses'}`);
      }
      expect(disagree).toEqual([]);
    });
  }
});

describe('time texts: the schema pattern and the loader read the same times', () => {
  const text = fc.oneof(
    fc.tuple(
      fc.constantFrom('', '+', '-', ' '),
      fc.constantFrom('0', '1', '2.5', '.5', '00', '0.0', '10', '1e3', '0e1', '5.', 'inf', 'x'),
      fc.constantFrom('', ' ', '  '),
      fc.constantFrom('', 's', 'ms', 'min', 'h', 'sec', 'm', 'S'),
    ).map(([a, b, c, d]) => `${a}${b}${c}${d}`),
    fc.string({ maxLength: 8 }),
  );

  it('pattern (>= 0) accepts exactly the texts the loader reads as a time >= 0 (except -0)', () => {
    const re = new RegExp(durationPattern({ sign: 'non_negative', infinity: true }));
    fc.assert(
      fc.property(text, (t) => {
        const r = tryParseDuration(t);
        const loaderOk = r.ok && r.value >= 0 && !/^\s*-/.test(t);
        expect(re.test(t)).toBe(loaderOk);
      }),
      { numRuns: 2000, seed: 11 },
    );
  });

  it('pattern (> 0, no infinity) accepts exactly the finite times > 0', () => {
    const re = new RegExp(durationPattern({ sign: 'positive' }));
    fc.assert(
      fc.property(text, (t) => {
        const r = tryParseDuration(t);
        expect(re.test(t)).toBe(r.ok && r.value > 0 && Number.isFinite(r.value) && !/^\s*-/.test(t));
      }),
      { numRuns: 2000, seed: 12 },
    );
  });
});
