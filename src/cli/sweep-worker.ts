/**
 * Worker thread of the parallel sweep (parallel-sweep.ts): loads the plant file from its text,
 * simulates the cases it is sent with tune's `sweepPart` and posts the part back (plain data,
 * copied). Loaded plants and prepared cases are kept, so a second gain set on the same file and
 * options skips the compilation and linearisation.
 */
import { parentPort } from 'node:worker_threads';
import { loadPlant } from '../model/index.js';
import { sweepPart, tuningContext } from '../tune/index.js';
import { plantState, type SweepRequest, type SweepReply } from './sweep-request.js';

if (parentPort === null) throw new Error('sweep-worker.js runs as a worker thread only');
const port = parentPort;

const plants = new Map<string, ReturnType<typeof plantState>>();

port.on('message', (req: SweepRequest) => {
  let reply: SweepReply;
  try {
    const key = `${req.fileName}\0${req.text}`;
    let st = plants.get(key);
    if (st === undefined) {
      const loaded = loadPlant(req.text, req.fileName);
      if (loaded.plant === undefined) throw new Error(`${req.fileName}: the plant file does not load`);
      st = plantState(loaded.plant, tuningContext(loaded.plant));
      plants.set(key, st);
    }
    const part = sweepPart(st.plant, req.gains, req.options, req.indices, st.base, st.cacheFor(req.options));
    reply = { id: req.id, part };
    // Copied, not transferred: detaching one ArrayBuffer makes V8 check every typed-array access
    // in this thread for detachment from then on, which slowed each later part here by about 20 %
    // (a 25-case part of the surge-tank sweep: 14.3 ms against 11.8 ms). The envelope is ~90 kB.
    port.postMessage(reply);
  } catch (error) {
    reply = { id: req.id, error: (error as Error).stack ?? String(error) };
    port.postMessage(reply);
  }
});
