import { describe, expect, it } from 'vitest';
import { DIAGNOSTIC_CODES, formatDiagnostic, lineColumn, loadPlant, type Diagnostic } from '../../src/model/index.js';

const LOOP = 'loop:\n  sample_time: 1 s\n  controller: { kc: 1 }\n  trial: { duration: 10 s }\n';

function first(text: string): Diagnostic {
  const d = loadPlant(text, 'p.yaml').diagnostics.find((x) => x.severity === 'error');
  expect(d).toBeDefined();
  return d!;
}

describe('formatDiagnostic: one exact message per family', () => {
  it('schema: unknown field', () => {
    const text = `name: a\nmodel: { type: first_order, gain: 1, time_constant: 1, foo: 2 }\n${LOOP}`;
    expect(formatDiagnostic(first(text), text, 'p.yaml')).toBe(
      "p.yaml:2:56: unknown field 'foo' in model; expected one of type, gain, time_constant, delay, output_unit",
    );
  });

  it('schema: missing field points at the owning key', () => {
    const text = `name: a\nmodel: { type: first_order, gain: 1 }\n${LOOP}`;
    expect(formatDiagnostic(first(text), text, 'p.yaml')).toBe("p.yaml:2:1: missing field 'time_constant' in model");
  });

  it('value range, with the source line and a caret run under the value', () => {
    const text = `name: a\nmodel:\n  type: first_order\n  gain: 1\n  time_constant: -3 s\n${LOOP}`;
    expect(formatDiagnostic(first(text), text, 'p.yaml', { caret: true })).toBe(
      ['p.yaml:5:18: model.time_constant must be > 0, got -3 s', '  time_constant: -3 s', '                 ^^^^'].join('\n'),
    );
  });

  it('expression: the column inside a plain scalar', () => {
    const text = `name: a\nmodel:\n  type: ode\n  states: { y: { initial: 0 } }\n  input: u\n  derivatives:\n    y: u - y*kk\n  output: y\n${LOOP}`;
    expect(formatDiagnostic(first(text), text, 'p.yaml', { caret: true })).toBe(
      [
        "p.yaml:7:14: model.derivatives.y: unknown name 'kk'; known names: t, u, y",
        '    y: u - y*kk',
        '             ^^',
      ].join('\n'),
    );
  });

  it('expression: columns inside double- and single-quoted scalars skip the quote', () => {
    const dq = `name: a\nmodel:\n  type: ode\n  states: { y: { initial: 0 } }\n  input: u\n  derivatives: { y: "u + (y" }\n  output: y\n${LOOP}`;
    expect(lineColumn(dq, first(dq).span[0])).toEqual({ line: 6, col: 26 });
    const sq = `name: a\nmodel:\n  type: ode\n  states: { y: { initial: 0 } }\n  input: u\n  derivatives: { y: 'u + kk' }\n  output: y\n${LOOP}`;
    // 'kk' is at value index 4; the opening quote is column 21, so kk is column 26.
    const d = first(sq);
    expect(d.code).toBe('EXPR_UNKNOWN_NAME');
    expect(lineColumn(sq, d.span[0])).toEqual({ line: 6, col: 26 });
  });

  it('expression: a block scalar maps to the line of the token', () => {
    const text = `name: a\nmodel:\n  type: ode\n  states: { y: { initial: 0 } }\n  input: u\n  derivatives:\n    y: |\n      u - y\n        + zz\n  output: y\n${LOOP}`;
    const d = first(text);
    expect(d.code).toBe('EXPR_UNKNOWN_NAME');
    expect(lineColumn(text, d.span[0])).toEqual({ line: 9, col: 11 });
  });

  it('YAML syntax: yaml\'s own message and position', () => {
    const text = 'name: a\nmodel: [1, 2\n';
    const d = first(text);
    expect(d.code).toBe('YAML_SYNTAX');
    expect(formatDiagnostic(d, text, 'p.yaml')).toMatch(/^p\.yaml:\d+:\d+: \S/);
    expect(d.message).not.toMatch(/at line \d+, column \d+/);
  });

  it('YAML pitfalls in expressions get a hint: unquoted ?: and a leading !', () => {
    const ode = (e: string) =>
      `name: a\nmodel:\n  type: ode\n  states: { y: { initial: 0 } }\n  input: u\n  derivatives:\n    y: ${e}\n  output: y\n${LOOP}`;
    const cond = ode('y > 0 ? 1 : 0');
    expect(first(cond)).toMatchObject({ code: 'YAML_SYNTAX' });
    expect(first(cond).message).toMatch(/must be in quotes/);
    const bang = ode('!y');
    expect(first(bang)).toMatchObject({ code: 'EXPR_SYNTAX' });
    expect(first(bang).message).toMatch(/YAML read '!y' as a tag; put an expression starting with '!' in quotes/);
    expect(loadPlant(ode('"y > 0 ? 1 : 0"')).plant).toBeDefined();
    expect(loadPlant(ode('"!(y > 0)"')).plant).toBeDefined();
  });

  it('warnings say so', () => {
    const text = `name: a\nmodel: { type: first_order, gain: 1, time_constant: 1 }\nloop:\n  sample_time: 1\n  controller: { structure: p, kc: 1, ti: 5 }\n  trial: { duration: 10 }\n`;
    const r = loadPlant(text, 'p.yaml');
    expect(r.plant).toBeDefined();
    expect(formatDiagnostic(r.diagnostics[0], text, 'p.yaml')).toBe(
      "p.yaml:5:42: warning: loop.controller.ti is ignored: structure 'p' has no integral action",
    );
  });

  it('keeps tabs in the caret lead so the caret lines up', () => {
    const text = '\tname: x';
    const d: Diagnostic = { code: 'BAD_VALUE', severity: 'error', message: 'm', span: [7, 8] };
    expect(formatDiagnostic(d, text, 'f', { caret: true })).toBe('f:1:8: m\n\tname: x\n\t      ^');
  });

  it('every code has a description', () => {
    for (const [code, text] of Object.entries(DIAGNOSTIC_CODES)) {
      expect(code).toMatch(/^[A-Z][A-Z_]+$/);
      expect(text.length).toBeGreaterThan(10);
    }
  });
});
