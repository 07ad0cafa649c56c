/**
 * The bundled demo plant (nonlinear gravity-drained tank) run open loop through the whole CLI
 * pipeline - load, compile, simulate, CSV - against an independent high-accuracy solver.
 */
import { describe, it, expect } from 'vitest';
import { readFileSync } from 'node:fs';
import { dirname, join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import { parseDocument } from 'yaml';
import { main } from '../../src/cli/index.js';
import { compilePlant, loadPlant } from '../../src/model/index.js';
import { odexOutputs } from '../sim/odex-reference.js';
import { fakeIo } from '../cli/fake-io.js';

const plantsDir = resolve(dirname(fileURLToPath(import.meta.url)), '..', '..', 'plants');

describe('surge-tank.yaml open loop vs odex (Hairer & Wanner ODEX, rtol = atol = 1e-12)', () => {
  // Hairer, Nørsett & Wanner, Solving Ordinary Differential Equations I, 2nd ed. 1993, sec. II.9.
  it('kc = 0 holds the valve at 0.5; the level filling from 0.3 m agrees to 1e-6 relative', async () => {
    // Start the tank low so the square-root drain has a real transient: 0.3 m -> towards 1 m.
    const doc = parseDocument(readFileSync(join(plantsDir, 'surge-tank.yaml'), 'utf8'));
    doc.setIn(['model', 'states', 'level', 'initial'], 0.3);
    const text = String(doc);
    const file = 'virtual/surge-open-loop.yaml';
    const io = fakeIo({ [file]: text });
    // 20 min: before the inflow disturbance (25 min), which is then dropped from the trial.
    const code = await main(['run', file, '--set', 'kc=0', '--duration', '20min', '--csv', 'out.csv'], io);
    expect(io.stderr).toBe('');
    expect(code).toBe(0);
    const rows = io.files.get('out.csv')!.trimEnd().split('\n').slice(1).map((l) => l.split(',').map(Number));
    expect(rows).toHaveLength(1201);
    const times = rows.map((r) => r[0]);
    const level = rows.map((r) => r[2]);
    // Open loop: with kc = 0 the PI output stays at the bumpless start value, exactly.
    for (const r of rows) expect(r[4]).toBe(0.5);

    const loaded = loadPlant(text, file);
    const plant = compilePlant(loaded.plant!);
    const ref = odexOutputs(plant, times, () => 0.5);
    let worst = 0;
    for (let i = 0; i < times.length; i++) worst = Math.max(worst, Math.abs(level[i] - ref[i]) / Math.abs(ref[i]));
    // The level rises substantially (so the comparison is not of two constants) ...
    expect(level[level.length - 1]).toBeGreaterThan(0.6);
    // ... and RK4 at the automatic step (1 s here: the drain mode is c/(2 A sqrt(h)) <= 2.4e-3 1/s,
    // so h rho <= 2.4e-3) has truncation error far below the 1e-6 asked for.
    expect(worst).toBeLessThan(1e-6);
  });
});
