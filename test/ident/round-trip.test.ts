/**
 * Round trip: fit a log, write the plant file, load it with the model loader (no diagnostics),
 * and replay the logged input open loop (manual mode) through the simulation engine: the run must
 * reproduce the log about as well as the fit did.
 */
import { describe, it, expect } from 'vitest';
import { buildPlantFile, identify, prepareBumpData, readCsv } from '../../src/ident/index.js';
import type { BumpData } from '../../src/ident/index.js';
import { compilePlant, loadPlant } from '../../src/model/index.js';
import { buildController } from '../../src/control/index.js';
import { chooseStep, runTrial } from '../../src/sim/index.js';
import type { TrialEvent } from '../../src/model/index.js';
import { bumpTest, STEP_RESPONSES } from './synthetic.js';

function load(csv: string): BumpData {
  const r = readCsv(csv, { time: 'time', columns: ['valve', 'level'] });
  return prepareBumpData(r.table!, { input: 'valve', output: 'level' }).data!;
}

function roundTrip(csv: string) {
  const data = load(csv);
  const res = identify(data);
  const text = buildPlantFile(res, data, { fileName: 'bump.csv', from: 0, to: (data.n - 1) * data.dt });
  const loaded = loadPlant(text, 'fitted.yaml');
  const plant = loaded.plant!;
  const fit = res.models[res.chosen].fit;
  const y0 = fit.values[fit.values.length - 1];
  // Replay the logged input, as deviations from u0, in manual mode.
  const events: TrialEvent[] = [{ kind: 'mode', at: 0, mode: 'manual', output: data.u[0] - fit.u0 }];
  for (let k = 1; k < data.n; k++) {
    if (data.u[k] !== data.u[k - 1]) events.push({ kind: 'mode', at: k * data.dt, mode: 'manual', output: data.u[k] - fit.u0 });
  }
  const dynamics = compilePlant(plant);
  const ts = data.dt;
  // The file's integration step when it sets one (the inverse-response file does), else the engine's choice.
  const step = plant.loop.step ?? chooseStep(dynamics, ts, 'rk4').step;
  const result = runTrial(
    dynamics,
    buildController(plant.loop.controller, ts),
    { actuator: plant.actuator, sensor: plant.sensor, sampleTime: ts, step, integrator: 'rk4' },
    { duration: (data.n - 1) * ts, initialSetpoint: 0, initialOutput: 0, events },
  );
  let sse = 0;
  for (let k = 0; k < data.n; k++) sse += (result.trace.y[k] + y0 - data.y[k]) ** 2;
  let lo = Infinity;
  let hi = -Infinity;
  for (let k = 0; k < data.n; k++) {
    lo = Math.min(lo, data.y[k]);
    hi = Math.max(hi, data.y[k]);
  }
  return { text, loaded, fit, nrmse: Math.sqrt(sse / data.n) / (hi - lo), status: result.status, kind: fit.kind };
}

const base = { n: 1500, dt: 0.1, tStep: 20, u0: 40, du: 5, y0: 1, noise: 0.05, seed: 31 };

describe('fit -> plant file -> simulation', () => {
  // Why 2 %: the file rounds numbers to 5 significant digits (relative 1e-5), the engine
  // integrates with RK4 instead of the fit's exact ZOH recursion and rounds the delay to whole
  // integration steps (at most half a step, 0.05 s here, against time constants of 3-10 s); all
  // change the response by far less than the noise (σ = 0.05, 0.5 % of the response), so the
  // replay's NRMSE, which is dominated by that same noise, must stay within 2 % of the fit's.
  // The inverse-response file asks for a step of a tenth of the sample time (its output jumps
  // when the delayed input arrives, so half a step of delay error would cost D·Δu on a sample).
  for (const [label, step, kind] of [
    ['first order plus dead time', STEP_RESPONSES.firstOrder(2, 10, 3), 'first_order'],
    ['two lags', STEP_RESPONSES.twoLags(2, 10, 4, 2), 'second_order'],
    ['underdamped', STEP_RESPONSES.underdamped(2, 0.5, 0.3, 2), 'second_order'],
    ['integrating', STEP_RESPONSES.integrating(0.05, 3, 2), 'integrating'],
    ['inverse response', STEP_RESPONSES.inverse(2, 10, 3, 2), 'inverse_response'],
  ] as const) {
    it(`${label}: the written file loads cleanly and replays the log within the fit's NRMSE`, () => {
      const rt = roundTrip(bumpTest(step, base).csv);
      expect(rt.kind).toBe(kind);
      expect(rt.loaded.diagnostics).toEqual([]);
      expect(rt.status).toBe('ok');
      expect(rt.nrmse).toBeLessThan(rt.fit.nrmse * 1.02);
      // Comments survive: the header records the source, the model and the fit quality.
      expect(rt.text).toMatch(/^# Fitted by looprig fit from bump\.csv/);
      expect(rt.text).toContain(`# model: ${kind}`);
      expect(rt.text).toMatch(/# fit: NRMSE [\d.]+ % of the output range, R² /);
    });
  }
});
