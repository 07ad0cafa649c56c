/**
 * `looprig compare` benchmark: wall time of `compareCandidates` on every bundled plant with its
 * default candidates (the file's compare: list, or those chosen from the diagnosis), including the
 * per-structure tuning, the margins and the worst case over the uncertainty corners. Target:
 * under 1 s per plant.
 *
 * Baseline, measured in the same run: the bare trial runs of the same resolved controllers on
 * the same plant cases (nominal + corners), without diagnosis, tuning or margins. The ratio says
 * how much the comparison adds on top of simulating.
 *
 * Run: `npx tsx test/bench/compare.bench.ts` or `npm run bench -- compare`.
 */
import { pathToFileURL } from 'node:url';
import { buildController } from '../../src/control/index.js';
import { runTrial } from '../../src/sim/index.js';
import { compareCandidates, planSweep, tuningContext } from '../../src/tune/index.js';
import { median } from './median.js';
import { bundledPlants } from './bundled-plants.js';

export async function run(): Promise<void> {
  const REPEATS = 3;
  let worst = 0;
  console.log('plant                              candidates  compare (median of 3)  bare trials  ratio');
  for (const { file: f, spec } of bundledPlants()) {
    compareCandidates(spec); // warm-up: code generation and JIT
    const times: number[] = [];
    let result = compareCandidates(spec);
    for (let i = 0; i < REPEATS; i++) {
      const t0 = performance.now();
      result = compareCandidates(spec);
      times.push(performance.now() - t0);
    }
    // Baseline: the same resolved controllers, the same plant cases, simulation only.
    const ctx = tuningContext(spec);
    const plan = planSweep(spec, { corners: true, samples: 0, nominal: false }, ctx);
    const controllers = result.candidates.flatMap((c) => (c.controller ? [c.controller] : []));
    const bare: number[] = [];
    for (let i = 0; i < REPEATS; i++) {
      const t0 = performance.now();
      for (const c of controllers) {
        runTrial(ctx.dynamics, buildController(c, spec.loop.sampleTime, ctx.dynamics), ctx.loop, ctx.trial);
        for (const pc of plan.cases) runTrial(pc.ctx.dynamics, buildController(c, spec.loop.sampleTime, pc.ctx.dynamics), pc.ctx.loop, pc.ctx.trial);
      }
      bare.push(performance.now() - t0);
    }
    const tc = median(times);
    const tb = median(bare);
    worst = Math.max(worst, tc);
    console.log(
      `${f.padEnd(35)}${String(result.candidates.length).padStart(10)}  ${tc.toFixed(0).padStart(17)} ms  ${tb.toFixed(0).padStart(8)} ms  ${(tc / tb).toFixed(2).padStart(5)}x`,
    );
  }
  console.log(`slowest plant: ${worst.toFixed(0)} ms (target < 1000 ms) ${worst < 1000 ? 'met' : 'NOT met'}`);
}

if (import.meta.url === pathToFileURL(process.argv[1]).href) await run();
