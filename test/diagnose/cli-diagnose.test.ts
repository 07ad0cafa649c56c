/** `looprig diagnose` driven in-process through main() with a fake Io. */
import { describe, it, expect } from 'vitest';
import { readFileSync } from 'node:fs';
import { dirname, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import { main } from '../../src/cli/main.js';
import type { Io } from '../../src/cli/io.js';

const root = resolve(dirname(fileURLToPath(import.meta.url)), '..', '..');

function fakeIo(files: Record<string, string> = {}): Io & { stdout: string; stderr: string } {
  const io = {
    stdout: '',
    stderr: '',
    out(t: string) {
      io.stdout += t;
    },
    err(t: string) {
      io.stderr += t;
    },
    readText(p: string) {
      if (p in files) return files[p];
      return readFileSync(resolve(root, p), 'utf8');
    },
    writeText() {
      throw new Error('diagnose writes nothing');
    },
    exists: (p: string) => p in files,
    isTTY: false,
    env: {},
    git() {
      throw new Error('diagnose runs no git');
    },
  };
  return io;
}

describe('looprig diagnose', () => {
  it('--json prints the documented document and exits 0 even with flags', async () => {
    const io = fakeIo();
    const code = await main(['diagnose', 'plants/drum-level.yaml', '--json'], io);
    expect(code).toBe(0);
    const doc = JSON.parse(io.stdout);
    expect(Object.keys(doc)).toEqual(expect.arrayContaining(['operating_point', 'linear', 'margins', 'flags']));
    expect(doc.linear.poles).toHaveLength(2);
    expect(doc.linear.zeros[0][0]).toBeCloseTo(1 / 15, 12); // numerator 0.11 (−15 s + 1)
    expect(Object.keys(doc.linear.fopdt)).toEqual(expect.arrayContaining(['gain', 'time_constant', 'delay']));
    expect(typeof doc.margins.gain_margin).toBe('number');
    for (const f of doc.flags) expect(Object.keys(f)).toEqual(['kind', 'severity', 'evidence', 'advice']);
    expect(doc.flags.map((f: { kind: string }) => f.kind)).toContain('non_minimum_phase');
  });

  it('prints a readable report', async () => {
    const io = fakeIo();
    expect(await main(['diagnose', 'plants/pipe-outlet-temperature.yaml'], io)).toBe(0);
    expect(io.stdout).toMatch(/dead_time_dominant/);
    expect(io.stdout).toMatch(/margins with the file's gains: GM/);
  });

  it("the file's units beside the output's and the actuator's values; JSON names them once", async () => {
    const io = fakeIo();
    expect(await main(['diagnose', 'plants/sticky-flow-valve.yaml'], io)).toBe(0);
    expect(io.stdout).toMatch(/operating point: output 24 m3\/h with actuator at 60 %/);
    expect(io.stdout).toMatch(/static gain: 0\.4 m3\/h per %/);
    expect(io.stdout).toMatch(/level 20 m3\/h \(from 0 s\)/);
    expect(io.stdout).toMatch(/static band 1\.5 %, dynamic 0\.7 %\).*swings about ±[\d.]+ m3\/h/);
    const json = fakeIo();
    await main(['diagnose', 'plants/sticky-flow-valve.yaml', '--json'], json);
    const doc = JSON.parse(json.stdout);
    expect(doc.units).toEqual({ output: 'm3/h', actuator: '%' });
    expect(typeof doc.operating_point.setpoint).toBe('number');
    // A file without units: the values bare, as before.
    const bare = fakeIo();
    await main(['diagnose', 'test/fixtures/plants/inverse-response.yaml'], bare);
    expect(bare.stdout).toMatch(/operating point: output [-\d.e]+ with actuator at [-\d.e]+( |\n)/);
  });

  it('a bad file exits 2 with FILE:LINE:COL messages', async () => {
    const io = fakeIo({ 'bad.yaml': 'name: broken\n' });
    expect(await main(['diagnose', 'bad.yaml'], io)).toBe(2);
    expect(io.stderr).toMatch(/^bad\.yaml:\d+:\d+: /m);
    expect(io.stdout).toBe('');
  });

  it('missing FILE is a usage error (exit 2)', async () => {
    const io = fakeIo();
    expect(await main(['diagnose'], io)).toBe(2);
    expect(io.stderr).toMatch(/missing FILE/);
  });
});
