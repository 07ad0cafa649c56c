/**
 * Valve benchmark: a flow loop (first-order plant, PI with clamping) through a valve with
 * stiction, a positioner lag and an equal-percentage characteristic.
 * - engine: runTrial on the plant file against the same loop hand-written (one function, locals
 *   only, the same operations per sample and per integration step; no trace), measured in the
 *   same run;
 * - sweep: runTrialBatch over 48 cases of the plant with the valve against the same cases without
 *   stiction, lag and characteristic (the batched sweep's throughput cost of the valve);
 * - the bundled plants/sticky-flow-valve.yaml swept the same way (48 gains across its uncertainty
 *   range): as the file (stiction and lag), with an equal-percentage characteristic added, and
 *   without its valve; then the same with the model made second order (two states, a fairer
 *   denominator than one state: the valve's cost per step is the same, the plant's is larger).
 * Rounds interleaved; the figure is the best round, the median beside it (CPU time, see `time`).
 *
 * Run: `npm run bench -- valve`.
 */
import { readFileSync } from 'node:fs';
import { fileURLToPath, pathToFileURL } from 'node:url';
import { buildLoop } from '../../src/loop/index.js';
import { loadPlant } from '../../src/model/index.js';
import type { PlantSpec } from '../../src/model/types.js';
import { EXP_SERIES_LIMIT, runTrial, runTrialBatch, type BatchMember } from '../../src/sim/index.js';
import { median } from './median.js';

const VALVE = `  stiction: { static: 1.5, dynamic: 0.7 }
  lag: 1 s
  characteristic: equal_percentage
  rangeability: 30
`;

function text(valve: string, gain = 40): string {
  return `name: Flow through a valve
model: { type: first_order, gain: ${gain}, time_constant: 3 s }
actuator:
  min: 0
  max: 100
${valve}loop:
  sample_time: 0.5 s
  step: 0.05 s
  controller: { structure: pi, kc: 0.04, ti: 3 s, anti_windup: clamp }
  trial:
    duration: 1800 s
    initial_output: 50
    initial_setpoint: 900
    events:
      - { at: 30 s, setpoint: 1200 }
      - { at: 900 s, setpoint: 700 }
`;
}

function spec(t: string): PlantSpec {
  const r = loadPlant(t, 'valve.yaml');
  if (!r.plant) throw new Error(r.diagnostics.map((d) => d.message).join('; '));
  return r.plant;
}

/**
 * The same loop written by hand: PI (clamp), limits, stiction, the characteristic at the stem when
 * the stem moved, lag and characteristic per step (relative to the stem, e^w by its series in Estrin's form when small,
 * as element-laws.ts defines the valve), RK4.
 */
function handLoop(s: PlantSpec): () => number {
  const m = s.model;
  if (m.type !== 'first_order') throw new Error('first order expected');
  const K = m.gain;
  const T = m.timeConstant;
  const ts = s.loop.sampleTime;
  const n = 10;
  const h = ts / n;
  const g = s.loop.controller.gains;
  const a = s.actuator;
  const fs = a.stiction!.static;
  const fd = a.stiction!.dynamic;
  const la = Math.exp(-h / a.lag!);
  const lm = (a.lag! / h) * (1 - la);
  const rgl = Math.log(a.rangeability!);
  const span = a.max - a.min;
  const rga = rgl / span;
  const lim = EXP_SERIES_LIMIT;
  const rows = Math.ceil(s.loop.trial.duration / ts) + 1;
  return () => {
    let x = K * (a.min + span * Math.exp(rgl * (0.5 - 1)));
    let xs = 50;
    let xv = 50;
    let xc = NaN;
    let cb = 0;
    let integ = 50 - g.kc * (900 - x);
    let last = 0;
    for (let k = 0; k < rows; k++) {
      const t = k * ts;
      const r = t >= 900 ? 700 : t >= 30 ? 1200 : 900;
      const e = r - x;
      const v = g.kc * e + integ;
      const uc = v < a.min ? a.min : v > a.max ? a.max : v;
      const inc = (g.kc * ts * e) / g.ti;
      if (!((v > uc && inc > 0) || (v < uc && inc < 0))) integ += inc;
      const ur = uc - xs;
      if (ur > fs) xs = uc - fd;
      else if (ur < -fs) xs = uc + fd;
      if (xs !== xc) {
        xc = xs;
        cb = span * Math.exp(rgl * ((xs - a.min) / span - 1));
      }
      for (let i = 0; i < n; i++) {
        const dv = xv - xs;
        const w = rga * (xs + dv * lm - xs);
        const w2 = w * w;
        xv = xs + dv * la;
        const u = a.min + cb * (w >= -lim && w <= lim ? 1 + w + w2 * (0.5 + w * (1 / 6) + w2 * (1 / 24 + w * (1 / 120) + w2 * (1 / 720))) : Math.exp(w));
        const k1 = (K * u - x) / T;
        const k2 = (K * u - (x + 0.5 * h * k1)) / T;
        const k3 = (K * u - (x + 0.5 * h * k2)) / T;
        const k4 = (K * u - (x + h * k3)) / T;
        x += (h / 6) * (k1 + 2 * (k2 + k3) + k4);
      }
      last = x;
    }
    return last;
  };
}

/**
 * Milliseconds of this process's CPU time per call, not wall time: on a machine whose cores other
 * processes share, wall time counts the waits for a core and the ratios wandered by ±30 % between
 * runs; CPU time counts only the work.
 */
function time(f: () => unknown, reps: number): number {
  const c0 = process.cpuUsage();
  for (let i = 0; i < reps; i++) f();
  const c = process.cpuUsage(c0);
  return (c.user + c.system) / 1000 / reps;
}

export async function run(): Promise<void> {
  const withValve = spec(text(VALVE));
  const bare = spec(text(''));
  const loop = buildLoop(withValve);
  const engine = (): unknown => runTrial(loop.dynamics, loop.controller(), loop.config, loop.trial);
  const hand = handLoop(withValve);

  // The cases' loops are built once; each sweep call takes fresh controllers (they hold state).
  const loops = (valve: string) => Array.from({ length: 48 }, (_, i) => buildLoop(spec(text(valve, 30 + i * 0.4))));
  const sweep = (ls: ReturnType<typeof loops>) => (): unknown =>
    runTrialBatch(
      ls.map((l): BatchMember => ({ plant: l.dynamics, controller: l.controller(), loop: l.config })),
      loop.trial,
    );
  const sweepValve = sweep(loops(VALVE));
  const sweepBare = sweep(loops(''));
  const sweepSticky = sweep(loops('  stiction: { static: 1.5, dynamic: 0.7 }\n'));
  void bare;

  // The bundled sticky flow valve: the file's valve, with a characteristic added, without a valve.
  const file = readFileSync(fileURLToPath(new URL('../../plants/sticky-flow-valve.yaml', import.meta.url)), 'utf8');
  const noValve = file.replace(/^ {2}stiction:.*\n/m, '').replace(/^ {2}lag:.*\n/m, '');
  const eqPct = file.replace(/^( {2}lag:.*\n)/m, '$1  characteristic: equal_percentage\n  rangeability: 30\n');
  const twoStates = (t: string): string => t.replace('type: first_order', 'type: second_order').replace('time_constant: 3 s', 'time_constant: [3 s, 1 s]');
  if (noValve === file || eqPct === file || twoStates(file) === file) throw new Error('plants/sticky-flow-valve.yaml changed: the bench edits no longer apply');
  const fileLoops = (t: string) =>
    Array.from({ length: 48 }, (_, i) => buildLoop(spec(t.replace('gain: 0.4 ', `gain: ${(0.35 + (i * 0.1) / 47).toFixed(4)} `))));
  const fileSweeps = [file, eqPct, noValve, twoStates(file), twoStates(eqPct), twoStates(noValve)].map((t) => sweep(fileLoops(t)));
  const tFile: number[][] = fileSweeps.map(() => []);

  const rounds = 7;
  const tEngine: number[] = [];
  const tHand: number[] = [];
  const tValve: number[] = [];
  const tBare: number[] = [];
  const tSticky: number[] = [];
  for (const f of [engine, hand, sweepValve, sweepBare, sweepSticky, ...fileSweeps]) f();
  for (let r = 0; r < rounds; r++) {
    tEngine.push(time(engine, 20));
    tHand.push(time(hand, 20));
    tValve.push(time(sweepValve, 2));
    tBare.push(time(sweepBare, 2));
    tSticky.push(time(sweepSticky, 2));
    fileSweeps.forEach((f, i) => tFile[i].push(time(f, 2)));
  }
  const best = (xs: number[]): number => Math.min(...xs);
  const line = (name: string, xs: number[], unit: string): void =>
    console.log(`  ${name.padEnd(46)} ${best(xs).toFixed(3).padStart(9)} ${unit} (median ${median(xs).toFixed(3)})`);
  console.log('valve loop, 3601 samples x 10 steps:');
  line('engine (runTrial, stiction + lag + eq. %)', tEngine, 'ms');
  line('hand-written loop', tHand, 'ms');
  console.log(`  time ratio engine / hand: ${(best(tEngine) / best(tHand)).toFixed(2)}x`);
  console.log('batched sweep, 48 cases:');
  line('with stiction + lag + eq. %', tValve, 'ms');
  line('with stiction only', tSticky, 'ms');
  line('without them', tBare, 'ms');
  console.log(`  throughput ratio with all three / without: ${(best(tBare) / best(tValve)).toFixed(2)} (1 = no cost)`);
  console.log(`  throughput ratio with stiction only / without: ${(best(tBare) / best(tSticky)).toFixed(2)}`);
  for (const [at, states] of [[0, 'one state'], [3, 'second order, two states']] as const) {
    console.log(`batched sweep, 48 cases of plants/sticky-flow-valve.yaml (${states}):`);
    line('as the file (stiction + lag)', tFile[at], 'ms');
    line('with equal percentage added', tFile[at + 1], 'ms');
    line('without the valve', tFile[at + 2], 'ms');
    console.log(`  throughput ratio file valve / without: ${(best(tFile[at + 2]) / best(tFile[at])).toFixed(2)}`);
    console.log(`  throughput ratio with all three / without: ${(best(tFile[at + 2]) / best(tFile[at + 1])).toFixed(2)}`);
  }
}

if (import.meta.url === pathToFileURL(process.argv[1] ?? '').href) await run();
