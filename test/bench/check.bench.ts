/**
 * `looprig check plants/` benchmark: wall time of the whole command in-process (find files,
 * load, simulate each trial, time- and frequency-domain requirements, worst cases), against the
 * bare trial runs of the same files measured in the same run. Target: the bundled folder in a
 * few seconds.
 *
 * Run: `npx tsx test/bench/check.bench.ts` or `npm run bench -- check`.
 */
import { pathToFileURL } from 'node:url';
import { main } from '../../src/cli/index.js';
import { compilePlant } from '../../src/model/index.js';
import { runTrial } from '../../src/sim/index.js';
import { fileLoop } from '../../src/tune/index.js';
import { fakeIo } from '../cli/fake-io.js';
import { median } from './median.js';
import { bundledPlants, PLANTS_DIR } from './bundled-plants.js';

export async function run(): Promise<void> {
  const plants = bundledPlants().map((p) => p.spec);
  const bare = (): void => {
    for (const p of plants) {
      const { loop } = fileLoop(p, compilePlant(p));
      runTrial(loop.dynamics, loop.controller(), loop.config, loop.trial);
    }
  };
  const check = async (): Promise<number> => main(['check', PLANTS_DIR], fakeIo());
  await check();
  bare();
  const tCheck: number[] = [];
  const tBare: number[] = [];
  let code = 0;
  for (let i = 0; i < 5; i++) {
    let t0 = performance.now();
    code = await check();
    tCheck.push(performance.now() - t0);
    t0 = performance.now();
    bare();
    tBare.push(performance.now() - t0);
  }
  const c = median(tCheck);
  const b = median(tBare);
  console.log(`check plants/ (${plants.length} files, exit ${code}): median ${c.toFixed(0)} ms; bare trial runs of the same files ${b.toFixed(0)} ms; ratio ${(c / b).toFixed(1)}x; target a few seconds: ${c < 5000 ? 'met' : 'NOT met'}`);
}

if (import.meta.url === pathToFileURL(process.argv[1] ?? '').href) await run();
