/**
 * Spawn tests of the installed bin (package.json's bin: the code-split bundle src/bundle.mjs
 * makes from the tsc output), built by test/helpers/build-bin.ts into a folder laid out like the
 * installed package: the test checks the real build output - shebang, chunk resolution, yaml
 * inside the bundle, the plants folder found from import.meta.url, the sweep worker's entry.
 */
import { describe, it, expect, beforeAll } from 'vitest';
import { spawnSync } from 'node:child_process';
import { mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { pathToFileURL } from 'node:url';
import { main } from '../../src/cli/index.js';
import { buildBin, REPO_ROOT as root } from '../helpers/build-bin.js';
import { fakeIo } from './fake-io.js';

let pkg = '';
let bin = '';

beforeAll(() => {
  ({ pkg, bin } = buildBin('looprig-bin-test'));
}, 120_000);

/**
 * Each spawn starts a Node process that loads the whole compiled CLI, and the suggest run below
 * sweeps 16 uncertain cases per rule (2.5 s for the spawn and the in-process reference together,
 * measured on a loaded 2-core machine). Under heavier load the wall time is anyone's guess, so the
 * spawning tests get a bound far beyond any plausible wait instead of vitest's 5 s default (which
 * the suggest comparison, then two spawns, exceeded). Nothing here measures time.
 */
const SPAWN_TIMEOUT_MS = 300_000;

function looprig(args: string[]) {
  return spawnSync(process.execPath, [bin, ...args], { encoding: 'utf8', cwd: root });
}

describe('built bin (node dist/bundle/bin.js)', { timeout: SPAWN_TIMEOUT_MS }, () => {
  it('starts with a node shebang', () => {
    expect(readFileSync(bin, 'utf8').startsWith('#!/usr/bin/env node\n')).toBe(true);
  });

  it('run --json on a bundled plant: exit 0, one JSON document', () => {
    const r = looprig(['run', 'plants/mixing-loop-reference.yaml', '--json']);
    expect(r.stderr).toBe('');
    expect(r.status).toBe(0);
    const doc = JSON.parse(r.stdout);
    expect(doc.plant.name).toBe('Mixing loop reference');
    expect(doc.status).toBe('ok');
  });

  it('a bad file: FILE:LINE:COL: message, exit 2, no stack', () => {
    const r = looprig(['run', 'test/fixtures/bad/unknown-type.yaml']);
    expect(r.status).toBe(2);
    expect(r.stdout).toBe('');
    expect(r.stderr).toMatch(/^test\/fixtures\/bad\/unknown-type\.yaml:\d+:\d+: model\.type/);
    expect(r.stderr).not.toMatch(/\n\s+at /);
  });

  it('suggest --jobs 2 (worker threads from dist/bundle/sweep-worker.js) prints what --jobs 1 prints in-process', async () => {
    const args = ['suggest', join(root, 'plants', 'surge-tank.yaml'), '--json', '--samples', '16'];
    // One spawn for what only the built bin can show (workers started from dist/), the
    // reference through main() in this process: same source, same arguments.
    const two = looprig([...args, '--jobs', '2']);
    const io = fakeIo();
    const code = await main([...args, '--jobs', '1'], io);
    expect(two.stderr).toBe('');
    expect(two.status).toBe(0);
    expect(code).toBe(0);
    expect(io.stderr).toBe('');
    expect(JSON.parse(two.stdout).suggestions[0].worst_case.cases).toBe(19);
    expect(two.stdout).toBe(io.stdout);
  });

  it('check on a plant file: the table, and no package file loaded (yaml is inside the bundle)', () => {
    const dir = mkdtempSync(join(tmpdir(), 'looprig-bin-loads-'));
    try {
      const log = join(dir, 'loads.txt');
      const hook = pathToFileURL(join(root, 'test', 'cli', 'helpers', 'record-loads.mjs')).href;
      const r = spawnSync(process.execPath, ['--import', hook, bin, 'check', 'plants/surge-tank.yaml'], {
        encoding: 'utf8',
        cwd: root,
        env: { ...process.env, LOOPRIG_LOAD_LOG: log },
      });
      expect(r.stderr).toBe('');
      expect(r.status).toBe(0);
      expect(r.stdout).toContain('1 file: 1 pass, 0 fail, 0 invalid');
      const loaded = readFileSync(log, 'utf8').split('\n').filter((u) => u.startsWith('file:'));
      expect(loaded.filter((u) => u.includes('/node_modules/') && !u.includes('/node_modules/.cache/'))).toEqual([]);
      expect(loaded.length).toBeGreaterThan(1);
    } finally {
      rmSync(dir, { recursive: true, force: true });
    }
  });

  it('--version: the version of the package.json installed beside dist/', () => {
    const r = looprig(['--version']);
    expect(r.status).toBe(0);
    expect(r.stdout).toBe(`${(JSON.parse(readFileSync(join(pkg, 'package.json'), 'utf8')) as { version: string }).version}\n`);
  });

  it('no arguments: runs the demo plant found beside the installed dist/', () => {
    const r = looprig([]);
    expect(r.status).toBe(0);
    expect(r.stdout).toContain('Surge tank level');
    expect(r.stdout).toContain(join(pkg, 'plants', 'surge-tank.yaml'));
  });
});
