/**
 * Design-rows benchmark: `suggest` with the pole-placement, loop-shaping and Ms-constrained PI
 * rows on every bundled plant at the screen's default targets (target < 300 ms each), and with the
 * loop shaping aimed at an Ms, against `suggest` without them in the same run; and the tweak guide on the surge tank (target < 150 ms) against the bare simulations it
 * holds (one runTrial of the file's controller times the number of variants); and the PI
 * optimiser on every bundled plant with and without the Ms-constrained PI among its starts (cost
 * reached, evaluations, wall time: the evaluations and costs are the same on any machine).
 *
 * Run: `npx tsx test/bench/design.bench.ts` or `npm run bench -- design`.
 */
import { join } from 'node:path';
import { pathToFileURL } from 'node:url';
import { buildController } from '../../src/control/index.js';
import { runTrial } from '../../src/sim/index.js';
import { defaultDesignTargets, optimizeGains, ruleInputsOf, suggestGains, tuningContext, tweakGuide } from '../../src/tune/index.js';
import type { SuggestOptions } from '../../src/tune/index.js';
import { bundledPlants, load, PLANTS_DIR } from './bundled-plants.js';
import { median } from './median.js';

function timeIt(f: () => void, repeats: number): number {
  f();
  const times: number[] = [];
  for (let i = 0; i < repeats; i++) {
    const t0 = performance.now();
    f();
    times.push(performance.now() - t0);
  }
  return median(times);
}

export async function run(): Promise<void> {
  console.log('suggest with the design rows on every bundled plant (target < 300 ms each), at the screen\'s default targets;');
  console.log('  then with the loop-shaping rows aimed at an Ms (the same crossover, Ms = the file\'s limit) instead of a phase margin');
  for (const { file, spec } of bundledPlants()) {
    const ctx = tuningContext(spec);
    const d = defaultDesignTargets(ctx, ruleInputsOf(ctx).inputs);
    const design: SuggestOptions = { context: ctx, robustness: false, poles: d.poles, shaping: d.shaping, maxMs: d.maxMs };
    const withRows = timeIt(() => suggestGains(spec, design), 3);
    const msShaping = d.shaping === null ? NaN : timeIt(() => suggestGains(spec, { ...design, shaping: { crossover: d.shaping!.crossover, ms: d.maxMs, tiTdRatio: 4 } }), 3);
    const without = timeIt(() => suggestGains(spec, { context: ctx, robustness: false }), 3);
    const verdict = (x: number): string => (Number.isNaN(x) ? '-   ' : x < 300 ? 'ok  ' : 'SLOW');
    console.log(
      `  ${file.padEnd(36)} ${withRows.toFixed(0).padStart(5)} ms ${verdict(withRows)} | Ms shaping ${msShaping.toFixed(0).padStart(5)} ms ${verdict(msShaping)} | without the design rows ${without.toFixed(0)} ms (ratio ${(withRows / without).toFixed(2)})`,
    );
  }
  const tank = load(join(PLANTS_DIR, 'surge-tank.yaml'));
  const ctx = tuningContext(tank);
  const g = tank.loop.controller.gains;
  let variants = 0;
  const guideMs = timeIt(() => {
    variants = 1 + 2 * tweakGuide(ctx, g, 'pi').rows.length;
  }, 5);
  const bare = timeIt(() => {
    runTrial(ctx.dynamics, buildController(tank.loop.controller, tank.loop.sampleTime), ctx.loop, ctx.trial);
  }, 5);
  console.log(
    `tweak guide on the surge tank: ${guideMs.toFixed(0)} ms ${guideMs < 150 ? 'ok' : 'SLOW'} (target < 150 ms) for ${variants} simulations; ` +
      `${variants} bare runTrial ${(variants * bare).toFixed(0)} ms (ratio ${(guideMs / (variants * bare)).toFixed(2)})`,
  );
  optimiserStarts();
}

/** The PI optimiser from the best start with and without the Ms-constrained PI among the candidates. */
function optimiserStarts(): void {
  console.log('PI optimiser: without / with the Ms-constrained PI as a start candidate');
  for (const { file, spec } of bundledPlants()) {
    const ctx = tuningContext(spec);
    const run = (msPiStart: boolean) => {
      const t0 = performance.now();
      const r = optimizeGains(spec, { context: ctx, structure: 'pi', msPiStart });
      return { r, ms: performance.now() - t0 };
    };
    const a = run(false);
    const b = run(true);
    const f = (x: number): string => x.toPrecision(5);
    console.log(
      `  ${file.padEnd(36)} start ${a.r.startLabel} / ${b.r.startLabel}; cost ${f(a.r.best.cost)} / ${f(b.r.best.cost)} (ratio ${(b.r.best.cost / a.r.best.cost).toFixed(3)}); ` +
        `evaluations ${a.r.evaluations} / ${b.r.evaluations}; ${a.ms.toFixed(0)} / ${b.ms.toFixed(0)} ms`,
    );
  }
}

if (import.meta.url === pathToFileURL(process.argv[1] ?? '').href) await run();
