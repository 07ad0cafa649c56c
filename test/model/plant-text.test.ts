/**
 * The plant file as text: UTF-8 checked byte by byte (first bad byte's line and column), a
 * byte-order mark kept for the save but not counted as a column, CRLF kept by our edits (yaml's
 * own toString would turn it into LF), the multi-document message in our words, and control
 * characters never printed raw.
 */
import { describe, expect, it } from 'vitest';
import { parseDocument } from 'yaml';
import { controllerEdits, findEncodingProblem, formatDiagnostic, loadPlant, savePlantValues } from '../../src/model/index.js';

const enc = (s: string): Uint8Array => new TextEncoder().encode(s);
const PLANT = [
  'name: x',
  'model: { type: first_order, gain: 1, time_constant: 10 s }',
  'loop:',
  '  sample_time: 1 s',
  '  controller:',
  '    kc: 2            # %/K',
  '    ti: 30 s',
  '  trial: { duration: 100 s }',
  '',
].join('\n');

describe('findEncodingProblem', () => {
  it('UTF-8 with and without a byte-order mark is fine; the first bad byte is located', () => {
    expect(findEncodingProblem(enc('name: Behälter\n'))).toBeNull();
    expect(findEncodingProblem(new Uint8Array([0xef, 0xbb, 0xbf, ...enc('a: 1\n')]))).toBeNull();
    // Line 2, after "b: ä" (4 characters, 5 bytes): column 5.
    const latin1 = new Uint8Array([...enc('a: 1\nb: ä'), 0xe4, 0x0a]);
    expect(findEncodingProblem(latin1)).toEqual({ offset: 10, line: 2, column: 5, message: 'invalid UTF-8 (byte 0xE4); save the file as UTF-8' });
  });

  it('overlong forms, surrogates, truncated sequences and code points past U+10FFFF are refused (RFC 3629, section 3)', () => {
    for (const bad of [[0xc0, 0xaf], [0xe0, 0x80, 0xaf], [0xed, 0xa0, 0x80], [0xf4, 0x90, 0x80, 0x80], [0xe2, 0x82], [0x80], [0xff]]) {
      expect(findEncodingProblem(new Uint8Array([0x61, ...bad])), bad.join(' ')).toMatchObject({ offset: 1, line: 1, column: 2 });
    }
  });
});

describe('plant text', () => {
  it('a byte-order mark is not a column in diagnostics (was: every column of line 1 one too far)', () => {
    const t = '\uFEFFnamex: 1\n';
    const r = loadPlant(t, 'b.yaml');
    expect(formatDiagnostic(r.diagnostics[0], t, 'b.yaml', { caret: true })).toBe(
      "b.yaml:1:1: unknown field 'namex' in the top level; expected one of name, description, model, actuator, sensor, uncertainty, loop, compare\nnamex: 1\n^^^^^",
    );
  });

  it('an edit keeps the byte-order mark and the CRLF line ends; yaml toString would drop CRLF', () => {
    const crlf = `\uFEFF${PLANT.replace(/\n/g, '\r\n')}`;
    expect(String(parseDocument(crlf)).includes('\r\n')).toBe(false);
    const out = savePlantValues(crlf, controllerEdits(crlf, { kc: 5, td: 1 }, { note: '2026-01-05 screen' }));
    expect(out.startsWith('\uFEFFname: x\r\n')).toBe(true);
    expect(out.replace(/\r\n/g, '').includes('\n')).toBe(false);
    expect(out).toContain('    kc: 5            # %/K; looprig: 2026-01-05 screen\r\n');
    expect(out).toContain('    td: 1  # looprig: 2026-01-05 screen\r\n');
    expect(loadPlant(out).plant!.loop.controller.values).toMatchObject({ kc: 5, td: 1 });
  });

  it('a second YAML document: our message, not the library hint (was: "please use YAML.parseAllDocuments()")', () => {
    const t = `${PLANT}---\nname: y\n`;
    const d = loadPlant(t, 'm.yaml').diagnostics;
    expect(d).toHaveLength(1);
    expect(formatDiagnostic(d[0], t, 'm.yaml')).toBe(
      "m.yaml:9:1: a plant file holds one YAML document; a second one starts here (remove the '---' line and what follows, or split the file)",
    );
  });

  it('control characters from the file are shown escaped in messages (was: a raw NUL echoed)', () => {
    const t = 'na\u0000me: x\nmo\u001b[2Jdel: 1\n';
    const lines = loadPlant(t, 'n.yaml').diagnostics.map((d) => formatDiagnostic(d, t, 'n.yaml'));
    expect(lines[0]).toBe("n.yaml:1:1: unknown field 'na\\x00me' in the top level; expected one of name, description, model, actuator, sensor, uncertainty, loop, compare");
    expect(lines.join('\n')).toContain("'mo\\x1B[2Jdel'");
    expect(lines.join('\n')).not.toMatch(/[\u0000\u001b]/);
  });
});
