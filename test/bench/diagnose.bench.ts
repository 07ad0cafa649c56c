/**
 * `looprig diagnose` benchmark.
 *
 * 1. Wall time of `diagnosePlant` on every bundled plant (operating point, linearisation, poles
 *    and zeros, step fit for ode plants, frequency grid, margins, trial simulation, flags).
 *    Target: under 100 ms each. The same call without the trial simulation is shown beside it.
 * 2. Margin recomputation per gain edit (what the terminal screen does on every key press):
 *    `loopMargins` on the precomputed plant response. Target: under 5 ms.
 *    Baseline, hand-written and measured in the same run on the same edits: the naive way,
 *    evaluating the plant on a fresh grid for every edit (`plantFrequencyResponse` + `loopMargins`).
 *
 * Run: `npx tsx test/bench/diagnose.bench.ts` or `npm run bench -- diagnose`.
 */
import { pointFigures, worstMargins } from '../../src/loop/index.js';
import { pathToFileURL } from 'node:url';
import { loopMargins, plantFrequencyResponse } from '../../src/analysis/index.js';
import { diagnosePlant } from '../../src/diagnose/index.js';
import type { GainSet } from '../../src/model/types.js';
import { median } from './median.js';
import { bundledPlants } from './bundled-plants.js';

export async function run(): Promise<void> {
  const REPEATS = 5;
  const EDITS = 200;
  console.log('plant                          diagnose   (no trial)   grid pts   per edit   naive per edit   ratio');
  let worstDiagnose = 0;
  let worstEdit = 0;
  for (const { spec } of bundledPlants()) {
    diagnosePlant(spec); // warm-up: code generation and JIT
    const full: number[] = [];
    const bare: number[] = [];
    let d = diagnosePlant(spec);
    for (let r = 0; r < REPEATS; r++) {
      let t = performance.now();
      d = diagnosePlant(spec);
      full.push(performance.now() - t);
      t = performance.now();
      diagnosePlant(spec, { simulate: false });
      bare.push(performance.now() - t);
    }
    const tFull = median(full);
    worstDiagnose = Math.max(worstDiagnose, tFull);
    let perEdit = NaN;
    let naive = NaN;
    const resp = d.points.find((p) => p.response !== null)?.response ?? null;
    if (resp !== null && d.linear !== null) {
      const base: GainSet = spec.loop.controller.gains;
      const h = spec.loop.sampleTime;
      const edits: GainSet[] = [];
      for (let i = 0; i < EDITS; i++) edits.push({ ...base, kc: base.kc * (1 + 0.002 * (i - EDITS / 2)), ti: base.ti * (1 + 0.001 * i) });
      const gridOptions = { wMax: h > 0 ? Math.PI / h : undefined, extraDelay: spec.sensor.delay };
      for (const g of edits.slice(0, 20)) {
        worstMargins(pointFigures(d.points, g, spec)); // warm-up
        loopMargins(plantFrequencyResponse(d.linear, gridOptions), g, h, spec.sensor);
      }
      let sink = 0;
      const cached: number[] = [];
      const fresh: number[] = [];
      // Same edits for both, three rounds each, the best round counted (least disturbed by other load).
      for (let round = 0; round < 3; round++) {
        let t = performance.now();
        // Per edit on the screen: the margins at every operating point, the worst of each kept.
        for (const g of edits) sink += worstMargins(pointFigures(d.points, g, spec))!.maxSensitivity;
        cached.push((performance.now() - t) / EDITS);
        t = performance.now();
        for (const g of edits) sink += loopMargins(plantFrequencyResponse(d.linear, gridOptions), g, h, spec.sensor).maxSensitivity;
        fresh.push((performance.now() - t) / EDITS);
      }
      perEdit = Math.min(...cached);
      naive = Math.min(...fresh);
      if (!Number.isFinite(sink)) console.log('  (non-finite Ms in the sweep)');
      worstEdit = Math.max(worstEdit, perEdit);
    }
    console.log(
      `${spec.name.padEnd(30)} ${tFull.toFixed(1).padStart(6)} ms ${median(bare).toFixed(1).padStart(8)} ms ${String(resp?.w.length ?? '-').padStart(10)} ` +
        `${perEdit.toFixed(3).padStart(7)} ms ${naive.toFixed(3).padStart(12)} ms ${(naive / perEdit).toFixed(1).padStart(7)}x`,
    );
  }
  console.log(`worst diagnose ${worstDiagnose.toFixed(1)} ms (target < 100 ms); worst margin update per edit ${worstEdit.toFixed(3)} ms (target < 5 ms)`);
}

if (import.meta.url === pathToFileURL(process.argv[1] ?? '').href) await run();
