/**
 * `looprig compare` benchmark: wall time of `compareCandidates` on every bundled plant with its
 * default candidates (the file's compare: list, or those chosen from the diagnosis), including the
 * per-structure tuning (every candidate without gains is tuned by the optimiser to the same Ms:
 * a few hundred evaluations each), the margins and the worst case over the uncertainty corners.
 * Target: under 1 s per plant with the rule gains only (--evaluations 0), as before the fair
 * fight; the tuned comparison is reported beside it with its evaluation count.
 *
 * Baselines, measured in the same run: the bare trial runs of the same resolved controllers on
 * the same plant cases (nominal + corners), without diagnosis, tuning or margins; and for the
 * tuned comparison that plus one bare trial per optimiser evaluation. The ratios say how much
 * the comparison adds on top of simulating.
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
  console.log('plant                              candidates  rule gains (median of 3)  bare trials  ratio | tuned  evaluations  bare trials  ratio');
  for (const { file: f, spec } of bundledPlants()) {
    compareCandidates(spec, { evaluations: 0 }); // warm-up: code generation and JIT
    const times: number[] = [];
    let result = compareCandidates(spec, { evaluations: 0 });
    for (let i = 0; i < REPEATS; i++) {
      const t0 = performance.now();
      result = compareCandidates(spec, { evaluations: 0 });
      times.push(performance.now() - t0);
    }
    const t1 = performance.now();
    const tuned = compareCandidates(spec);
    const tuneMs = performance.now() - t1;
    const evaluations = tuned.candidates.reduce((n, c) => n + (c.tuning?.evaluations ?? 0), 0);
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
    // One bare nominal trial per optimiser evaluation on top (Ms-rejected probes are not simulated: an upper bound).
    const perTrial = tb / Math.max(1, controllers.length * (1 + plan.cases.length));
    const tbTuned = tb + evaluations * perTrial;
    console.log(
      `${f.padEnd(35)}${String(result.candidates.length).padStart(10)}  ${tc.toFixed(0).padStart(20)} ms  ${tb.toFixed(0).padStart(8)} ms  ${(tc / tb).toFixed(2).padStart(5)}x` +
        ` | ${tuneMs.toFixed(0).padStart(5)} ms ${String(evaluations).padStart(11)}  ${tbTuned.toFixed(0).padStart(8)} ms  ${(tuneMs / tbTuned).toFixed(2).padStart(5)}x`,
    );
  }
  console.log(`slowest plant: ${worst.toFixed(0)} ms (target < 1000 ms) ${worst < 1000 ? 'met' : 'NOT met'}`);
}

if (import.meta.url === pathToFileURL(process.argv[1]).href) await run();
