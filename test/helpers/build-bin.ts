/**
 * Compile the bin and everything it imports with tsc into a folder laid out like the installed
 * package (package.json, dist/, plants/, node_modules/), for spawn tests and whole-process
 * benchmarks, without touching the repository's own dist/ (other work may be building it at the
 * same time). Only the bin's import closure is compiled, so unrelated folders that are mid-work
 * cannot break it. The folder is a cache under node_modules/.cache and the build is incremental
 * (measured on a loaded 2-core machine: 18 s for the first build, 10 s for a rebuild with nothing
 * changed; ~6 s of CPU unloaded).
 */
import { spawnSync } from 'node:child_process';
import { copyFileSync, existsSync, mkdirSync, rmSync, symlinkSync, writeFileSync } from 'node:fs';
import { dirname, join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';

/** The repository's top folder. */
export const REPO_ROOT = resolve(dirname(fileURLToPath(import.meta.url)), '..', '..');

/**
 * Build into node_modules/.cache/`name`: tsc, then the bundle of the installed command
 * (src/bundle.mjs). Returns the path of package.json's bin, dist/bundle/bin.js (throws on a
 * build error).
 */
export function buildBin(name: string): { pkg: string; bin: string } {
  const root = REPO_ROOT;
  const pkg = join(root, 'node_modules', '.cache', name);
  mkdirSync(pkg, { recursive: true });
  copyFileSync(join(root, 'package.json'), join(pkg, 'package.json'));
  for (const entry of ['node_modules', 'plants']) {
    rmSync(join(pkg, entry), { force: true, recursive: false });
    symlinkSync(join(root, entry), join(pkg, entry), 'dir');
  }
  const tsconfig = {
    extends: join(root, 'tsconfig.json'),
    compilerOptions: {
      noEmit: false,
      declaration: false,
      incremental: true,
      tsBuildInfoFile: join(pkg, 'tsconfig.tsbuildinfo'),
      typeRoots: [join(root, 'node_modules', '@types')],
      rootDir: join(root, 'src'),
      outDir: join(pkg, 'dist'),
    },
    include: [],
    // The sweep worker is started by URL, not imported, so it is named here.
    files: [join(root, 'src', 'cli', 'bin.ts'), join(root, 'src', 'cli', 'sweep-worker.ts')],
  };
  writeFileSync(join(pkg, 'tsconfig.json'), JSON.stringify(tsconfig));
  const tsc = spawnSync(process.execPath, [join(root, 'node_modules', 'typescript', 'bin', 'tsc'), '-p', join(pkg, 'tsconfig.json')], {
    encoding: 'utf8',
  });
  const compiled = join(pkg, 'dist', 'cli', 'bin.js');
  if (tsc.status !== 0 || !existsSync(compiled)) throw new Error(`tsc failed (${tsc.status}):\n${tsc.stdout}${tsc.stderr}`);
  // Then the installed command, as `npm run build` makes it (src/bundle.mjs): package.json's bin.
  const bundle = spawnSync(process.execPath, [join(root, 'src', 'bundle.mjs'), pkg], { encoding: 'utf8' });
  const bin = join(pkg, 'dist', 'bundle', 'bin.js');
  if (bundle.status !== 0 || !existsSync(bin)) throw new Error(`bundle failed (${bundle.status}):\n${bundle.stdout}${bundle.stderr}`);
  return { pkg, bin };
}
