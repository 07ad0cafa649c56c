/**
 * The installed command: dist/bundle/, built from the tsc output in dist/ by esbuild with code
 * splitting (`npm run build` and the `prepare` script run it after tsc, so `npm install` stays
 * the only set-up step).
 *
 * Why: Node 20 resolves, reads and compiles every ES module of a command one by one (~0.5 ms
 * each on the 2-core machine), and `check` reaches ~170 of ours plus ~70 CommonJS files of yaml:
 * more than half its start-up (test/bench/startup.bench.ts). Here each command is one chunk plus
 * the chunks it shares with others, and yaml is inside them. Commands still load on demand (the
 * dynamic imports of cli/main.ts become chunk imports), and the packages of the screen (Ink,
 * React) stay outside, loaded from node_modules only when the screen starts.
 *
 * The chunks sit two folders below the package root, as dist/cli/ does, so the package root
 * (cli/plants-dir.ts) is found the same way; the sweep worker is an entry of its own next to
 * them (cli/parallel-sweep.ts starts it by URL).
 */
import { build } from 'esbuild';
import { rmSync } from 'node:fs';
import { dirname, join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';

/** The package folder (default: this repository); test/helpers/build-bin.ts passes its own build folder. */
const root = resolve(process.argv[2] ?? join(dirname(fileURLToPath(import.meta.url)), '..'));
const out = join(root, 'dist', 'bundle');
rmSync(out, { recursive: true, force: true });
await build({
  entryPoints: [join(root, 'dist', 'cli', 'bin.js'), join(root, 'dist', 'cli', 'sweep-worker.js')],
  outdir: out,
  bundle: true,
  splitting: true,
  format: 'esm',
  platform: 'node',
  target: 'node20',
  // Every package stays outside but yaml, which every command that reads a plant file needs.
  external: ['ink', 'ink-text-input', 'react', 'react/*', 'asciichart'],
  // yaml is CommonJS and requires Node built-ins; an ES module has no `require` of its own.
  banner: { js: "import { createRequire as __looprigRequire } from 'node:module'; const require = __looprigRequire(import.meta.url);" },
  chunkNames: 'chunk-[hash]',
  // Less text for Node to read and V8 to scan at every start (names are kept: stack traces).
  minifyWhitespace: true,
  minifySyntax: true,
  logLevel: 'warning',
});
