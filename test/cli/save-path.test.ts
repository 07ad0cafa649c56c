/**
 * The save path through the command line, on real files: `optimize --write` through a symbolic
 * link into a BOM + CRLF file with a dated human comment; plant files that are not UTF-8 refused
 * with FILE:LINE:COL and exit 2 (run, check, the screen); `fit --out` never takes a file it
 * cannot read for an absent one.
 */
import { lstatSync, mkdirSync, mkdtempSync, readFileSync, readlinkSync, rmSync, symlinkSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { main, nodeIo } from '../../src/cli/index.js';
import type { Io } from '../../src/cli/index.js';
import { runScreen } from '../../src/tui/run-screen.js';
import { bumpTest, STEP_RESPONSES } from '../ident/synthetic.js';
import { fakeIo } from './fake-io.js';

const tmp = mkdtempSync(join(tmpdir(), 'looprig-save-path-'));
afterAll(() => rmSync(tmp, { recursive: true, force: true }));

function diskIo(): Io & { stdout: string; stderr: string } {
  const io = { ...nodeIo(), stdout: '', stderr: '', isTTY: false };
  io.out = (t: string) => {
    io.stdout += t;
  };
  io.err = (t: string) => {
    io.stderr += t;
  };
  return io;
}

const PLANT = readFileSync('plants/surge-tank.yaml', 'utf8');
const HUMAN = '# 2021-05-04 valve swapped, do not raise above 4';

describe('optimize --write through a link into a BOM + CRLF file', () => {
  it('writes the target, keeps the link, the BOM, CRLF and the dated human comment', async () => {
    mkdirSync(join(tmp, 'real'));
    const target = join(tmp, 'real', 'target.yaml');
    const link = join(tmp, 'link.yaml');
    const original = `\uFEFF${PLANT.replace(/^( {4}kc: \S+).*$/m, `$1   ${HUMAN}`).replace(/\n/g, '\r\n')}`;
    expect(original).toContain(`kc: 3   ${HUMAN}`);
    writeFileSync(target, original);
    symlinkSync('real/target.yaml', link);
    const io = diskIo();
    const code = await main(['optimize', link, '--write', '--evaluations', '30'], io);
    expect(io.stderr).toBe(`looprig: note: written through the link ${link} to ${target}\n`);
    expect(code).toBe(0);
    expect(io.stdout).toContain(`wrote ${target}`);
    expect(lstatSync(link).isSymbolicLink()).toBe(true);
    expect(readlinkSync(link)).toBe('real/target.yaml');
    const bytes = readFileSync(target);
    expect([...bytes.subarray(0, 3)]).toEqual([0xef, 0xbb, 0xbf]);
    const after = bytes.toString('utf8');
    expect(after.replace(/\r\n/g, '').includes('\n')).toBe(false);
    const a = original.split('\r\n');
    const b = after.split('\r\n');
    expect(b.length).toBe(a.length);
    const changed = a.map((l, i) => (l === b[i] ? -1 : i)).filter((i) => i >= 0);
    expect(changed.map((i) => a[i].trim().split(':')[0])).toEqual(['kc', 'ti']);
    // Was: "kc: 15.67 # 2026-12-03 optimize (...)", the human comment deleted as if it were ours.
    expect(b[changed[0]]).toMatch(/^ {4}kc: [\d.]+ +# 2021-05-04 valve swapped, do not raise above 4; looprig: \d{4}-\d{2}-\d{2} optimize \(IAE, Ms<=1\.6\)$/);
  });
});

describe('plant files that are not UTF-8', () => {
  const latin1 = Buffer.from(PLANT.replace('# Surge tank', '# Surge tank (Behälter)'), 'latin1');
  const file = join(tmp, 'latin1.yaml');
  writeFileSync(file, latin1);
  // Line 2 starts "# Surge tank (Beh", 17 characters: the bad byte is column 18.
  const message = `${file}:2:18: invalid UTF-8 (byte 0xE4); save the file as UTF-8\n`;

  it('run: FILE:LINE:COL of the first bad byte, exit 2 (was: loaded, exit 0, and a save wrote U+FFFD)', async () => {
    const io = diskIo();
    expect(await main(['run', file], io)).toBe(2);
    expect(io.stderr).toBe(message);
    expect(io.stdout).toBe('');
  });

  it('check: the same message, the file counted invalid', async () => {
    const io = diskIo();
    expect(await main(['check', file], io)).toBe(2);
    expect(io.stderr).toContain(message);
  });

  it('the screen: the same message before the terminal is taken', async () => {
    let err = '';
    const io = nodeIo();
    const code = await runScreen(file, {
      io: { readText: (p) => io.readText(p), writeText: () => undefined },
      stderr: { write: (s: string) => ((err += s), true) } as unknown as NodeJS.WriteStream,
    });
    expect(code).toBe(2);
    expect(err).toBe(message);
  });

  it('a UTF-16 file is named as such', async () => {
    const f = join(tmp, 'utf16.yaml');
    writeFileSync(f, Buffer.concat([Buffer.from([0xff, 0xfe]), Buffer.from(PLANT, 'utf16le')]));
    const io = diskIo();
    expect(await main(['run', f], io)).toBe(2);
    expect(io.stderr).toBe(`${f}:1:1: the file is UTF-16 (byte-order mark FF FE, little-endian); save it as UTF-8\n`);
  });
});

describe('fit --out and files it cannot read', () => {
  const log = bumpTest(STEP_RESPONSES.firstOrder(2, 10, 3), { n: 300, dt: 0.1, tStep: 5, u0: 40, du: 5, y0: 1, noise: 0.02, seed: 5 }).csv;

  it('an existing --out that cannot be read is not taken for absent (was: overwritten without --force)', async () => {
    const io = fakeIo({ 'bump.csv': log });
    io.readText = (p) => {
      if (p === 'locked.yaml') throw Object.assign(new Error('EACCES: permission denied'), { code: 'EACCES' });
      return io.files.get(p) ?? readFileSync(p, 'utf8');
    };
    io.exists = (p) => p === 'locked.yaml' || io.files.has(p);
    expect(await main(['fit', 'bump.csv', '--out', 'locked.yaml', '--model', 'first_order'], io)).toBe(2);
    expect(io.stderr).toContain('fit: locked.yaml exists; add --force to replace it');
    expect(io.files.has('locked.yaml')).toBe(false);
  });

  it('a dangling link as --out exists too', async () => {
    const out = join(tmp, 'fitted.yaml');
    symlinkSync('nowhere/fitted.yaml', out);
    const io = diskIo();
    io.readText = (p) => (p === 'bump.csv' ? log : nodeIo().readText(p));
    expect(await main(['fit', 'bump.csv', '--out', out, '--model', 'first_order'], io)).toBe(2);
    expect(io.stderr).toContain(`fit: ${out} exists; add --force to replace it`);
  });

  it('a Latin-1 log: FILE:LINE:COL, exit 2', async () => {
    const f = join(tmp, 'latin1.csv');
    writeFileSync(f, Buffer.from(`time,valve,level\n0,1,2\n1,1,3 \u00b0C\n`, 'latin1'));
    const io = diskIo();
    expect(await main(['fit', f], io)).toBe(2);
    expect(io.stderr).toBe(`${f}:3:7: invalid UTF-8 (byte 0xB0); save the file as UTF-8\n`);
  });
});
