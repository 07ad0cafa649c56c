/**
 * Long traces: `looprig run --duration` on a small loop (1 s sample, one RK4 step per sample) as
 * whole processes of the built CLI, peak resident memory and wall time for 1e3 rows (held whole),
 * 1e6 and 1e8 rows (streamed: loop/streamed-trial.ts), in one run. The issue "performance where
 * users wait" measured 5.6 GB and 17.8 s for 1e8 rows held whole (56 B per row); target: a 1e8-row
 * trial <= 200 MB. A held 1e8-row trace is not run here (5.6 GB on a shared machine): the held
 * cost is the row count times the bytes per row (sim/budget.ts), printed beside.
 *
 * Builds dist/ first (`npm run build`). Run: `npm run bench -- long-trace`.
 */
import { spawnSync } from 'node:child_process';
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { dirname, join, resolve } from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';

const root = resolve(dirname(fileURLToPath(import.meta.url)), '..', '..');
const bin = join(root, (JSON.parse(readFileSync(join(root, 'package.json'), 'utf8')) as { bin: { looprig: string } }).bin.looprig);

const PLANT = `name: Long trial
model: { type: first_order, gain: 2, time_constant: 20 s }
loop:
  sample_time: 1 s
  step: 1 s
  controller: { structure: pi, form: ideal, kc: 0.5, ti: 20 s }
  trial:
    duration: 1000 s
    events:
      - { at: 10 s, setpoint: 1 }
      - { at: 500 s, setpoint: 2 }
`;

function measure(file: string, rows: number): { s: number; mb: number } {
  const t0 = performance.now();
  const r = spawnSync('/usr/bin/time', ['-f', '%M', process.execPath, bin, 'run', file, '--duration', String(rows - 1), '--no-limits'], { encoding: 'utf8' });
  const s = (performance.now() - t0) / 1000;
  if (r.status !== 0) throw new Error(`run exited ${r.status}: ${r.stderr.slice(-400)}`);
  return { s, mb: Number(r.stderr.trim().split('\n').at(-1)) / 1024 };
}

export async function run(): Promise<void> {
  for (const [cmd, args] of [['tsc', ['-p', join(root, 'src', 'tsconfig.build.json')]], ['bundle', []]] as const) {
    const script = cmd === 'tsc' ? join(root, 'node_modules', 'typescript', 'bin', 'tsc') : join(root, 'src', 'bundle.mjs');
    const b = spawnSync(process.execPath, [script, ...args], { encoding: 'utf8' });
    if (b.status !== 0) throw new Error(`${cmd} failed:\n${b.stdout}${b.stderr}`);
  }
  const dir = mkdtempSync(join(tmpdir(), 'looprig-long-'));
  try {
    const file = join(dir, 'long.yaml');
    writeFileSync(file, PLANT);
    const small = measure(file, 1e3);
    const mid = measure(file, 1e6);
    const big = measure(file, 1e8);
    const heldGb = (1e8 * 57) / 1024 ** 3;
    console.log(`1e3 rows (held):     ${small.mb.toFixed(0).padStart(5)} MB  ${small.s.toFixed(2)} s`);
    console.log(`1e6 rows (streamed): ${mid.mb.toFixed(0).padStart(5)} MB  ${mid.s.toFixed(2)} s`);
    console.log(`1e8 rows (streamed): ${big.mb.toFixed(0).padStart(5)} MB  ${big.s.toFixed(2)} s  (${((big.s / 1e8) * 1e9).toFixed(0)} ns per row)`);
    console.log(`memory 1e8 rows / 1e3 rows: ${(big.mb / small.mb).toFixed(2)}x; held whole it would be ${heldGb.toFixed(1)} GiB of trace (57 B per row)`);
    console.log(`target: 1e8-row trial <= 200 MB: ${big.mb <= 200 ? 'met' : 'NOT met'} (${big.mb.toFixed(0)} MB)`);
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
}

if (import.meta.url === pathToFileURL(process.argv[1] ?? '').href) await run();
