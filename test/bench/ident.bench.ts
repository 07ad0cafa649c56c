/**
 * ident benchmark: a day-long log at 1 Hz (90 000 rows) with a bump test in it.
 * Reports the CSV parse time against a naive split-based parser, and the time of
 * `--model auto` (all four families) against one plain FOPDT cost evaluation loop over the
 * same samples (so the ratio reads as "costs as many as N hand-written evaluations").
 * Then, on 20 000-row logs: the grey-box fit of two tank parameters (against one hand-written RK4
 * simulation of the tank over the log) and the closed-loop fit (against one plain FOPDT cost loop).
 */
import { readFileSync } from 'node:fs';
import { fitClosedLoop, fitPlantParameters, identify, prepareBumpData, readCsv } from '../../src/ident/index.js';
import type { BumpData } from '../../src/ident/index.js';
import { compilePlant, loadPlant } from '../../src/model/index.js';
import { Rng } from '../../src/num/index.js';
import { closedLoopLog } from '../ident/closed-loop-log.js';
import { gravityTankLog } from '../ident/gravity-tank-log.js';

function makeLog(rows: number): string {
  const rng = new Rng(7);
  const K = 1.8;
  const T = 600;
  const theta = 45;
  const lines = ['time,valve,level'];
  const step = (s: number): number => (s < theta ? 0 : K * (1 - Math.exp(-(s - theta) / T)));
  for (let k = 0; k < rows; k++) {
    const u = k >= 3600 && k < 43200 ? 45 : 40;
    const y = 2 + 5 * step(k - 3600) - 5 * step(k - 43200) + 0.02 * rng.nextGaussian();
    lines.push(`${k},${u},${y.toFixed(5)}`);
  }
  return lines.join('\n') + '\n';
}

function best(times: number[]): number {
  return Math.min(...times);
}

export async function run(): Promise<void> {
  const rows = 90000;
  const text = makeLog(rows);
  const opts = { time: 'time', columns: ['valve', 'level'] };

  const parse: number[] = [];
  let table = readCsv(text, opts).table!;
  for (let i = 0; i < 5; i++) {
    const t0 = performance.now();
    table = readCsv(text, opts).table!;
    parse.push(performance.now() - t0);
  }
  // Baseline: split lines, split cells, Number() each; no checks, no positions, no diagnostics.
  const naive: number[] = [];
  let sink = 0;
  for (let i = 0; i < 5; i++) {
    const t0 = performance.now();
    const out = text.split('\n').slice(1).filter((l) => l !== '').map((l) => l.split(',').map(Number));
    sink += out.length;
    naive.push(performance.now() - t0);
  }
  const p = best(parse);
  const q = best(naive);
  console.log(`csv parse, ${rows} rows: ${p.toFixed(1)} ms (naive split parser ${q.toFixed(1)} ms, ratio ${(p / q).toFixed(2)})`);

  const data = prepareBumpData(table, { input: 'valve', output: 'level' }).data!;
  const fits: number[] = [];
  let chosen = '';
  for (let i = 0; i < 3; i++) {
    const t0 = performance.now();
    const res = identify(data);
    fits.push(performance.now() - t0);
    chosen = `${res.models[res.chosen].fit.kind} (K ${res.models[res.chosen].fit.values[0].toPrecision(4)}, T ${res.models[res.chosen].fit.values[1].toPrecision(4)} s)`;
  }
  // Baseline: one hand-written FOPDT cost evaluation (exact recursion, whole-sample delay).
  const evals: number[] = [];
  for (let i = 0; i < 20; i++) {
    const t0 = performance.now();
    const a = Math.exp(-1 / 600);
    let x = 0;
    let sse = 0;
    for (let k = 0; k < data.n; k++) {
      const r = 2 + x - data.y[k];
      sse += r * r;
      const uk = k >= 45 ? data.u[k - 45] - 40 : 0;
      x = a * x + (1 - a) * 1.8 * uk;
    }
    sink += sse;
    evals.push(performance.now() - t0);
  }
  const e = best(evals);
  console.log(
    `fit --model auto, ${data.n} samples: first run ${fits[0].toFixed(0)} ms, best ${best(fits).toFixed(0)} ms (target < 2000 ms); ` +
      `one plain FOPDT cost loop ${e.toFixed(2)} ms, ratio ${(best(fits) / e).toFixed(0)}; chose ${chosen}`,
  );
  sink += greyBoxAndClosedLoop();
  if (sink === 42) console.log('');
}

function loadLog(csv: string, columns: string[], input: string, output: string): { data: BumpData; table: ReturnType<typeof readCsv>['table'] } {
  const table = readCsv(csv, { time: 'time', columns }).table!;
  return { data: prepareBumpData(table, { input, output }).data!, table };
}

/** Grey-box (two tank parameters) and closed-loop fits on 20 000-row logs, each against a hand baseline. */
function greyBoxAndClosedLoop(): number {
  const rows = 20000;
  const dt = 5;
  const levels = [0.5, 0.6, 0.4, 0.55];
  const tank = gravityTankLog({ area: 1.5, drainCoeff: 0.004, maxInflow: 0.008, dt, n: rows, noise: 0.002, seed: 9, valve: (k) => levels[Math.floor((k * dt) / 1500) % 4] });
  const spec = loadPlant(readFileSync('test/fixtures/plants/gravity-tank.yaml', 'utf8'), 'gravity-tank.yaml').plant!;
  const dynamics = compilePlant(spec);
  const { data } = loadLog(tank.csv, ['valve', 'level'], 'valve', 'level');
  const grey: number[] = [];
  let result = '';
  for (let i = 0; i < 3; i++) {
    const t0 = performance.now();
    const fit = fitPlantParameters(spec, dynamics, data, ['area', 'drain_coeff']);
    grey.push(performance.now() - t0);
    result = `area ${fit.parameters[0].value.toPrecision(5)}, drain_coeff ${fit.parameters[1].value.toPrecision(5)}, ${fit.evaluations} simulations`;
  }
  // Baseline: one hand-written RK4 simulation of the tank over the log (one substep per sample).
  const hand: number[] = [];
  let sink = 0;
  for (let i = 0; i < 20; i++) {
    const t0 = performance.now();
    let h = 1;
    let sse = 0;
    const f = (x: number, v: number): number => (0.008 * v - 0.004 * Math.sqrt(Math.max(x, 0))) / 1.5;
    for (let k = 0; k < data.n; k++) {
      const r = h - data.y[k];
      sse += r * r;
      const v = data.u[k];
      const k1 = f(h, v);
      const k2 = f(h + 0.5 * dt * k1, v);
      const k3 = f(h + 0.5 * dt * k2, v);
      const k4 = f(h + dt * k3, v);
      h += (dt / 6) * (k1 + 2 * k2 + 2 * k3 + k4);
    }
    sink += sse;
    hand.push(performance.now() - t0);
  }
  const g = best(grey);
  const b = best(hand);
  console.log(`grey-box fit of 2 params, ${data.n} rows: first run ${grey[0].toFixed(0)} ms, best ${g.toFixed(0)} ms (target < 2000 ms); one hand RK4 tank simulation ${b.toFixed(2)} ms, ratio ${(g / b).toFixed(0)}; ${result}`);

  const cl = closedLoopLog({
    K: 2, T: 20, m: 8, dt: 0.5, n: rows, kc: 0.833, ti: 20, noise: 0.02, seed: 9, u0: 50, y0: 10,
    setpoint: (t) => (Math.floor(t / 500) % 2 === 0 ? 10 : 11),
  });
  const loop = loadLog(cl.csv, ['sp', 'op', 'pv'], 'op', 'pv');
  const sp = Float64Array.from(loop.table!.columns.sp);
  const closed: number[] = [];
  let clResult = '';
  for (let i = 0; i < 3; i++) {
    const t0 = performance.now();
    const fit = fitClosedLoop(loop.data, sp);
    closed.push(performance.now() - t0);
    clResult = `${fit.kind}: ${fit.parameters.filter((p) => p.name !== 'level').map((p) => `${p.name} ${p.value.toPrecision(4)}`).join(', ')}`;
  }
  const evals: number[] = [];
  for (let i = 0; i < 20; i++) {
    const t0 = performance.now();
    const a = Math.exp(-0.5 / 20);
    let x = 0;
    let sse = 0;
    const d = loop.data;
    for (let k = 0; k < d.n; k++) {
      const r = 10 + x - d.y[k];
      sse += r * r;
      const uk = k >= 8 ? d.u[k - 8] - 50 : 0;
      x = a * x + (1 - a) * 2 * uk;
    }
    sink += sse;
    evals.push(performance.now() - t0);
  }
  const c = best(closed);
  const e = best(evals);
  console.log(`closed-loop fit (all families, then the noise model), ${loop.data.n} rows: first run ${closed[0].toFixed(0)} ms, best ${c.toFixed(0)} ms (target < 2000 ms); one plain FOPDT cost loop ${e.toFixed(3)} ms, ratio ${(c / e).toFixed(0)}; ${clResult}`);
  return sink;
}

if (import.meta.url === `file://${process.argv[1]}`) await run();
