/**
 * `looprig check` at scale, on generated plant files in a temporary folder (a small first-order
 * loop each, gains varied so no two files are alike): time per file for 100 and 1000 files
 * in-process (flat: ratio ~1), peak memory of whole processes on 100 and 1000 files (flat: the
 * trials are dropped as each file is done), and `--shard 1/1000` of the 1000-file folder against
 * a one-file folder, whole processes (a shard reads only its own files). Ratios in one run.
 * Targets (issue "performance where users wait"): time and memory per file flat, the shard within
 * 1.5x the one-file folder.
 *
 * Run: `npm run bench -- check-scale`.
 */
import { spawnSync } from 'node:child_process';
import { mkdirSync, mkdtempSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { dirname, join, resolve } from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';
import { main } from '../../src/cli/index.js';
import { fakeIo } from '../cli/fake-io.js';
import { median } from './median.js';

const root = resolve(dirname(fileURLToPath(import.meta.url)), '..', '..');

/** A small plant file, the k-th of a generated set. */
function plantText(k: number): string {
  return [
    `name: Generated loop ${k}`,
    'model:',
    '  type: first_order',
    `  gain: ${(2 + 1e-5 * k).toFixed(5)}`,
    '  time_constant: 12 s',
    '  delay: 3 s',
    'loop:',
    '  sample_time: 0.5 s',
    '  controller: { structure: pi, form: parallel, kp: 0.8, ki: 0.08 }',
    '  trial:',
    '    duration: 2 min',
    '    events:',
    '      - { at: 10 s, setpoint: 1 }',
    '  requirements:',
    '    overshoot_pct: 50',
    '    gain_margin: 1.5',
    '',
  ].join('\n');
}

/** Files made so far: every generated file is a different plant, in every folder. */
let made = 0;

function folder(base: string, name: string, files: number): string {
  const dir = join(base, name);
  mkdirSync(dir);
  for (let k = 0; k < files; k++) writeFileSync(join(dir, `plant-${String(k).padStart(4, '0')}.yaml`), plantText(made++));
  return dir;
}

/** Wall time (ms) and peak resident memory (MB) of `looprig ARGS` as a whole process (from source). */
function process_(args: string[]): { ms: number; mb: number } {
  const t0 = performance.now();
  const r = spawnSync('/usr/bin/time', ['-f', '%M', process.execPath, '--import', 'tsx/esm', join(root, 'src', 'cli', 'bin.ts'), ...args], {
    cwd: root,
    encoding: 'utf8',
  });
  const ms = performance.now() - t0;
  if (r.status !== 0) throw new Error(`looprig ${args.join(' ')} exited ${r.status}: ${r.stderr.slice(-500)}`);
  const kb = Number(r.stderr.trim().split('\n').at(-1));
  return { ms, mb: kb / 1024 };
}

export async function run(): Promise<void> {
  const base = mkdtempSync(join(tmpdir(), 'looprig-check-scale-'));
  try {
    const one = folder(base, 'one', 1);
    const hundred = folder(base, 'hundred', 100);
    const thousand = folder(base, 'thousand', 1000);

    // In-process time per file. Each measured folder is checked once, and no two files anywhere
    // are the same plant, so no run finds another's generated code in the engine's caches (a CI
    // run checks each file once); one folder of its own first warms the process up.
    const perFile = async (dir: string, n: number): Promise<number> => {
      const t0 = performance.now();
      const code = await main(['check', dir], fakeIo());
      if (code !== 0) throw new Error(`check ${dir} exited ${code}`);
      return (performance.now() - t0) / n;
    };
    await perFile(folder(base, 'warm', 100), 100);
    const t100: number[] = [];
    const t1000: number[] = [];
    for (let i = 0; i < 3; i++) {
      t100.push(await perFile(folder(base, `hundred-${i}`, 100), 100));
      t1000.push(await perFile(folder(base, `thousand-${i}`, 1000), 1000));
    }
    const p100 = median(t100);
    const p1000 = median(t1000);
    console.log(`check in-process: ${p100.toFixed(2)} ms per file on 100 files, ${p1000.toFixed(2)} ms on 1000: ratio ${(p1000 / p100).toFixed(2)} (flat: ~1)`);
    // Whole processes, paired: memory on 100 vs 1000 files; --shard 1/1000 vs a one-file folder.
    const m100: number[] = [];
    const m1000: number[] = [];
    const tShard: number[] = [];
    const tOne: number[] = [];
    for (let i = 0; i < 5; i++) {
      m100.push(process_(['check', hundred]).mb);
      m1000.push(process_(['check', thousand]).mb);
      tShard.push(process_(['check', thousand, '--shard', '1/1000']).ms);
      tOne.push(process_(['check', one]).ms);
    }
    const a = median(m100);
    const b = median(m1000);
    console.log(`peak memory (whole process): ${a.toFixed(0)} MB on 100 files, ${b.toFixed(0)} MB on 1000: ratio ${(b / a).toFixed(2)}; ${(((b - a) * 1024) / 900).toFixed(1)} kB per extra file`);
    const s = median(tShard);
    const o = median(tOne);
    console.log(`--shard 1/1000 of 1000 files ${s.toFixed(0)} ms vs a one-file folder ${o.toFixed(0)} ms: ratio ${(s / o).toFixed(2)}; target <= 1.5: ${s / o <= 1.5 ? 'met' : 'NOT met'}`);
  } finally {
    rmSync(base, { recursive: true, force: true });
  }
}

if (import.meta.url === pathToFileURL(process.argv[1] ?? '').href) await run();
