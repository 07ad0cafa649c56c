/**
 * The robustness sweep over several threads: the cases of `planSweep` are split into contiguous
 * shares, one per job; this thread simulates the first share while worker threads
 * (sweep-worker.js) simulate the others, and tune's `mergeSweep` puts the parts together. The
 * result equals `robustnessSweep(plant, gains, options)` exactly (same cases in the same order,
 * summary, envelope, notes): each case is simulated the same way wherever it runs.
 *
 * Lives in the cli layer because the core stays free of threads (and of node:worker_threads).
 */
import { createRequire } from 'node:module';
import { availableParallelism } from 'node:os';
import { pathToFileURL } from 'node:url';
import { Worker } from 'node:worker_threads';
import { loadPlant } from '../model/index.js';
import type { GainSet } from '../model/types.js';
import { mergeSweep, sweepCaseCount, sweepPart, tuningContext, type RobustnessOptions, type RobustnessResult, type SweepPart } from '../tune/index.js';
import { plantState, type SweepReply, type SweepRequest } from './sweep-request.js';

/** Fewer cases than this are not worth a thread: the sweep runs in-process. */
export const MIN_PARALLEL_CASES = 16;

/** The plant file as text (each thread loads it itself). */
export interface PlantSource {
  text: string;
  fileName: string;
}

/**
 * Number of threads for sweeps: `LOOPRIG_JOBS` (a whole number >= 1) when set, else
 * `defaultJobs(cores)` for the machine's available parallelism. 1 means in-process only.
 */
export function sweepJobs(env: Readonly<Record<string, string | undefined>> = {}, cores: number = availableParallelism()): number {
  const raw = env.LOOPRIG_JOBS;
  if (raw !== undefined && raw.trim() !== '') {
    const n = Number(raw);
    if (Number.isInteger(n) && n >= 1) return n;
  }
  return defaultJobs(cores);
}

/**
 * Threads a sweep uses unless asked otherwise: one (this thread) on a machine of two cores or
 * fewer, else one per core. On two cores a worker did not pay: `suggest --jobs 2` ran 11 % slower
 * than `--jobs 1` (the second core also serves the garbage collector, the compiler threads and
 * whatever else runs), so threads are used there only when asked for (`--jobs`, LOOPRIG_JOBS).
 */
export function defaultJobs(cores: number): number {
  return cores <= 2 ? 1 : cores;
}

/**
 * The worker script beside this module: sweep-worker.js in the built dist; under tsx / vitest
 * (this module is a .ts file) a small bootstrap registers tsx's loader in the worker thread and
 * then imports sweep-worker.ts (`execArgv: ['--import', 'tsx']` does not reach a worker's loader
 * on Node 20: the .ts file is refused).
 */
function startWorker(): Worker {
  if (!import.meta.url.endsWith('.ts')) return new Worker(new URL('./sweep-worker.js', import.meta.url));
  // The ESM build of tsx's API (require.resolve gives the CommonJS one, whose loader path is wrong here).
  const api = pathToFileURL(createRequire(import.meta.url).resolve('tsx/esm/api').replace(/\.cjs$/, '.mjs')).href;
  const script = new URL('./sweep-worker.ts', import.meta.url).href;
  const boot = `import(${JSON.stringify(api)}).then((m) => m.tsImport(${JSON.stringify(script)}, ${JSON.stringify(script)}))`;
  return new Worker(boot, { eval: true });
}

/** Contiguous shares of `total` cases for `jobs` threads (sizes differ by at most one). */
export function splitCases(total: number, jobs: number): number[][] {
  const k = Math.max(1, Math.min(jobs, total));
  const out: number[][] = [];
  let at = 0;
  for (let j = 0; j < k; j++) {
    const n = Math.floor(total / k) + (j < total % k ? 1 : 0);
    out.push(Array.from({ length: n }, (_, i) => at + i));
    at += n;
  }
  return out;
}

/**
 * A pool of sweep worker threads, started on first use and kept (with their loaded plants and
 * prepared cases) until `close()`. Idle workers do not keep the process alive.
 */
export class SweepPool {
  readonly jobs: number;
  private readonly workers: Worker[] = [];
  private readonly pending = new Map<number, { resolve: (p: SweepPart) => void; reject: (e: Error) => void; worker: Worker }>();
  private nextId = 1;
  private readonly local = new Map<string, ReturnType<typeof plantState>>();

  /** `jobs` threads in all, this one included (default: the machine's available parallelism). */
  constructor(jobs: number = availableParallelism()) {
    if (!Number.isInteger(jobs) || jobs < 1) throw new RangeError(`SweepPool: jobs must be a whole number >= 1, got ${jobs}`);
    this.jobs = jobs;
  }

  private worker(i: number): Worker {
    while (this.workers.length <= i) {
      const w = startWorker();
      w.unref();
      w.on('message', (reply: SweepReply) => this.settle(reply));
      w.on('error', (error) => this.fail(w, error));
      w.on('exit', (code) => this.fail(w, new Error(`sweep worker stopped (exit code ${code})`)));
      this.workers.push(w);
    }
    return this.workers[i];
  }

  private settle(reply: SweepReply): void {
    const p = this.pending.get(reply.id);
    if (p === undefined) return;
    this.pending.delete(reply.id);
    this.idle(p.worker);
    if (reply.error !== undefined) p.reject(new Error(`sweep worker: ${reply.error}`));
    else p.resolve(reply.part);
  }

  private fail(w: Worker, error: Error): void {
    const i = this.workers.indexOf(w);
    if (i >= 0) this.workers.splice(i, 1);
    for (const [id, p] of this.pending) {
      if (p.worker !== w) continue;
      this.pending.delete(id);
      p.reject(error);
    }
  }

  /** A worker with no request open lets the process exit. */
  private idle(w: Worker): void {
    for (const p of this.pending.values()) if (p.worker === w) return;
    w.unref();
  }

  private request(i: number, req: Omit<SweepRequest, 'id'>): Promise<SweepPart> {
    const w = this.worker(i);
    const id = this.nextId++;
    return new Promise<SweepPart>((resolve, reject) => {
      this.pending.set(id, { resolve, reject, worker: w });
      w.ref();
      w.postMessage({ ...req, id } satisfies SweepRequest);
    });
  }

  /**
   * The robustness sweep of `gains` on the plant file `source`, split over the pool's threads.
   * Equal to `robustnessSweep(plant, gains, options)`. With one job, or fewer than two cases,
   * everything runs in this thread. A plant file that does not load is a RangeError.
   */
  async sweep(source: PlantSource, gains: GainSet, options: RobustnessOptions = {}): Promise<RobustnessResult> {
    const key = `${source.fileName}\0${source.text}`;
    let st = this.local.get(key);
    if (st === undefined) {
      const loaded = loadPlant(source.text, source.fileName);
      if (loaded.plant === undefined) throw new RangeError(`${source.fileName}: the plant file does not load`);
      st = plantState(loaded.plant, tuningContext(loaded.plant));
      this.local.set(key, st);
    }
    const shares = splitCases(sweepCaseCount(st.plant, options), this.jobs);
    // Post the other shares first so the workers start while this thread does its own.
    const remote = shares.slice(1).map((indices, i) =>
      this.request(i, { text: source.text, fileName: source.fileName, gains, options, indices }),
    );
    let mine: SweepPart;
    try {
      mine = sweepPart(st.plant, gains, options, shares[0], st.base, st.cacheFor(options));
    } catch (error) {
      await Promise.allSettled(remote);
      throw error;
    }
    return mergeSweep([mine, ...(await Promise.all(remote))]);
  }

  /** Stop the worker threads (a later sweep starts new ones). */
  async close(): Promise<void> {
    const ws = this.workers.splice(0);
    await Promise.all(ws.map((w) => w.terminate()));
  }
}

/**
 * One sweep on a pool of its own when it pays off (`jobs` > 1 and at least MIN_PARALLEL_CASES
 * cases), else in-process; the pool is closed afterwards. Same result either way.
 */
export async function parallelSweep(source: PlantSource, gains: GainSet, options: RobustnessOptions = {}, jobs = defaultJobs(availableParallelism())): Promise<RobustnessResult> {
  const loaded = loadPlant(source.text, source.fileName);
  if (loaded.plant === undefined) throw new RangeError(`${source.fileName}: the plant file does not load`);
  const pool = new SweepPool(sweepCaseCount(loaded.plant, options) >= MIN_PARALLEL_CASES ? jobs : 1);
  try {
    return await pool.sweep(source, gains, options);
  } finally {
    await pool.close();
  }
}
