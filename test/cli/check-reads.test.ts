/**
 * What `check` reads: each plant file is YAML-parsed once (by the loader; the plant-file test
 * needs no parse when `model:` and `loop:` start lines), and a shard reads only its own files.
 * Counted through the yaml package and the Io, not timed (test/bench/check-scale.bench.ts times it).
 */
import { describe, it, expect, vi } from 'vitest';
import { mkdirSync, mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { fakeIo } from './fake-io.js';

const parsed: string[] = [];
vi.mock('yaml', async (original) => {
  const yaml = await original<typeof import('yaml')>();
  return {
    ...yaml,
    parseDocument: (...args: Parameters<typeof yaml.parseDocument>) => {
      parsed.push(String(args[0]));
      return yaml.parseDocument(...args);
    },
  };
});

const { main } = await import('../../src/cli/index.js');

const plant = readFileSync(join(import.meta.dirname, '..', 'fixtures', 'plants', 'fopdt-heater.yaml'), 'utf8');

describe('check: reads and parses', () => {
  const dir = mkdtempSync(join(tmpdir(), 'looprig-check-reads-'));
  mkdirSync(join(dir, 'tree'));
  const files = Array.from({ length: 6 }, (_, k) => join(dir, 'tree', `p${k}.yaml`));
  files.forEach((f, k) => writeFileSync(f, plant.replace('name: Heater outlet temperature', `name: Heater ${k}`)));
  writeFileSync(join(dir, 'tree', 'p3-ci.yaml'), 'jobs: { build: { runs-on: linux } }\n');

  it('parses each plant file once (its text parsed by the loader, nothing else)', async () => {
    parsed.length = 0;
    const code = await main(['check', join(dir, 'tree'), '--json'], fakeIo());
    expect(code).toBe(1); // the heater fixture's rise time fails
    for (let k = 0; k < files.length; k++) {
      const text = plant.replace('name: Heater outlet temperature', `name: Heater ${k}`);
      expect(parsed.filter((p) => p === text), files[k]).toHaveLength(1);
    }
  });

  it('--shard 2/7 reads only its own file of the seven', async () => {
    const io = fakeIo();
    const read: string[] = [];
    const readText = io.readText;
    io.readText = (path, max) => {
      read.push(path);
      return readText(path, max);
    };
    await main(['check', join(dir, 'tree'), '--json', '--shard', '2/7'], io);
    // Sorted: p0, p1, p2, p3-ci, p3, p4, p5 (a '-' sorts before '.'): shard 2 is p1.
    expect(read).toEqual([files[1]]);
    rmSync(dir, { recursive: true, force: true });
  });
});
