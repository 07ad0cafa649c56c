/**
 * Sweep benchmark: simulations per second of the robustness sweep's cases on the surge tank
 * (plants/surge-tank.yaml: corners + 48 samples = 51 cases, 3601 samples each), one runTrial at a
 * time against sim's batch runner, and the whole robustnessSweep (simulations + metrics + margins)
 * with runner 'sequential' against 'batched' and against batched over threads (cli's SweepPool:
 * this thread plus worker threads, os.availableParallelism() in all, plants and prepared cases
 * kept warm in the workers as in a session that sweeps many gain sets). The baseline, measured in the same run, is a
 * hand-written closed loop of the same plant (RK4, PI with clamping, valve limits and rate limit,
 * first-order sensor filter; no noise, no trace), as in tune.bench.ts.
 *
 * Timing: rounds interleaved so that drift and other load hit every contender alike; the figure
 * is the best round (least disturbed), the median is shown beside it.
 *
 * Run: `npx tsx test/bench/sweep.bench.ts` or `npm run bench -- sweep`.
 */
import { readFileSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';
import { Worker } from 'node:worker_threads';
import { buildController } from '../../src/control/index.js';
import type { PlantSpec } from '../../src/model/types.js';
import { runTrial, runTrialBatch } from '../../src/sim/index.js';
import { load } from './bundled-plants.js';
import { handTank } from './hand-tank-loop.js';
import { SweepPool } from '../../src/cli/parallel-sweep.js';
import { planSweep, robustnessSweep, tuningContext } from '../../src/tune/index.js';

const root = join(dirname(fileURLToPath(import.meta.url)), '..', '..');

interface Contender {
  name: string;
  /** Simulations done by one call. */
  sims: number;
  run: () => unknown;
}

const SPIN = 'let s = 0; for (let i = 0; i < 1e8; i++) s += Math.sqrt(i);';

/**
 * What a second thread can give on this machine right now (others share its cores): the same
 * arithmetic loop once alone, then in this thread and a worker at once; 2 = a free second core.
 */
async function threadScaling(): Promise<number> {
  const spin = new Function(`${SPIN} return s;`) as () => number;
  spin();
  let t = performance.now();
  spin();
  const alone = performance.now() - t;
  const w = new Worker(
    `const { parentPort } = require('node:worker_threads'); parentPort.postMessage(0); parentPort.on('message', () => { ${SPIN} parentPort.postMessage(s); });`,
    { eval: true },
  );
  await new Promise((resolve) => w.once('message', resolve)); // started (not timed)
  t = performance.now();
  const done = new Promise((resolve) => w.once('message', resolve));
  w.postMessage(0);
  spin();
  await done;
  const both = performance.now() - t;
  await w.terminate();
  return (2 * alone) / both;
}

/**
 * Best and median simulations per second of each contender over interleaved rounds. Every call is
 * awaited (the pool's return a promise; awaiting a plain value costs a microtask, nothing next to
 * a sweep of tens of ms).
 */
async function measure(cs: Contender[], rounds: number, minMs: number): Promise<Map<string, { best: number; median: number }>> {
  for (const c of cs) for (let i = 0; i < 3; i++) await c.run();
  const rates = new Map<string, number[]>(cs.map((c) => [c.name, []]));
  for (let r = 0; r < rounds; r++) {
    for (const c of cs) {
      let n = 0;
      const t0 = performance.now();
      let t = t0;
      while (t - t0 < minMs) {
        await c.run();
        n++;
        t = performance.now();
      }
      (rates.get(c.name) as number[]).push((n * c.sims * 1000) / (t - t0));
    }
  }
  const out = new Map<string, { best: number; median: number }>();
  for (const [name, xs] of rates) {
    const s = [...xs].sort((a, b) => a - b);
    out.set(name, { best: s[s.length - 1], median: s[s.length >> 1] });
  }
  return out;
}

export async function run(): Promise<void> {
  const tank = load(join(root, 'plants', 'surge-tank.yaml'));
  const ctx = tuningContext(tank);
  const options = { samples: 48 };
  const plan = planSweep(tank, options, ctx);
  const n = plan.cases.length;
  const gains = tank.loop.controller.gains;
  const { extension: _e, named: _n, ...plain } = tank.loop.controller;
  const controller = () => buildController(plain, tank.loop.sampleTime);
  const hand = handTank(tank);
  let sink = 0;

  const first = performance.now();
  robustnessSweep(tank, gains, { ...options, runner: 'batched' }, ctx, plan);
  const coldBatched = performance.now() - first;

  const rates = await measure(
    [
      { name: 'hand', sims: 1, run: () => (sink += hand()) },
      {
        name: 'runTrial',
        sims: n,
        run: () => {
          for (const c of plan.cases) sink += runTrial(c.ctx.dynamics, controller(), c.ctx.loop, c.ctx.trial).steps;
        },
      },
      {
        name: 'batch',
        sims: n,
        run: () => {
          const members = plan.cases.map((c) => ({ plant: c.ctx.dynamics, controller: controller(), loop: c.ctx.loop }));
          sink += runTrialBatch(members, ctx.trial).results.length;
        },
      },
      { name: 'sweepSeq', sims: n, run: () => (sink += robustnessSweep(tank, gains, { ...options, runner: 'sequential' }, ctx, plan).cases.length) },
      { name: 'sweepBatch', sims: n, run: () => (sink += robustnessSweep(tank, gains, { ...options, runner: 'batched' }, ctx, plan).cases.length) },
    ],
    7,
    250,
  );
  if (!Number.isFinite(sink)) throw new Error('benchmark result not finite');
  const r = (k: string): { best: number; median: number } => rates.get(k) as { best: number; median: number };
  const fmt = (k: string): string => `${r(k).best.toFixed(0).padStart(6)} sims/s (median ${r(k).median.toFixed(0)})`;
  const hb = r('hand').best;
  console.log(`robustness sweep cases on the surge tank: ${n} simulations of ${tank.loop.trial.duration / tank.loop.sampleTime + 1} samples`);
  console.log(`  hand-written loop (no noise, no trace)      ${fmt('hand')}`);
  console.log(`  simulations, runTrial one at a time          ${fmt('runTrial')}   hand/this ${(hb / r('runTrial').best).toFixed(2)}x`);
  console.log(`  simulations, runTrialBatch (batched)         ${fmt('batch')}   hand/this ${(hb / r('batch').best).toFixed(2)}x`);
  console.log(`    batched / sequential simulations: ${(r('batch').best / r('runTrial').best).toFixed(2)}x (median ${(r('batch').median / r('runTrial').median).toFixed(2)}x)`);
  console.log(`  whole sweep (+ metrics + margins), sequential ${fmt('sweepSeq')}`);
  console.log(`  whole sweep (+ metrics + margins), batched    ${fmt('sweepBatch')}`);
  console.log(`    batched / sequential sweep: ${(r('sweepBatch').best / r('sweepSeq').best).toFixed(2)}x (median ${(r('sweepBatch').median / r('sweepSeq').median).toFixed(2)}x)`);
  console.log(
    `    simulation share of the batched sweep (its simulations alone / the whole sweep): ${((100 * r('sweepBatch').best) / r('batch').best).toFixed(0)} %` +
      ` (median ${((100 * r('sweepBatch').median) / r('batch').median).toFixed(0)} %; target >= 40 %)`,
  );
  console.log(`  first batched sweep in this process (generated code compiled): ${coldBatched.toFixed(0)} ms`);

  // Whole sweeps again, the pool beside them. The in-process sweeps get the prepared plan; the
  // pool's threads keep their prepared cases after the warm-up, so all three skip preparation.
  const file = join(root, 'plants', 'surge-tank.yaml');
  const source = { text: readFileSync(file, 'utf8'), fileName: file };
  const pool = new SweepPool();
  try {
    const before = await threadScaling();
    const t0 = performance.now();
    await pool.sweep(source, gains, options);
    const coldPool = performance.now() - t0;
    const w = await measure(
      [
        { name: 'seq', sims: n, run: () => (sink += robustnessSweep(tank, gains, { ...options, runner: 'sequential' }, ctx, plan).cases.length) },
        { name: 'batch', sims: n, run: () => (sink += robustnessSweep(tank, gains, { ...options, runner: 'batched' }, ctx, plan).cases.length) },
        { name: 'pool', sims: n, run: async () => (sink += (await pool.sweep(source, gains, options)).cases.length) },
      ],
      7,
      250,
    );
    const q = (k: string): { best: number; median: number } => w.get(k) as { best: number; median: number };
    console.log(
      `  whole sweep sims/s: sequential ${q('seq').best.toFixed(0)} vs batched ${q('batch').best.toFixed(0)} vs batched+workers (${pool.jobs} threads) ${q('pool').best.toFixed(0)}` +
        ` (medians ${q('seq').median.toFixed(0)} / ${q('batch').median.toFixed(0)} / ${q('pool').median.toFixed(0)})`,
    );
    console.log(
      `    ratio to sequential: batched ${(q('batch').best / q('seq').best).toFixed(2)}x, batched+workers ${(q('pool').best / q('seq').best).toFixed(2)}x` +
        ` (median ${(q('pool').median / q('seq').median).toFixed(2)}x); first pool sweep (workers started, plant loaded) ${coldPool.toFixed(0)} ms`,
    );
    const after = await threadScaling();
    console.log(`    two-thread scaling of a plain arithmetic loop on this machine now: ${before.toFixed(2)}x before, ${after.toFixed(2)}x after (2 = a free second core)`);
  } finally {
    await pool.close();
  }
  if (!Number.isFinite(sink)) throw new Error('benchmark result not finite');
}

if (import.meta.url === pathToFileURL(process.argv[1] ?? '').href) await run();
