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
import { readdirSync, readFileSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';
import { buildController } from '../../src/control/index.js';
import { loadPlant } from '../../src/model/index.js';
import type { PlantSpec } from '../../src/model/types.js';
import { runTrial } from '../../src/sim/index.js';
import { optimizeGains, planSweep, robustnessSweep, suggestGains, tuningContext } from '../../src/tune/index.js';

const root = join(dirname(fileURLToPath(import.meta.url)), '..', '..');

function load(path: string): PlantSpec {
  const r = loadPlant(readFileSync(path, 'utf8'), path);
  if (!r.plant) throw new Error(`${path} does not load`);
  return r.plant;
}

function median(xs: number[]): number {
  const s = [...xs].sort((a, b) => a - b);
  return s[s.length >> 1];
}

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
  const m = spec.model;
  if (m.type !== 'ode') throw new Error('surge tank expected');
  const area = m.params.area;
  const qmax = m.params.max_inflow;
  const c = m.params.drain_coeff;
  const ts = spec.loop.sampleTime;
  const g = spec.loop.controller.gains;
  const tf = spec.sensor.filterTime;
  const rate = spec.actuator.rateLimit;
  const rows = Math.ceil(spec.loop.trial.duration / ts) + 1;
  const y = new Float64Array(rows);
  const f = (lv: number, u: number, q: number): number => (qmax * u + q - c * Math.sqrt(Math.max(lv, 0))) / area;
  const run = (): void => {
    let h = 1;
    let u = 0.5;
    let ym = 1;
    let integ = 0.5;
    let r = 1;
    const af = Math.exp(-ts / tf);
    for (let k = 0; k < rows; k++) {
      const t = k * ts;
      r = t >= 60 && t < 2520 ? 1.3 : 1;
      const q = t >= 1500 ? 0.0015 : 0;
      ym = af * ym + (1 - af) * h;
      const e = r - ym;
      let uc = g.kc * e + integ;
      uc = Math.min(Math.max(uc, 0), 1);
      const du = Math.min(Math.max(uc - u, -rate * ts), rate * ts);
      u += du;
      if (u > 0 && u < 1) integ += (g.kc * ts * e) / g.ti;
      y[k] = h;
      // one RK4 step of h' = (qmax u + q - c sqrt(h))/area over the sample
      const k1 = f(h, u, q);
      const k2 = f(h + 0.5 * ts * k1, u, q);
      const k3 = f(h + 0.5 * ts * k2, u, q);
      const k4 = f(h + ts * k3, u, q);
      h += (ts / 6) * (k1 + 2 * (k2 + k3) + k4);
    }
  };
  return timeIt(run, 21);
}

export async function run(): Promise<void> {
  const dir = join(root, 'plants');
  const files = readdirSync(dir).filter((f) => f.endsWith('.yaml')).sort();
  console.log('suggest on every bundled plant (target < 300 ms each)');
  for (const f of files) {
    const spec = load(join(dir, f));
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

  const tank = load(join(dir, 'surge-tank.yaml'));
  console.log('optimize on the surge tank (target < 2 s)');
  let evals = 0;
  let stopped = '';
  const optMs = timeIt(() => {
    const r = optimizeGains(tank, { timeBudgetMs: 60_000 });
    evals = r.evaluations;
    stopped = r.stoppedBy;
  }, 1);
  const bareTank = bareTrialMs(tank);
  console.log(
    `  ${optMs.toFixed(0)} ms, ${evals} evaluations (${stopped}) ${optMs < 2000 ? 'ok' : 'SLOW'}; ` +
      `${evals} bare simulations ${(evals * bareTank).toFixed(0)} ms (ratio ${(optMs / (evals * bareTank)).toFixed(2)})`,
  );

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
