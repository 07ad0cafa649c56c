/**
 * Screen benchmark.
 *
 * 1. Instant mode, every bundled plant: time from a gain key press to the new frame written to
 *    the terminal (the real Ink render path, 80x24, the options runScreen uses, the diagnosis
 *    wired in so each edit also recomputes the loop margins). Baseline: the
 *    bare re-simulation the key asks for (one `evaluate` of the nudged gain set, no drawing),
 *    measured in the same run; the ratio is frame time / bare simulation time. Target: median
 *    under 30 ms per plant.
 * 2. The frequency view (key F) open, every bundled plant: the same gain key, press to the first
 *    frame written (the plots of the edited gains redrawn), median; the ratio is against the same
 *    key with the view closed, measured right before on the same plant; the slowest plant with the
 *    view open is named. Target: median under 30 ms.
 * 3. Live mode at ×100 on the bundled plant whose simulation costs most per simulated second:
 *    the speed reached (simulated s per wall s, from the run's own clock) while a gain key is
 *    pressed every 100 ms, and whether every key took effect (the gain shown at the end equals
 *    the gain the presses ask for).
 *
 * Run: `npx tsx test/bench/tui.bench.ts` or `npm run bench -- tui` (heap figures after garbage
 * collection: `node --expose-gc --import tsx test/bench/tui.bench.ts`). Timings are reported,
 * never asserted.
 */
import { EventEmitter } from 'node:events';
import { readdirSync, readFileSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { fileURLToPath, pathToFileURL } from 'node:url';
import { median } from './median.js';

const root = join(dirname(fileURLToPath(import.meta.url)), '..', '..');
const plantsDir = join(root, 'plants');

/** A terminal for Ink: records every write with its time. */
class FakeStdout extends EventEmitter {
  readonly isTTY = true;
  columns: number;
  rows: number;
  writes: { at: number; text: string }[] = [];
  constructor(columns: number, rows: number) {
    super();
    this.columns = columns;
    this.rows = rows;
  }
  write = (text: string): boolean => {
    this.writes.push({ at: performance.now(), text });
    // Keep only recent frames' text, so the recorder itself does not show up in the heap figure.
    if (this.writes.length > 30) this.writes[this.writes.length - 31].text = '';
    return true;
  };
  getColorDepth = (): number => 8;
  hasColors = (): boolean => true;
}

/** Keys for Ink: the same shape as ink-testing-library's stdin. */
class FakeStdin extends EventEmitter {
  readonly isTTY = true;
  private data: string | null = null;
  write(data: string): void {
    this.data = data;
    this.emit('readable');
  }
  read = (): string | null => {
    const d = this.data;
    this.data = null;
    return d;
  };
  setEncoding(): void {}
  setRawMode(): void {}
  resume(): void {}
  pause(): void {}
  ref(): void {}
  unref(): void {}
}

const sleep = (ms: number): Promise<void> => new Promise((r) => setTimeout(r, ms));

function quantile(xs: number[], q: number): number {
  const s = [...xs].sort((a, b) => a - b);
  return s[Math.min(s.length - 1, Math.floor(q * s.length))];
}

// eslint-disable-next-line no-control-regex
const strip = (s: string): string => s.replace(/\u001b\[[0-9;?]*[A-Za-z]/g, '');

export async function run(): Promise<void> {
  // What the screen command does: the production build of React.
  process.env.NODE_ENV ??= 'production';
  const React = await import('react');
  const { render } = await import('ink');
  const { loadPlant } = await import(pathToFileURL(join(root, 'src/model/index.ts')).href);
  const tui = await import(pathToFileURL(join(root, 'src/tui/app.tsx')).href);
  const engine = await import(pathToFileURL(join(root, 'src/tui/engine.ts')).href);
  const { diagnoseSource } = await import(pathToFileURL(join(root, 'src/tui/diagnose-source.ts')).href);
  const state = await import(pathToFileURL(join(root, 'src/tui/state.ts')).href);
  const math = (await import(pathToFileURL(join(root, 'src/tui/edit-math.ts')).href)).CORE_EDIT_MATH;

  const files = readdirSync(plantsDir).filter((f) => f.endsWith('.yaml')).sort();
  console.log(`NODE_ENV=${process.env.NODE_ENV}; 80x24; ${files.length} bundled plants`);

  function mount(name: string, columns = 80, rows = 24) {
    const text = readFileSync(join(plantsDir, name), 'utf8');
    const loaded = loadPlant(text, name);
    if (loaded.plant === undefined) throw new Error(`${name} does not load`);
    const setup = engine.setupLoop(loaded.plant);
    const stdout = new FakeStdout(columns, rows);
    const stdin = new FakeStdin();
    const instance = render(
      React.createElement(tui.App, {
        setup,
        filePath: name,
        fileName: name,
        text,
        io: { readText: () => text, writeText: () => undefined },
        // What runScreen wires in: the diagnosis, with loop margins recomputed on every edit.
        notices: diagnoseSource(loaded.plant),
        color: true,
        caution: false,
        onExit: () => undefined,
      }),
      // The options runScreen uses.
      { stdin: stdin as never, stdout: stdout as never, stderr: stdout as never, exitOnCtrlC: false, patchConsole: false, maxFps: 60 },
    );
    return { setup, stdout, stdin, instance };
  }

  /**
   * Press a key; ms from the press to the first terminal write after it (the new gain and its
   * trial drawn) and to the last one before 60 ms of quiet (the margins filled in as well).
   */
  async function pressToFrame(m: ReturnType<typeof mount>, key: string): Promise<{ first: number; settled: number }> {
    const n = m.stdout.writes.length;
    const t0 = performance.now();
    m.stdin.write(key);
    const end = t0 + 2000;
    while (m.stdout.writes.length === n && performance.now() < end) await new Promise((r) => setImmediate(r));
    if (m.stdout.writes.length === n) return { first: NaN, settled: NaN };
    for (;;) {
      const k = m.stdout.writes.length;
      await sleep(60);
      if (m.stdout.writes.length === k) break;
    }
    return { first: m.stdout.writes[n].at - t0, settled: m.stdout.writes[m.stdout.writes.length - 1].at - t0 };
  }

  // ---------------------------------------------------------------- instant mode
  console.log('\ninstant mode: gain key -> new frame written (ms)');
  console.log('plant                         first frame: median   p90 | with margins: median | bare sim | ratio | target <30 ms');
  const costPerSimSecond: { name: string; cost: number }[] = [];
  for (const name of files) {
    const m = mount(name);
    await sleep(100);
    const keys = [']', '['];
    for (let i = 0; i < 6; i++) await pressToFrame(m, keys[i % 2]);
    const times: number[] = [];
    const settled: number[] = [];
    for (let i = 0; i < 30; i++) {
      const r = await pressToFrame(m, keys[i % 2]);
      times.push(r.first);
      settled.push(r.settled);
    }
    m.instance.unmount();

    // Baseline: the bare re-simulation of a nudged gain set, no drawing.
    const file = engine.editFromSpec(m.setup.plant.loop.controller);
    const bare: number[] = [];
    for (let i = 0; i < 36; i++) {
      const nudged = state.withParam(file, state.paramList(file)[0], state.paramValue(file, state.paramList(file)[0]) * (i % 2 === 0 ? 1.1 : 1));
      const t0 = performance.now();
      engine.evaluate(m.setup, nudged);
      const dt = performance.now() - t0;
      if (i >= 6) bare.push(dt);
    }
    const med = median(times);
    const bmed = median(bare);
    costPerSimSecond.push({ name, cost: bmed / m.setup.plant.loop.trial.duration });
    console.log(
      `${name.padEnd(30)} ${med.toFixed(1).padStart(19)} ${quantile(times, 0.9).toFixed(1).padStart(5)} | ${median(settled).toFixed(1).padStart(20)} | ${bmed.toFixed(2).padStart(8)} | ${(med / bmed).toFixed(1).padStart(5)} | ${med < 30 ? 'met' : 'NOT met'}`,
    );
  }

  // ---------------------------------------------------------------- frequency view
  console.log('\nfrequency view open (F): the same gain key -> new frame written (ms), the view closed measured just before on the same plant');
  console.log('plant                         closed: median | open: median   p90 | ratio open/closed | target <30 ms');
  const keyTimes = async (name: string, view: boolean): Promise<number[]> => {
    const mv = mount(name);
    await sleep(100);
    if (view) {
      mv.stdin.write('F');
      await sleep(500);
    }
    const keys = [']', '['];
    for (let i = 0; i < 6; i++) await pressToFrame(mv, keys[i % 2]);
    const out: number[] = [];
    for (let i = 0; i < 30; i++) out.push((await pressToFrame(mv, keys[i % 2])).first);
    const shown = strip(mv.stdout.writes.slice(-4).map((w) => w.text).join(''));
    if (view && !shown.includes('Frequency view')) console.log('  (the view did not stay open; the last frame reads:)', shown.slice(0, 200));
    mv.instance.unmount();
    return out;
  };
  const viewRows: { name: string; closed: number; open: number; p90: number }[] = [];
  for (const name of files) {
    const closed = median(await keyTimes(name, false));
    const openTimes = await keyTimes(name, true);
    const open = median(openTimes);
    viewRows.push({ name, closed, open, p90: quantile(openTimes, 0.9) });
    console.log(`${name.padEnd(30)} ${closed.toFixed(1).padStart(14)} | ${open.toFixed(1).padStart(12)} ${quantile(openTimes, 0.9).toFixed(1).padStart(5)} | ${(open / closed).toFixed(2).padStart(17)} | ${open < 30 ? 'met' : 'NOT met'}`);
  }
  const slowestView = viewRows.reduce((a, b) => (b.open > a.open ? b : a));
  console.log(
    `  slowest with the view open: ${slowestView.name}, median ${slowestView.open.toFixed(1)} ms (closed ${slowestView.closed.toFixed(1)} ms, ratio ${(slowestView.open / slowestView.closed).toFixed(2)}): target <30 ms ${slowestView.open < 30 ? 'met' : 'NOT met'}`,
  );

  // ---------------------------------------------------------------- live mode
  costPerSimSecond.sort((a, b) => b.cost - a.cost);
  const slowest = costPerSimSecond[0].name;
  console.log(`\nlive mode x100 on the slowest plant to simulate: ${slowest} (${(costPerSimSecond[0].cost * 1000).toFixed(1)} µs per simulated second, bare)`);
  const m = mount(slowest);
  await sleep(100);
  m.stdin.write('l');
  await sleep(60);
  for (const k of ['>', '>', '>']) {
    m.stdin.write(k);
    await sleep(60);
  }
  const frameText = (): string => strip(m.stdout.writes.slice(-3).map((w) => w.text).join(''));
  const simTime = (): number => {
    const all = strip(m.stdout.writes.map((w) => w.text).join(''));
    const found = [...all.matchAll(/t (\d+\.\d) s/g)];
    return found.length > 0 ? Number(found[found.length - 1][1]) : NaN;
  };
  if (!frameText().includes('live ×100') && !strip(m.stdout.writes.map((w) => w.text).join('')).includes('live ×100')) {
    console.log('  (could not reach x100; the status line reads:)', frameText().slice(0, 120));
  }
  const firstEdit = engine.editFromSpec(m.setup.plant.loop.controller);
  const first = state.paramList(firstEdit)[0];
  let expected = state.paramValue(firstEdit, first);
  const gc = (globalThis as { gc?: () => void }).gc;
  const heap = (): number => {
    gc?.();
    return process.memoryUsage().heapUsed / 1e6;
  };
  const heap0 = heap();
  const wall0 = performance.now();
  const sim0 = simTime();
  const presses = 40;
  for (let i = 0; i < presses; i++) {
    m.stdin.write('+');
    expected = Number((expected * 1.01).toPrecision(6));
    await sleep(100);
  }
  await sleep(200);
  const wall = (performance.now() - wall0) / 1000;
  const sim = simTime() - sim0;
  const heap1 = heap();
  const all = strip(m.stdout.writes.map((w) => w.text).join(''));
  const shownAll = [...all.matchAll(/> (?:Kc|Kp)'?\s+(\S+)/g)];
  const shown = shownAll.length > 0 ? Number(shownAll[shownAll.length - 1][1]) : NaN;
  m.instance.unmount();
  const achieved = sim / wall;
  console.log(`  speed asked x100, reached x${achieved.toFixed(0)} (${sim.toFixed(0)} simulated s in ${wall.toFixed(1)} s)`);
  console.log(
    `  ${presses} gain keys at 10/s: gain shown ${shown}, expected ${Number(expected.toPrecision(4))} -> ${Math.abs(shown - Number(expected.toPrecision(4))) <= 1e-9 * Math.abs(expected) ? 'no key dropped' : 'KEYS DROPPED'}`,
  );
  console.log(`  ratio reached/asked: ${(achieved / 100).toFixed(2)}`);
  // The live trend redraws ~20 times a second; memory must not grow with the frames drawn.
  console.log(
    `  heap ${heap0.toFixed(1)} -> ${heap1.toFixed(1)} MB over the run (${m.stdout.writes.length} terminal writes)${gc === undefined ? '; run under node --expose-gc for a figure after collection' : ''}`,
  );
}

if (import.meta.url === pathToFileURL(process.argv[1]).href) {
  await run();
  process.exit(0);
}
