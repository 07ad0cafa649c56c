/**
 * Large-plant benchmark: time per state per integration step of an n-state chain of lags (the
 * plant is generated here: x1' = (k·(u + load) − x1)/tau, xi' = (x(i−1) − xi)/tau) at n = 16, 64,
 * 128 and 256, through the generated one-loop stepper and through the batch runner (a PI loop,
 * four gain sets, as the robustness sweep runs them). The baseline, measured in the same run, is
 * the 16-state chain: a generated function that small is optimised by V8, so the ratio says
 * whether a large plant still gets the same per-state speed (target ≤ 1.5×).
 *
 * Timing: rounds interleaved, best round reported (least disturbed by other load).
 *
 * Run: `npx tsx test/bench/large-plant.bench.ts` or `npm run bench -- large-plant`.
 */
import { pathToFileURL } from 'node:url';
import { readFileSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';
import { rationalEvaluator } from '../../src/analysis/index.js';
import { PidController } from '../../src/control/index.js';
import { solveComplexInPlace } from '../../src/num/index.js';
import type { GainSet } from '../../src/model/types.js';
import { chainPlant } from '../sim/hand-plants.js';
import { loopConfig, trial as trialSpec } from '../sim/loops.js';
import { generateStepper, runTrialBatch, type BatchMember } from '../../src/sim/index.js';

const EMPTY = new Float64Array(0);
const PI: GainSet = { kc: 0.3, ti: 16, td: 0, n: 10, b: 1, c: 0, antiWindup: 'clamp', trackingTime: NaN };

interface Runner {
  name: string;
  n: number;
  /** Integration steps of one plant done by one call (all loops counted). */
  steps: number;
  run: () => number;
}

/** Best ns per state-step of each runner over interleaved rounds (load hits every size alike). */
function measure(runners: Runner[], rounds: number): Map<string, number> {
  const best = new Map<string, number>();
  let sink = 0;
  for (const r of runners) sink += r.run(); // compile and warm up
  for (let k = 0; k < rounds; k++) {
    for (const r of runners) {
      const t0 = performance.now();
      sink += r.run();
      const ns = ((performance.now() - t0) * 1e6) / (r.n * r.steps);
      best.set(r.name, Math.min(best.get(r.name) ?? Infinity, ns));
    }
  }
  if (!Number.isFinite(sink)) throw new Error('result not finite');
  return best;
}

export async function run(): Promise<void> {
  const sizes = [16, 64, 128, 256];
  const runners: Runner[] = [];
  for (const n of sizes) {
    const dynamics = chainPlant(n);
    const stepper = generateStepper(dynamics, 'rk4');
    const x = new Float64Array(n);
    const steps = Math.round(1e7 / n);
    runners.push({
      name: `one ${n}`,
      n,
      steps,
      run: () => {
        x.fill(0.5);
        stepper(x, dynamics.params, dynamics.d0, 1, EMPTY, 0, EMPTY, 0, 0, 0.01, steps);
        return x[n - 1];
      },
    });

    const loop = loopConfig(1, 0.01);
    const members: BatchMember[] = [0.2, 0.25, 0.3, 0.35].map((kc) => ({
      plant: dynamics,
      controller: new PidController({ ...PI, kc, ti: n }, { sampleTime: 1, outputMin: -Infinity, outputMax: Infinity }),
      loop,
    }));
    const trial = trialSpec(40, [{ kind: 'setpoint', at: 1, value: 1 }]);
    const res = runTrialBatch(members, trial);
    if (!res.batched.every(Boolean)) throw new Error(`not batched: ${res.notes.join('; ')}`);
    const batchSteps = res.results.reduce((s, r) => s + r.steps, 0);
    const reps = Math.max(1, Math.round(1e7 / (n * batchSteps)));
    runners.push({
      name: `batch ${n}`,
      n,
      steps: batchSteps * reps,
      run: () => {
        let s = 0;
        for (let i = 0; i < reps; i++) s += runTrialBatch(members, trial).results[0].trace.y[10];
        return s;
      },
    });
  }
  const best = measure(runners, 7);
  console.log('n-state chain of lags, RK4: ns per state per integration step (best of 7 interleaved rounds)');
  const at = (k: string): number => best.get(k) ?? NaN;
  for (const n of sizes) {
    const s = at(`one ${n}`);
    const b = at(`batch ${n}`);
    console.log(
      `  n = ${String(n).padStart(3)}   one loop ${s.toFixed(2).padStart(7)} ns (${(s / at('one 16')).toFixed(2)}x n=16)` +
        `   batched ${b.toFixed(2).padStart(7)} ns (${(b / at('batch 16')).toFixed(2)}x n=16)`,
    );
  }
  console.log('  target: n = 256 within 1.5x of n = 16 in both columns');
  frequencyResponse();
}

/**
 * One frequency point of the 64-state dense model of test/fixtures/reference/large-model-response
 * through the evaluator (Hessenberg form, reduced once) against the dense complex solve per point
 * it replaced (the same arithmetic as freq-response.ts uses below HESSENBERG_STATES).
 */
function frequencyResponse(): void {
  const here = dirname(fileURLToPath(import.meta.url));
  const ref = JSON.parse(readFileSync(join(here, '../fixtures/reference/large-model-response.json'), 'utf8')) as {
    models: Record<string, { a: number[]; b: number[]; c: number[]; d: number }>;
  };
  const m = ref.models.dense;
  const n = m.b.length;
  const model = { nx: n, a: Float64Array.from(m.a), b: Float64Array.from(m.b), c: Float64Array.from(m.c), d: m.d, delay: 0 };
  const out = new Float64Array(2);
  const ar = new Float64Array(n * n);
  const ai = new Float64Array(n * n);
  const br = new Float64Array(n);
  const bi = new Float64Array(n);
  const points = 400;
  const ws = Array.from({ length: points }, (_v, i) => 1e-3 * 1e5 ** (i / (points - 1)));
  const denseRun = (): number => {
    let s = 0;
    for (const w of ws) {
      for (let i = 0; i < n * n; i++) {
        ar[i] = -model.a[i];
        ai[i] = 0;
      }
      for (let i = 0; i < n; i++) {
        ai[i * n + i] = w;
        br[i] = model.b[i];
        bi[i] = 0;
      }
      solveComplexInPlace(ar, ai, n, br, bi);
      for (let i = 0; i < n; i++) s += model.c[i] * br[i];
    }
    return s;
  };
  const hessRun = (): number => {
    // The reduction is part of every run: one per model, as a sweep case pays it.
    const ev = rationalEvaluator(model);
    let s = 0;
    for (const w of ws) {
      ev(w, out);
      s += out[0];
    }
    return s;
  };
  const best = { dense: Infinity, hess: Infinity };
  for (let r = 0; r < 9; r++) {
    let t0 = performance.now();
    denseRun();
    best.dense = Math.min(best.dense, (performance.now() - t0) / points);
    t0 = performance.now();
    hessRun();
    best.hess = Math.min(best.hess, (performance.now() - t0) / points);
  }
  console.log(`frequency response of a 64-state dense model, ${points} points (best of 9)`);
  console.log(`  dense solve per point   ${(best.dense * 1000).toFixed(1).padStart(7)} µs`);
  console.log(`  Hessenberg (+ reduction) ${(best.hess * 1000).toFixed(1).padStart(6)} µs   dense/this ${(best.dense / best.hess).toFixed(1)}x`);
}

if (import.meta.url === pathToFileURL(process.argv[1] ?? '').href) await run();
