/**
 * `looprig diff` benchmark: the whole process, as a CI job runs it — `node dist/cli/bin.js diff`
 * on a bundled plant (the surge tank) between two commits of a repository made here (the gain
 * changed), so two trials, every margin, the requirement checks and the switch rehearsal, plus
 * Node's start, module loading and three git runs — against a bare `node -e 0` started the same
 * way in the same rounds. Target: under 1 s for the whole process.
 *
 * The bin is compiled by test/helpers/build-bin.ts (incremental; the first build takes ~20 s).
 * Run: `npm run bench -- diff`.
 */
import { execFileSync, spawnSync } from 'node:child_process';
import { mkdtempSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { pathToFileURL } from 'node:url';
import { buildBin } from '../helpers/build-bin.js';
import { PLANTS_DIR } from './bundled-plants.js';
import { median } from './median.js';

const ROUNDS = 7;

/**
 * CPU seconds used by this process's finished children (Linux /proc/self/stat cutime + cstime,
 * in clock ticks of 1/100 s); NaN elsewhere. On a machine shared with other work the wall time
 * includes waiting for a core; the CPU time is what the process itself needs.
 */
function childCpuSeconds(): number {
  try {
    const stat = readFileSync('/proc/self/stat', 'utf8');
    const fields = stat.slice(stat.lastIndexOf(')') + 2).split(' ');
    // Fields 16 and 17 of stat(5), counted from 1 with pid and comm before the ')'.
    return (Number(fields[13]) + Number(fields[14])) / 100;
  } catch {
    return NaN;
  }
}

export async function run(): Promise<void> {
  const { bin } = buildBin('looprig-diff-bench');
  const dir = mkdtempSync(join(tmpdir(), 'looprig-diff-bench-'));
  try {
    const git = (...args: string[]): void => {
      execFileSync('git', args, { cwd: dir, env: { ...process.env, GIT_AUTHOR_NAME: 'b', GIT_AUTHOR_EMAIL: 'b@example.invalid', GIT_COMMITTER_NAME: 'b', GIT_COMMITTER_EMAIL: 'b@example.invalid' } });
    };
    const text = readFileSync(join(PLANTS_DIR, 'surge-tank.yaml'), 'utf8');
    git('init', '-q');
    writeFileSync(join(dir, 'surge-tank.yaml'), text);
    git('add', '.');
    git('commit', '-q', '-m', 'one');
    writeFileSync(join(dir, 'surge-tank.yaml'), text.replace(/^(\s*kc:\s*)3\b/m, '$14.2'));
    git('commit', '-q', '-am', 'two');

    const spawn = (args: string[]): { ms: number; status: number | null; out: string } => {
      const t0 = performance.now();
      const r = spawnSync(process.execPath, args, { cwd: dir, encoding: 'utf8' });
      return { ms: performance.now() - t0, status: r.status, out: r.stdout + r.stderr };
    };
    const diffArgs = [bin, 'diff', 'surge-tank.yaml', '--from', 'HEAD~1', '--to', 'HEAD', '--json'];
    const first = spawn(diffArgs);
    if (first.status !== 0 && first.status !== 1) throw new Error(`diff failed (${first.status}): ${first.out}`);
    const doc = JSON.parse(first.out) as { rehearsal: { ran: boolean }; margins: unknown[] };
    spawn(['-e', '0']);
    const tDiff: number[] = [];
    const tNode: number[] = [];
    let cpuDiff = 0;
    let cpuNode = 0;
    for (let i = 0; i < ROUNDS; i++) {
      let c0 = childCpuSeconds();
      tDiff.push(spawn(diffArgs).ms);
      cpuDiff += childCpuSeconds() - c0;
      c0 = childCpuSeconds();
      tNode.push(spawn(['-e', '0']).ms);
      cpuNode += childCpuSeconds() - c0;
    }
    const d = median(tDiff);
    const n = median(tNode);
    console.log(
      `diff surge-tank.yaml HEAD~1..HEAD, whole process (exit ${first.status}, rehearsal ${doc.rehearsal.ran ? 'ran' : 'skipped'}, ${doc.margins.length} margins): ` +
        `median ${d.toFixed(0)} ms over ${ROUNDS} rounds; bare node -e 0 ${n.toFixed(0)} ms; ratio ${(d / n).toFixed(1)}x; ` +
        `diff's own share ${(d - n).toFixed(0)} ms; target < 1000 ms: ${d < 1000 ? 'met' : 'NOT met'}`,
    );
    const cd = (1000 * cpuDiff) / ROUNDS;
    const cn = (1000 * cpuNode) / ROUNDS;
    console.log(`CPU time per process (user + system, mean): diff ${cd.toFixed(0)} ms, node -e 0 ${cn.toFixed(0)} ms, ratio ${(cd / cn).toFixed(1)}x`);
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
}

if (import.meta.url === pathToFileURL(process.argv[1] ?? '').href) await run();
