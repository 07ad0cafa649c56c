/**
 * Engine benchmark: integration steps per second of the generated steppers against hand-written,
 * hand-unrolled RK4 loops of the same equations measured in the same run, plus a generic array
 * stepper for context, and a 100-million-step trial with its peak resident memory.
 *
 * Run: `npx tsx test/bench/engine.bench.ts` or `npm run bench -- engine`.
 */
import { execFileSync } from 'node:child_process';
import { fileURLToPath, pathToFileURL } from 'node:url';
import { compilePlant, loadPlant } from '../../src/model/index.js';
import { generateStepper, runTrial, type PlantDynamics, type StepFunction } from '../../src/sim/index.js';
import { ConstantController } from '../sim/controllers.js';
import * as H from '../sim/hand-plants.js';
import { loopConfig, trial } from '../sim/loops.js';

const EMPTY = new Float64Array(0);

// ------------------------------------------------------------------ hand-written baselines

/** Tank, RK4 unrolled by hand: A h' = qmax u + q − c sqrt(max(h, 0)). */
function handTank(x: Float64Array, p: Float64Array, d: Float64Array, u: number, h: number, n: number): void {
  const invA = 1 / p[0];
  const c = p[1];
  const inflow = p[2] * u + d[0];
  const h2 = 0.5 * h;
  const h6 = h / 6;
  let lv = x[0];
  for (let i = 0; i < n; i++) {
    const k1 = (inflow - c * Math.sqrt(Math.max(lv, 0))) * invA;
    const k2 = (inflow - c * Math.sqrt(Math.max(lv + h2 * k1, 0))) * invA;
    const k3 = (inflow - c * Math.sqrt(Math.max(lv + h2 * k2, 0))) * invA;
    const k4 = (inflow - c * Math.sqrt(Math.max(lv + h * k3, 0))) * invA;
    lv += h6 * (k1 + 2 * (k2 + k3) + k4);
  }
  x[0] = lv;
}

/** Four lags in series, RK4 unrolled by hand. */
function handChain(x: Float64Array, p: Float64Array, d: Float64Array, u: number, h: number, n: number): void {
  const it = 1 / p[1];
  const drive = p[0] * (u + d[0]);
  const h2 = 0.5 * h;
  const h6 = h / 6;
  let a = x[0];
  let b = x[1];
  let c = x[2];
  let e = x[3];
  for (let i = 0; i < n; i++) {
    const a1 = (drive - a) * it;
    const b1 = (a - b) * it;
    const c1 = (b - c) * it;
    const e1 = (c - e) * it;
    const a2s = a + h2 * a1;
    const b2s = b + h2 * b1;
    const c2s = c + h2 * c1;
    const e2s = e + h2 * e1;
    const a2 = (drive - a2s) * it;
    const b2 = (a2s - b2s) * it;
    const c2 = (b2s - c2s) * it;
    const e2 = (c2s - e2s) * it;
    const a3s = a + h2 * a2;
    const b3s = b + h2 * b2;
    const c3s = c + h2 * c2;
    const e3s = e + h2 * e2;
    const a3 = (drive - a3s) * it;
    const b3 = (a3s - b3s) * it;
    const c3 = (b3s - c3s) * it;
    const e3 = (c3s - e3s) * it;
    const a4s = a + h * a3;
    const b4s = b + h * b3;
    const c4s = c + h * c3;
    const e4s = e + h * e3;
    const a4 = (drive - a4s) * it;
    const b4 = (a4s - b4s) * it;
    const c4 = (b4s - c4s) * it;
    const e4 = (c4s - e4s) * it;
    a += h6 * (a1 + 2 * (a2 + a3) + a4);
    b += h6 * (b1 + 2 * (b2 + b3) + b4);
    c += h6 * (c1 + 2 * (c2 + c3) + c4);
    e += h6 * (e1 + 2 * (e2 + e3) + e4);
  }
  x[0] = a;
  x[1] = b;
  x[2] = c;
  x[3] = e;
}

/** Generic RK4 over arrays calling the plant's compiled deriv four times per step (context only). */
function genericRk4(plant: PlantDynamics): (x: Float64Array, u: number, h: number, n: number) => void {
  const nx = plant.nx;
  const k1 = new Float64Array(nx);
  const k2 = new Float64Array(nx);
  const k3 = new Float64Array(nx);
  const k4 = new Float64Array(nx);
  const tmp = new Float64Array(nx);
  return (x, u, h, n) => {
    const p = plant.params;
    const d = plant.d0;
    for (let s = 0; s < n; s++) {
      const t = s * h;
      plant.deriv(t, x, u, d, p, k1);
      for (let i = 0; i < nx; i++) tmp[i] = x[i] + 0.5 * h * k1[i];
      plant.deriv(t + 0.5 * h, tmp, u, d, p, k2);
      for (let i = 0; i < nx; i++) tmp[i] = x[i] + 0.5 * h * k2[i];
      plant.deriv(t + 0.5 * h, tmp, u, d, p, k3);
      for (let i = 0; i < nx; i++) tmp[i] = x[i] + h * k3[i];
      plant.deriv(t + h, tmp, u, d, p, k4);
      for (let i = 0; i < nx; i++) x[i] += (h / 6) * (k1[i] + 2 * (k2[i] + k3[i]) + k4[i]);
    }
  };
}

// ------------------------------------------------------------------ plant files

const TANK_YAML = `name: Surge tank level
model:
  type: ode
  params: { area: 2.0, outflow_coeff: 0.5, max_inflow: 1.2 }
  states: { level: { initial: 0.5 } }
  input: valve
  disturbances: { extra_inflow: 0 }
  derivatives:
    level: (max_inflow*valve + extra_inflow - outflow_coeff*sqrt(max(level, 0))) / area
  output: level
loop:
  sample_time: 0.1 s
  controller: { structure: pi, form: ideal, kc: 2, ti: 30 s }
  trial: { duration: 10 s }
`;

const CHAIN_YAML = `name: Four lags
model:
  type: ode
  params: { k: 1, tau: 1 }
  states: { x1: { initial: 0 }, x2: { initial: 0 }, x3: { initial: 0 }, x4: { initial: 0 } }
  input: u
  disturbances: { load: 0 }
  derivatives:
    x1: (k*(u + load) - x1) / tau
    x2: (x1 - x2) / tau
    x3: (x2 - x3) / tau
    x4: (x3 - x4) / tau
  output: x4
loop:
  sample_time: 1 s
  controller: { structure: pi, form: ideal, kc: 1, ti: 3 s }
  trial: { duration: 10 s }
`;

function fromYaml(text: string, name: string): PlantDynamics {
  const loaded = loadPlant(text, name);
  if (loaded.plant === undefined) throw new Error(`${name}: ${loaded.diagnostics.map((d) => d.message).join('; ')}`);
  return compilePlant(loaded.plant);
}

// ------------------------------------------------------------------ timing

type Runner = (steps: number) => number;

/** Best-of-rounds steps/s for each runner, rounds interleaved so drift hits all alike. */
function measure(runners: Record<string, Runner>, steps: number, rounds: number): Record<string, number> {
  const best: Record<string, number> = {};
  let sink = 0;
  for (const name of Object.keys(runners)) sink += runners[name](Math.min(steps, 200000)); // warm up
  for (let r = 0; r < rounds; r++) {
    for (const name of Object.keys(runners)) {
      const t0 = performance.now();
      sink += runners[name](steps);
      const s = (performance.now() - t0) / 1000;
      const rate = steps / s;
      if (!(best[name] >= rate)) best[name] = rate;
    }
  }
  if (!Number.isFinite(sink)) throw new Error('benchmark result not finite');
  return best;
}

function viaStepper(plant: PlantDynamics, stepper: StepFunction, u: number, h: number): Runner {
  const x = Float64Array.from(plant.x0);
  return (n) => {
    x.set(plant.x0);
    stepper(x, plant.params, plant.d0, u, EMPTY, 0, EMPTY, 0, 0, h, n);
    return x[0];
  };
}

function viaHand(plant: PlantDynamics, f: typeof handTank, u: number, h: number): Runner {
  const x = Float64Array.from(plant.x0);
  return (n) => {
    x.set(plant.x0);
    f(x, plant.params, plant.d0, u, h, n);
    return x[0];
  };
}

function viaGeneric(plant: PlantDynamics, u: number, h: number): Runner {
  const x = Float64Array.from(plant.x0);
  const g = genericRk4(plant);
  return (n) => {
    x.set(plant.x0);
    g(x, u, h, n);
    return x[0];
  };
}

const fmt = (v: number): string => `${(v / 1e6).toFixed(1)} M steps/s`;

function report(title: string, rates: Record<string, number>, baseline: string): void {
  console.log(title);
  for (const [name, rate] of Object.entries(rates)) {
    const ratio = rates[baseline] / rate;
    console.log(`  ${name.padEnd(34)} ${fmt(rate).padStart(16)}   time ratio vs ${baseline}: ${ratio.toFixed(2)}x`);
  }
}

export async function run(): Promise<void> {
  const started = performance.now();
  const hTank = H.tank(0.5);
  const yTank = fromYaml(TANK_YAML, 'tank.yaml');
  const tankRates = measure(
    {
      'hand-written RK4': viaHand(hTank, handTank, 0.35, 0.01),
      'generated (hand PlantDynamics)': viaStepper(hTank, generateStepper(hTank, 'rk4'), 0.35, 0.01),
      'generated (YAML -> compilePlant)': viaStepper(yTank, generateStepper(yTank, 'rk4'), 0.35, 0.01),
      'generic RK4 over arrays + deriv()': viaGeneric(yTank, 0.35, 0.01),
    },
    2_000_000,
    7,
  );
  report('gravity-drained tank (1 state, RK4, h = 0.01 s)', tankRates, 'hand-written RK4');

  const hChain = H.chain4(1, 1);
  const yChain = fromYaml(CHAIN_YAML, 'chain.yaml');
  const chainRates = measure(
    {
      'hand-written RK4': viaHand(hChain, handChain, 1, 0.01),
      'generated (hand PlantDynamics)': viaStepper(hChain, generateStepper(hChain, 'rk4'), 1, 0.01),
      'generated (YAML -> compilePlant)': viaStepper(yChain, generateStepper(yChain, 'rk4'), 1, 0.01),
      'generic RK4 over arrays + deriv()': viaGeneric(yChain, 1, 0.01),
    },
    1_000_000,
    7,
  );
  report('4-state linear chain (RK4, h = 0.01 s)', chainRates, 'hand-written RK4');

  // The memory figure needs a process of its own: RSS here includes whatever ran before in this
  // process (other benches under run-all), which says nothing about the engine.
  longRunInFreshProcess();
  console.log(`  whole engine bench ${((performance.now() - started) / 1000).toFixed(1)} s`);
}

/** The 100-million-step run alone, for a fresh process (see longRunInFreshProcess). */
function longRun(): void {
  const yTank = fromYaml(TANK_YAML, 'tank.yaml');
  // 100 million integration steps through the full closed-loop engine: 1e5 samples of 1 s with
  // 1000 steps each. The trace holds 1e5 + 1 rows (one per sample), never one per step.
  const rssBefore = process.memoryUsage().rss;
  const t0 = performance.now();
  const res = runTrial(yTank, new ConstantController(0.35), loopConfig(1, 0.001), trial(100_000, [], 0.5, 0.35));
  const secs = (performance.now() - t0) / 1000;
  const rssAfter = process.memoryUsage().rss;
  const peakRss = process.resourceUsage().maxRSS * 1024;
  console.log('long trial through runTrial (tank from YAML, RK4, h = 1 ms, Ts = 1 s)');
  console.log(`  steps ${res.steps.toLocaleString('en')} in ${secs.toFixed(2)} s = ${fmt(res.steps / secs)}, trace rows ${res.trace.length}, status ${res.status}`);
  console.log(
    `  RSS before ${(rssBefore / 2 ** 20).toFixed(1)} MB, after ${(rssAfter / 2 ** 20).toFixed(1)} MB, ` +
      `process peak (maxRSS) ${(peakRss / 2 ** 20).toFixed(1)} MB (limit 150 MB): ${peakRss < 150 * 2 ** 20 ? 'ok' : 'OVER'}`,
  );
}

function longRunInFreshProcess(): void {
  const out = execFileSync(process.execPath, ['--import', 'tsx/esm', fileURLToPath(import.meta.url)], {
    env: { ...process.env, LOOPRIG_BENCH_LONG_RUN: '1' },
    encoding: 'utf8',
  });
  process.stdout.write(out);
}

if (import.meta.url === pathToFileURL(process.argv[1] ?? '').href) {
  if (process.env.LOOPRIG_BENCH_LONG_RUN === '1') longRun();
  else await run();
}
