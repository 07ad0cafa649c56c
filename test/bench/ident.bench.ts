/**
 * ident benchmark: a day-long log at 1 Hz (90 000 rows) with a bump test in it.
 * Reports the CSV parse time against a naive split-based parser, and the time of
 * `--model auto` (all four families) against one plain FOPDT cost evaluation loop over the
 * same samples (so the ratio reads as "costs as many as N hand-written evaluations").
 */
import { identify, prepareBumpData, readCsv } from '../../src/ident/index.js';
import { Rng } from '../../src/num/index.js';

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
  if (sink === 42) console.log('');
}

if (import.meta.url === `file://${process.argv[1]}`) await run();
