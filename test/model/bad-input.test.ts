import { readdirSync, readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { formatDiagnostic, lineColumn, loadPlant, MAX_PLANT_TEXT, type DiagnosticCode } from '../../src/model/index.js';
import { estimateNesting } from '../../src/model/yaml-doc.js';

const dir = new URL('../fixtures/bad/', import.meta.url);
const read = (name: string): string => readFileSync(new URL(name, dir), 'utf8');

/** Each bad fixture: the first error's code and 1-based line:col (checked by reading the file). */
const CATALOGUE: Record<string, { code: DiagnosticCode; line: number; col: number; message: RegExp }> = {
  'unknown-type.yaml': { code: 'BAD_CHOICE', line: 3, col: 9, message: /model\.type is 'neural_net'; expected one of ode, transfer/ },
  'missing-field.yaml': { code: 'MISSING_FIELD', line: 2, col: 1, message: /missing field 'time_constant' in model/ },
  'wrong-type.yaml': { code: 'WRONG_TYPE', line: 4, col: 9, message: /model\.gain must be a number, not a list/ },
  'negative-time-constant.yaml': { code: 'BAD_VALUE', line: 5, col: 18, message: /model\.time_constant must be > 0, got -4 s/ },
  'improper-transfer.yaml': { code: 'IMPROPER_TRANSFER', line: 4, col: 14, message: /numerator degree 2 exceeds denominator degree 1/ },
  'unknown-name.yaml': { code: 'EXPR_UNKNOWN_NAME', line: 8, col: 23, message: /unknown name 'taus' \(did you mean 'tau'\?\)/ },
  'unbalanced-paren.yaml': { code: 'EXPR_SYNTAX', line: 8, col: 9, message: /unbalanced parenthesis/ },
  'step-exceeds-sample.yaml': { code: 'STEP_EXCEEDS_SAMPLE', line: 5, col: 9, message: /^sample time shorter than the integration step/ },
  'yaml-syntax.yaml': { code: 'YAML_SYNTAX', line: 5, col: 3, message: /Flow sequence/ },
  'alias-bomb.yaml': { code: 'ALIAS_LIMIT', line: 3, col: 12, message: /more than 100 alias expansions/ },
  'unknown-field.yaml': { code: 'UNKNOWN_FIELD', line: 8, col: 5, message: /unknown field 'tdd' in loop\.controller; expected one of structure, form, kc, ti, td/ },
  'bad-unit.yaml': { code: 'BAD_UNIT', line: 5, col: 18, message: /unknown time unit 'sec' in '10 sec'; use ms, s, min or h/ },
  'event-after-end.yaml': { code: 'EVENT_AFTER_END', line: 10, col: 15, message: /after the end of the trial \(duration 60 s\)/ },
  'ti-not-positive.yaml': { code: 'BAD_VALUE', line: 7, col: 9, message: /loop\.controller\.ti must be > 0, got 0 s/ },
  'not-a-mapping.yaml': { code: 'NOT_A_MAPPING', line: 1, col: 1, message: /must be a mapping/ },
  'unknown-function.yaml': { code: 'EXPR_UNKNOWN_FUNCTION', line: 7, col: 28, message: /unknown function 'cbrt'/ },
  'bad-output-unit.yaml': { code: 'BAD_VALUE', line: 7, col: 16, message: /model\.output_unit is 27 characters long; a unit has at most 12/ },
  'unknown-disturbance.yaml': { code: 'UNKNOWN_DISTURBANCE', line: 9, col: 36, message: /unknown disturbance 'inflow'; the model has load/ },
};

describe('bad-input catalogue (test/fixtures/bad)', () => {
  it('has an expectation for every fixture file and a file for every expectation', () => {
    expect(readdirSync(dir).filter((f) => f.endsWith('.yaml')).sort()).toEqual(Object.keys(CATALOGUE).sort());
  });

  for (const [file, want] of Object.entries(CATALOGUE)) {
    it(`${file}: ${want.code} at ${want.line}:${want.col}, no plant, no throw`, () => {
      const text = read(file);
      const r = loadPlant(text, file);
      expect(r.plant).toBeUndefined();
      const first = r.diagnostics.find((d) => d.severity === 'error');
      expect(first).toMatchObject({ code: want.code, severity: 'error' });
      expect(lineColumn(text, first!.span[0])).toEqual({ line: want.line, col: want.col });
      expect(first!.message).toMatch(want.message);
      expect(formatDiagnostic(first!, text, file)).toMatch(new RegExp(`^${file.replace('.', '\\.')}:${want.line}:${want.col}: `));
    });
  }

  it('refuses a file over 2 MiB with a diagnostic at 1:1 (generated, not committed)', () => {
    const text = `name: big\n# ${'x'.repeat(MAX_PLANT_TEXT)}\n`;
    const r = loadPlant(text, 'big.yaml');
    expect(r.plant).toBeUndefined();
    expect(r.diagnostics).toMatchObject([{ code: 'FILE_TOO_LARGE', severity: 'error', span: [0, 0] }]);
    expect(formatDiagnostic(r.diagnostics[0], text, 'big.yaml')).toMatch(/^big\.yaml:1:1: big\.yaml is \d+ characters/);
  });

  it('a file just under the limit is still read', () => {
    const head = 'name: big\n';
    const text = `${head}#${'x'.repeat(MAX_PLANT_TEXT - head.length - 2)}\n`;
    expect(text.length).toBe(MAX_PLANT_TEXT);
    expect(loadPlant(text).diagnostics[0].code).not.toBe('FILE_TOO_LARGE');
  });

  it('an alias bomb is refused before it expands (expanding it would take 10^8 nodes)', () => {
    const r = loadPlant(read('alias-bomb.yaml'));
    expect(r.plant).toBeUndefined();
    expect(r.diagnostics.some((d) => /alias/i.test(d.message))).toBe(true);
  });

  it('refuses pathological nesting before parsing (flow and block), at the deepest point', () => {
    // 500 000 open brackets (1 MB): without the pre-scan the YAML parser runs out of memory.
    const flow = `${'['.repeat(500_000)}${']'.repeat(500_000)}`;
    const r = loadPlant(flow, 'deep.yaml');
    expect(r.diagnostics).toMatchObject([{ code: 'NESTING_LIMIT', span: [127, 128] }]);
    let block = '';
    for (let i = 0; i < 1000; i++) block += `${' '.repeat(i)}a:\n`;
    const b = loadPlant(block, 'deep.yaml');
    expect(b.diagnostics).toMatchObject([{ code: 'NESTING_LIMIT' }]);
    expect(lineColumn(block, b.diagnostics[0].span[0]).line).toBe(129);
  });

  it('ordinary plant files are far from the nesting limit', () => {
    for (const f of readdirSync(new URL('../fixtures/plants/', import.meta.url))) {
      const text = readFileSync(new URL(`../fixtures/plants/${f}`, import.meta.url), 'utf8');
      expect(estimateNesting(text).depth).toBeLessThan(8);
    }
  });

  it.each([
    ['empty file', ''],
    ['only a comment', '# nothing\n'],
    ['a scalar', 'just text\n'],
    ['null root', '~\n'],
    ['tab indentation', 'name: x\nmodel:\n\ttype: ode\n'],
    ['duplicate key', 'name: a\nname: b\n'],
    ['unknown alias', 'name: *nope\n'],
    ['complex key', '? [a, b]\n: 1\n'],
    ['binary garbage', '\u0000\u0001\u0002'],
    ['deep nesting', `${'['.repeat(5000)}${']'.repeat(5000)}`],
  ])('never throws: %s', (_label, text) => {
    const r = loadPlant(text, 'x.yaml');
    expect(r.plant).toBeUndefined();
    expect(r.diagnostics.some((d) => d.severity === 'error')).toBe(true);
    for (const d of r.diagnostics) expect(() => formatDiagnostic(d, text, 'x.yaml', { caret: true })).not.toThrow();
  });
});
