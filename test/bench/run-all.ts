/**
 * `npm run bench`: runs every test/bench/*.bench.ts in turn (or only those named on the command
 * line, e.g. `npm run bench -- engine tune`). Each bench prints its own figures and a ratio against
 * a hand-written baseline measured in the same run. Not part of `npm test`: timings are reported,
 * never asserted.
 *
 * Started as `node --import tsx/esm`, not `tsx`: the `tsx` command also installs tsx's CommonJS
 * hooks, and with them in the process the same built JavaScript ran about 25 % slower here (the
 * surge-tank sweep: 555 against 445 µs per case), so every figure would carry that cost.
 */
import { readdirSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';

const here = dirname(fileURLToPath(import.meta.url));
const wanted = process.argv.slice(2);
const files = readdirSync(here)
  .filter((f) => f.endsWith('.bench.ts'))
  .filter((f) => wanted.length === 0 || wanted.some((w) => f.startsWith(w)))
  .sort();

if (files.length === 0) {
  console.error(`no benchmark matches ${wanted.join(' ')}`);
  process.exitCode = 2;
}
for (const f of files) {
  console.log(`\n== ${f.replace('.bench.ts', '')} ==`);
  const mod = (await import(pathToFileURL(join(here, f)).href)) as { run?: () => Promise<void> };
  if (typeof mod.run !== 'function') {
    console.error(`${f}: exports no run()`);
    process.exitCode = 1;
    continue;
  }
  const t0 = performance.now();
  await mod.run();
  console.log(`(${f} took ${((performance.now() - t0) / 1000).toFixed(1)} s)`);
}
