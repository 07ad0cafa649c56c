/**
 * Whole-process tank trial: `looprig run` on the gravity-drained tank of
 * test/fixtures/reference/gravity-tank.yaml run for 2000 s at a 1 ms RK4 step (2 million
 * integration steps, 2001 samples), against the same loop in Python with one SciPy solve_ivp
 * call between samples (test/fixtures/reference/gravity-tank-loop.py: RK45, rtol 1e-10, the
 * reference's tolerances). Both as whole processes, start-up included, run in alternation in the
 * same run (paired), medians. Target (issue "performance where users wait"): looprig >= 20x
 * faster. The IAEs are printed side by side: the same trial (looprig takes the setpoint's left
 * limit at the step, the script a plain trapezoid: 0.1 apart, half a sample of the 0.2 step).
 *
 * Needs python3 with numpy and SciPy (skipped with a note otherwise). Builds dist/ first.
 * Run: `npm run bench -- tank-trial`.
 */
import { spawnSync } from 'node:child_process';
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { dirname, join, resolve } from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';
import { median } from './median.js';

const root = resolve(dirname(fileURLToPath(import.meta.url)), '..', '..');
const bin = join(root, 'dist', 'cli', 'bin.js');
const script = join(root, 'test', 'fixtures', 'reference', 'gravity-tank-loop.py');
const DURATION = 2000;

/** Wall time (ms) and standard output of a whole process. */
function timed(cmd: string, args: string[]): { ms: number; out: string } {
  const t0 = performance.now();
  const r = spawnSync(cmd, args, { cwd: root, encoding: 'utf8' });
  const ms = performance.now() - t0;
  if (r.status !== 0) throw new Error(`${cmd} ${args.join(' ')} exited ${r.status}: ${r.stderr}`);
  return { ms, out: r.stdout };
}

export async function run(): Promise<void> {
  const probe = spawnSync('python3', ['-c', 'import numpy, scipy'], { encoding: 'utf8' });
  if (probe.status !== 0) {
    console.log('tank trial: python3 with numpy and SciPy not available, skipped');
    return;
  }
  const tsc = spawnSync(process.execPath, [join(root, 'node_modules', 'typescript', 'bin', 'tsc'), '-p', join(root, 'src', 'tsconfig.build.json')], { encoding: 'utf8' });
  if (tsc.status !== 0) throw new Error(`build failed:\n${tsc.stdout}${tsc.stderr}`);
  const dir = mkdtempSync(join(tmpdir(), 'looprig-tank-'));
  try {
    const yaml = readFileSync(join(root, 'test', 'fixtures', 'reference', 'gravity-tank.yaml'), 'utf8')
      .replace('duration: 300 s', `duration: ${DURATION} s`)
      .replace('sample_time: 1 s', 'sample_time: 1 s\n  step: 0.001 s');
    if (!yaml.includes(`duration: ${DURATION} s`) || !yaml.includes('step: 0.001 s')) throw new Error('gravity-tank.yaml changed: update the bench');
    const file = join(dir, 'gravity-tank-2m.yaml');
    writeFileSync(file, yaml);
    const ours: number[] = [];
    const theirs: number[] = [];
    let outOurs = '';
    let outTheirs = '';
    for (let i = 0; i < 5; i++) {
      const a = timed(process.execPath, [bin, 'run', file]);
      const b = timed('python3', [script, String(DURATION)]);
      ours.push(a.ms);
      theirs.push(b.ms);
      outOurs = a.out;
      outTheirs = b.out;
    }
    const steps = /(\d+) steps over/.exec(outOurs)?.[1] ?? '?';
    const iae = /whole trial: IAE ([0-9.e+-]+)/.exec(outOurs)?.[1] ?? '?';
    const pyIae = /iae ([0-9.e+-]+)/.exec(outTheirs)?.[1] ?? '?';
    const mo = median(ours);
    const mt = median(theirs);
    console.log(`gravity tank, ${DURATION} s trial, RK4 at 1 ms (${steps} steps), whole processes, median of 5 paired runs`);
    console.log(`  looprig run                          ${mo.toFixed(0).padStart(6)} ms   IAE ${iae}`);
    console.log(`  Python + SciPy solve_ivp per sample  ${mt.toFixed(0).padStart(6)} ms   IAE ${pyIae}`);
    console.log(`  SciPy / looprig: ${(mt / mo).toFixed(1)}x (target >= 20x)`);
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
}

if (import.meta.url === pathToFileURL(process.argv[1] ?? '').href) await run();
