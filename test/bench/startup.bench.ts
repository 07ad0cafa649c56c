/**
 * Start-up benchmark: whole processes of the installed CLI (package.json's bin: the code-split
 * bundle dist/bundle/, src/bundle.mjs) against bare `node -e 0`, run in alternation in the
 * same run (paired), medians. `--help` and `--version` load no command and no core folder
 * (test/cli/startup.test.ts); `check` and `run` on one small plant load what those commands need.
 * Baselines in the same run: the tsc output dist/cli/bin.js unbundled (one ES module per source
 * file, yaml's CommonJS files from node_modules: the installed bin before the bundle), and an
 * eager `--help` that imports every command module first, as main.ts did before commands were
 * loaded on demand. Targets (issue "performance where users wait"): `--help` <= 1.5x bare node,
 * `check` on one small plant <= 2.5x.
 *
 * Builds dist/ first (`npm run build`: tsc, then the bundle).
 * Run: `npm run bench -- startup`.
 */
import { spawnSync } from 'node:child_process';
import { mkdtempSync, readdirSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { dirname, join, resolve } from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';
import { median } from './median.js';

const root = resolve(dirname(fileURLToPath(import.meta.url)), '..', '..');
const bin = join(root, (JSON.parse(readFileSync(join(root, 'package.json'), 'utf8')) as { bin: { looprig: string } }).bin.looprig);
const unbundled = join(root, 'dist', 'cli', 'bin.js');
const plant = join(root, 'plants', 'surge-tank.yaml');

function wall(args: string[], env: NodeJS.ProcessEnv = process.env): number {
  const t0 = performance.now();
  const r = spawnSync(process.execPath, args, { cwd: root, encoding: 'utf8', env });
  const t = performance.now() - t0;
  if (r.status !== 0 && r.status !== 1) throw new Error(`${args.join(' ')} exited ${r.status}: ${r.stderr}`);
  return t;
}

/** Modules loaded by a process (the resolve hook of test/cli/helpers/record-loads.mjs). */
function moduleCount(args: string[]): number {
  const dir = mkdtempSync(join(tmpdir(), 'looprig-loads-'));
  try {
    const log = join(dir, 'loads.txt');
    const hook = pathToFileURL(join(root, 'test', 'cli', 'helpers', 'record-loads.mjs')).href;
    spawnSync(process.execPath, ['--import', hook, ...args], { cwd: root, env: { ...process.env, LOOPRIG_LOAD_LOG: log } });
    return new Set(readFileSync(log, 'utf8').split('\n').filter((u) => u.startsWith('file:'))).size;
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
}

export async function run(): Promise<void> {
  const tsc = spawnSync(process.execPath, [join(root, 'node_modules', 'typescript', 'bin', 'tsc'), '-p', join(root, 'src', 'tsconfig.build.json')], { encoding: 'utf8' });
  if (tsc.status !== 0) throw new Error(`build failed:\n${tsc.stdout}${tsc.stderr}`);
  const bundle = spawnSync(process.execPath, [join(root, 'src', 'bundle.mjs')], { encoding: 'utf8' });
  if (bundle.status !== 0) throw new Error(`bundle failed:\n${bundle.stdout}${bundle.stderr}`);
  const commands = readdirSync(join(root, 'dist', 'cli', 'commands')).filter((f) => f.endsWith('.js'));
  const eagerSource =
    `await Promise.all(${JSON.stringify(commands)}.map((f) => import(${JSON.stringify(pathToFileURL(join(root, 'dist', 'cli', 'commands')).href)} + '/' + f)));` +
    `const { main } = await import(${JSON.stringify(pathToFileURL(join(root, 'dist', 'cli', 'main.js')).href)});` +
    `const { nodeIo } = await import(${JSON.stringify(pathToFileURL(join(root, 'dist', 'cli', 'io.js')).href)});` +
    `process.exitCode = await main(['--help'], nodeIo());`;
  const cases: [string, string[]][] = [
    ['node -e 0', ['-e', '0']],
    ['looprig --help', [bin, '--help']],
    ['looprig --version', [bin, '--version']],
    ['--help, every command imported first (before)', ['--input-type=module', '-e', eagerSource]],
    ['looprig check (one small plant)', [bin, 'check', plant]],
    ['looprig run (one small plant)', [bin, 'run', plant]],
    ['check, unbundled dist/cli/bin.js (before)', [unbundled, 'check', plant]],
    ['run, unbundled dist/cli/bin.js (before)', [unbundled, 'run', plant]],
  ];
  const times = cases.map(() => [] as number[]);
  for (const [, args] of cases) wall(args);
  for (let i = 0; i < 21; i++) cases.forEach(([, args], k) => times[k].push(wall(args)));
  const base = median(times[0]);
  cases.forEach(([name, args], k) => {
    const m = median(times[k]);
    const mods = k === 0 ? 0 : moduleCount(args);
    console.log(`${name.padEnd(48)} median ${m.toFixed(0).padStart(5)} ms  ${(m / base).toFixed(2)}x bare node  (${mods} modules)`);
  });
  const help = median(times[1]) / base;
  const check = median(times[4]) / base;
  console.log(`targets: --help <= 1.5x bare node: ${help <= 1.5 ? 'met' : 'NOT met'} (${help.toFixed(2)}x); check one small plant <= 2.5x: ${check <= 2.5 ? 'met' : 'NOT met'} (${check.toFixed(2)}x)`);
  console.log(`bundle vs unbundled: check ${(median(times[6]) / median(times[4])).toFixed(2)}x faster, run ${(median(times[7]) / median(times[5])).toFixed(2)}x faster`);
}

if (import.meta.url === pathToFileURL(process.argv[1] ?? '').href) await run();
