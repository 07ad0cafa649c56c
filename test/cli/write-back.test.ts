/**
 * Write-back through the command line: `optimize --write` on a real file changes only the gain
 * lines (what `git diff` would show), records date and method beside them, goes through a temp
 * file + rename, and an unwritable target is a clear message with exit 2.
 */
import { copyFileSync, mkdtempSync, readdirSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { main, nodeIo } from '../../src/cli/index.js';
import type { Io } from '../../src/cli/index.js';
import { fakeIo } from './fake-io.js';

const tmp = mkdtempSync(join(tmpdir(), 'looprig-write-'));
afterAll(() => rmSync(tmp, { recursive: true, force: true }));

function quietIo(): Io & { stdout: string; stderr: string } {
  const io = { ...nodeIo(), stdout: '', stderr: '', isTTY: false };
  io.out = (t: string) => {
    io.stdout += t;
  };
  io.err = (t: string) => {
    io.stderr += t;
  };
  return io;
}

describe('optimize --write on a file on disk', () => {
  it('changes only the gain lines, each with "# looprig: DATE optimize (...)", and leaves no temp file', async () => {
    const file = join(tmp, 'surge-tank.yaml');
    copyFileSync('plants/surge-tank.yaml', file);
    const before = readFileSync(file, 'utf8');
    const io = quietIo();
    const code = await main(['optimize', file, '--write', '--evaluations', '40'], io);
    expect(io.stderr).toBe('');
    expect(code).toBe(0);
    const after = readFileSync(file, 'utf8');
    const a = before.split('\n');
    const b = after.split('\n');
    expect(b.length).toBe(a.length);
    const changed = a.map((l, i) => (l === b[i] ? -1 : i)).filter((i) => i >= 0);
    expect(changed.map((i) => a[i].trim().split(':')[0])).toEqual(['kc', 'ti']);
    for (const i of changed) expect(b[i]).toMatch(/# (unit valve per m of level error; )?looprig: \d{4}-\d{2}-\d{2} optimize \(IAE, Ms<=1\.6\)$/);
    expect(readdirSync(tmp).filter((f) => f.endsWith('.tmp'))).toEqual([]);
  });

  it('an unwritable target: "cannot write FILE: reason", exit 2, nothing printed on stdout', async () => {
    const io = fakeIo();
    io.writeText = () => {
      throw Object.assign(new Error('EACCES: permission denied'), { code: 'EACCES' });
    };
    const code = await main(['optimize', 'plants/surge-tank.yaml', '--write', '--evaluations', '20'], io);
    expect(code).toBe(2);
    expect(io.stderr).toBe('looprig: cannot write plants/surge-tank.yaml: EACCES: permission denied\n');
    expect(io.stdout).toBe('');
  });
});
