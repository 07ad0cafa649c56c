/**
 * Fault-finding on the save path (fixed seed, bounded cases): random plant files with comments
 * (human ones that start with dates, old records, our marked records), CRLF or LF, a byte-order
 * mark or none, anchors and an alias; a gain is edited and saved, through the real writer for
 * some cases. Every byte outside the edited value's line must be unchanged, and the human part
 * of that line's comment must survive.
 */
import { mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import fc from 'fast-check';
import { afterAll, describe, expect, it } from 'vitest';
import { writeFileKeeping } from '../../src/cli/write-file.js';
import { controllerEdits, gainNote, loadPlant, savePlantValues } from '../../src/model/index.js';

const tmp = mkdtempSync(join(tmpdir(), 'looprig-save-fuzz-'));
afterAll(() => rmSync(tmp, { recursive: true, force: true }));

const LINES = [
  'description: &d "Tank level"',
  'name: *d',
  'model:',
  '  type: first_order',
  '  gain: 2',
  '  time_constant: &tau 10 s',
  'loop:',
  '  sample_time: &ts 0.1 s',
  '  controller:',
  '    kc: 1.5',
  '    ti: 20 s',
  '  trial: { duration: 100 s }',
];
const KC = 9;

const CHARS = [...'abcXYZ 0123456789-:;,.()#%/<=äö°€"\'&*!?[]{}'];
const humanText = fc.string({ unit: fc.constantFrom(...CHARS), maxLength: 24 });
/** A comment and the part of it a save must keep (null: it is one of our records, replaced). */
const comment = fc.oneof(
  humanText.map((t) => ({ text: t, kept: t })),
  fc.constant({ text: '2021-05-04 valve swapped, do not raise above 4', kept: '2021-05-04 valve swapped, do not raise above 4' }),
  fc.constant({ text: '2026-12-02 optimize (IAE, Ms<=1.6)', kept: null }),
  fc.constant({ text: 'unit %/K; looprig: 2026-01-01 screen', kept: 'unit %/K' }),
);

const plantCase = fc.record({
  bom: fc.boolean(),
  crlf: fc.boolean(),
  // Per line: a trailing comment or none, and a comment line before it or none.
  trailing: fc.array(fc.option(fc.tuple(fc.integer({ min: 1, max: 6 }), comment), { nil: null }), { minLength: LINES.length, maxLength: LINES.length }),
  above: fc.array(fc.option(humanText, { nil: null }), { minLength: LINES.length, maxLength: LINES.length }),
  kc: fc.double({ min: 0.001, max: 1000, noNaN: true }),
  viaWriter: fc.boolean(),
});

describe('save path, random plant files', () => {
  it('editing kc changes only its line; BOM, line ends, comments, anchors stay byte for byte', () => {
    let written = 0;
    fc.assert(
      fc.property(plantCase, (c) => {
        const eol = c.crlf ? '\r\n' : '\n';
        const lines: string[] = [];
        let kcLine = -1;
        for (let i = 0; i < LINES.length; i++) {
          const above = c.above[i];
          if (above !== null) lines.push(`${' '.repeat(i % 3)}# ${above}`);
          const t = c.trailing[i];
          if (i === KC) kcLine = lines.length;
          lines.push(t === null ? LINES[i] : `${LINES[i]}${' '.repeat(t[0])}# ${t[1].text}`);
        }
        const text = `${c.bom ? '\uFEFF' : ''}${lines.join(eol)}${eol}`;
        const before = loadPlant(text, 'f.yaml');
        expect(before.plant, before.diagnostics.map((d) => d.message).join('; ')).toBeDefined();

        let out = savePlantValues(text, controllerEdits(text, { kc: c.kc }, { digits: 6, note: gainNote('2026-12-03', 'optimize (IAE, Ms<=1.6)') }));
        if (c.viaWriter) {
          const f = join(tmp, `case${written++}.yaml`);
          writeFileKeeping(f, out);
          const bytes = readFileSync(f);
          expect(bytes.equals(Buffer.from(out, 'utf8'))).toBe(true);
          out = bytes.toString('utf8');
        }
        expect(out.startsWith('\uFEFF')).toBe(c.bom);
        if (c.crlf) expect(out.replace(/\r\n/g, '').includes('\n')).toBe(false);
        else expect(out.includes('\r')).toBe(false);
        const a = text.split(eol);
        const b = out.split(eol);
        expect(b.length).toBe(a.length);
        for (let i = 0; i < a.length; i++) if (i !== kcLine) expect(b[i], `line ${i + 1}`).toBe(a[i]);
        const newLine = b[kcLine];
        expect(newLine.startsWith('    kc: ')).toBe(true);
        expect(newLine.endsWith('# looprig: 2026-12-03 optimize (IAE, Ms<=1.6)') || newLine.endsWith('; looprig: 2026-12-03 optimize (IAE, Ms<=1.6)')).toBe(true);
        const t = c.trailing[KC];
        const kept = t === null || t[1].kept === null ? '' : t[1].kept.trim().replace(/[;\s]+$/, '');
        if (kept !== '') expect(newLine).toContain(`# ${kept}; looprig: `);
        else expect(newLine).toMatch(/ # looprig: /);
        const after = loadPlant(out, 'f.yaml');
        expect(after.plant!.loop.controller.values.kc).toBe(Number(c.kc.toPrecision(6)));
        expect(after.plant!.name).toBe('Tank level');
      }),
      { seed: 1313, numRuns: 120 },
    );
  }, 30_000);
});
