/**
 * What `looprig --help` and `--version` load. They print a constant and a field of package.json:
 * the start-up path must not load the command modules, any core folder's index (each re-exports
 * its whole folder) or a package (yaml, Ink, React). The modules loaded are recorded by a resolve
 * hook in a real process (type-only imports are erased, as in the build), not read off the source.
 * No timing here: test/bench/startup.bench.ts measures the time against bare Node.
 */
import { describe, it, expect } from 'vitest';
import { spawnSync } from 'node:child_process';
import { mkdtempSync, readFileSync, rmSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { dirname, join, relative, resolve } from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';

const root = resolve(dirname(fileURLToPath(import.meta.url)), '..', '..');
const recorder = pathToFileURL(join(root, 'test', 'cli', 'helpers', 'record-loads.mjs')).href;

/** Source files (relative to src/) and packages loaded by `looprig ARGS`, with its output. */
function loads(args: string[]): { files: string[]; packages: string[]; builtins: string[]; stdout: string; status: number | null } {
  const dir = mkdtempSync(join(tmpdir(), 'looprig-loads-'));
  const log = join(dir, 'loads.txt');
  try {
    const r = spawnSync(process.execPath, ['--import', 'tsx/esm', '--import', recorder, join(root, 'src', 'cli', 'bin.ts'), ...args], {
      cwd: root,
      encoding: 'utf8',
      env: { ...process.env, LOOPRIG_LOAD_LOG: log },
    });
    const lines = readFileSync(log, 'utf8').split('\n');
    const urls = [...new Set(lines.filter((u) => u.startsWith('file:')))];
    const builtins = [...new Set(lines.filter((u) => u.startsWith('node:')))].sort();
    const paths = urls.map((u) => fileURLToPath(u));
    const src = join(root, 'src');
    const files = paths.filter((p) => p.startsWith(src)).map((p) => relative(src, p).split('\\').join('/'));
    const packages = paths
      .filter((p) => p.includes(`${join('node_modules')}/`))
      .map((p) => p.split('node_modules/').at(-1)!.split('/')[0])
      .filter((name) => name !== 'tsx' && name !== 'get-tsconfig' && name !== 'esbuild' && name !== 'resolve-pkg-maps');
    return { files: [...new Set(files)].sort(), packages: [...new Set(packages)].sort(), builtins, stdout: r.stdout, status: r.status };
  } finally {
    rmSync(dir, { recursive: true, force: true });
  }
}

describe('start-up path', { timeout: 120_000 }, () => {
  for (const args of [['--help'], ['--version']]) {
    it(`${args[0]} loads the CLI shell and num/ only: no command, no other core folder, no package`, () => {
      const r = loads(args);
      expect(r.status).toBe(0);
      expect(r.stdout.length).toBeGreaterThan(0);
      const outside = r.files.filter((f) => !f.startsWith('cli/') && !f.startsWith('num/'));
      expect(outside).toEqual([]);
      expect(r.files.filter((f) => f.startsWith('cli/commands/'))).toEqual([]);
      expect(r.packages).toEqual([]);
      // Built-ins only some commands use are loaded when used (cli/builtin.ts): child_process for git.
      expect(r.builtins.filter((b) => b === 'node:child_process' || b === 'node:crypto')).toEqual([]);
      // num/ is reached for the UTF-8 check the Io does on every text file it reads.
      expect(r.files).toContain('cli/main.ts');
    });
  }

  it('a command loads its own module (and only then the tree it needs)', () => {
    const r = loads(['schema']);
    expect(r.status).toBe(0);
    expect(r.files).toContain('cli/commands/schema.ts');
    expect(r.files).not.toContain('cli/commands/run.ts');
    expect(r.files).not.toContain('cli/commands/screen.ts');
  });
});
