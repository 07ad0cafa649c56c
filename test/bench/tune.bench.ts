/**
 * Tuning benchmark: `suggest` on every bundled plant (all rules, each simulated, worst case over
 * the uncertainty corners), `optimize` on the nonlinear surge tank, and the robustness sweep's
 * simulations per second. Each figure is set against a baseline measured in the same run: the
 * bare cost of the simulations involved (one runTrial of the file's own controller, times the
 * number of simulations), and for the sweep a hand-written closed loop of the surge tank (RK4,
 * PI with clamping, actuator limits and rate limit, first-order sensor filter; no noise).
 *
 * Run: `npx tsx test/bench/tune.bench.ts` or `npm run bench -- tune`.
 */
import { join } from 'node:path';
import { pathToFileURL } from 'node:url';
import { buildController } from '../../src/control/index.js';
import type { PlantSpec } from '../../src/model/types.js';
import { runTrial } from '../../src/sim/index.js';
import { bundledPlants, load, PLANTS_DIR } from './bundled-plants.js';
import { handTank } from './hand-tank-loop.js';
import { createOptimizer, planSweep, robustnessSweep, suggestGains, tuningContext } from '../../src/tune/index.js';
import { median } from './median.js';

function timeIt(f: () => void, repeats: number): number {
  f(); // warm-up (JIT, generated steppers)
  const times: number[] = [];
  for (let i = 0; i < repeats; i++) {
    const t0 = performance.now();
    f();
    times.push(performance.now() - t0);
  }
  return median(times);
}

/** One bare simulation of the file's own trial and controller, ms. */
function bareTrialMs(spec: PlantSpec): number {
  const ctx = tuningContext(spec);
  return timeIt(() => {
    runTrial(ctx.dynamics, buildController(spec.loop.controller, spec.loop.sampleTime), ctx.loop, ctx.trial);
  }, 5);
}

/** Hand-written surge-tank loop with the file's numbers: per-simulation time, ms. */
function handTankMs(spec: PlantSpec): number {
  return timeIt(handTank(spec), 21);
}

export async function run(): Promise<void> {
  console.log('suggest on every bundled plant (target < 300 ms each)');
  for (const { file: f, spec } of bundledPlants()) {
    let sims = 0;
    const ms = timeIt(() => {
      const r = suggestGains(spec);
      sims = r.suggestions.reduce((n, s) => n + (s.worstCase ? s.worstCase.cases : 1), 0);
    }, 3);
    const bare = bareTrialMs(spec);
    console.log(
      `  ${f.padEnd(32)} ${ms.toFixed(0).padStart(5)} ms  ${ms < 300 ? 'ok  ' : 'SLOW'}  ${sims} simulations; ` +
        `bare simulations alone ${(sims * bare).toFixed(0)} ms (ratio ${(ms / (sims * bare)).toFixed(2)})`,
    );
  }

  const tank = load(join(PLANTS_DIR, 'surge-tank.yaml'));
  console.log('optimize on the surge tank, default evaluation budget (target < 1 s)');
  let evals = 0;
  let rules = 0;
  let stopped = '';
  let gains = '';
  const optMs = timeIt(() => {
    const opt = createOptimizer(tuningContext(tank));
    while (!opt.step(1000));
    const r = opt.result();
    evals = r.evaluations;
    rules = opt.progress.startTotal;
    stopped = r.stoppedBy;
    gains = `kc ${r.best.gains.kc} ti ${r.best.gains.ti} td ${r.best.gains.td}`;
  }, 3);
  const bareTank = bareTrialMs(tank);
  const sims = evals + rules + 1;
  console.log(
    `  ${optMs.toFixed(0)} ms, ${evals} evaluations + ${rules} start candidates (${stopped}) ${optMs < 1000 ? 'ok' : 'SLOW'}; ` +
      `${sims} bare simulations ${(sims * bareTank).toFixed(0)} ms (ratio ${(optMs / (sims * bareTank)).toFixed(2)}; Ms-rejected probes are not simulated)`,
  );
  console.log(`  result (the same on every run and machine): ${gains}`);

  console.log('robustness sweep on the surge tank (corners + 48 samples)');
  const ctx = tuningContext(tank);
  const plan = planSweep(tank, { samples: 48 }, ctx);
  const sweepMs = timeIt(() => {
    robustnessSweep(tank, tank.loop.controller.gains, { samples: 48, runner: 'sequential' }, ctx, plan);
  }, 3);
  const batchedMs = timeIt(() => {
    robustnessSweep(tank, tank.loop.controller.gains, { samples: 48, runner: 'batched' }, ctx, plan);
  }, 3);
  const perSim = sweepMs / plan.cases.length;
  const hand = handTankMs(tank);
  console.log(`  sequential: ${plan.cases.length} simulations in ${sweepMs.toFixed(0)} ms = ${(1000 / perSim).toFixed(0)} sims/s`);
  console.log(
    `  batched (sim's batch runner): ${batchedMs.toFixed(0)} ms = ${((1000 * plan.cases.length) / batchedMs).toFixed(0)} sims/s ` +
      `(batched/sequential throughput ${(sweepMs / batchedMs).toFixed(2)}x; metrics and margins included; sweep.bench.ts splits them off)`,
  );
  console.log(`  hand-written loop (same plant, PI, limits, filter; no noise, no trace): ${(1000 / hand).toFixed(0)} sims/s (engine/hand time ratio ${(perSim / hand).toFixed(2)})`);
}

if (import.meta.url === pathToFileURL(process.argv[1] ?? '').href) await run();
