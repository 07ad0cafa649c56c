/**
 * `looprig run` on a trial longer than STREAM_ROWS rows streams it (cli/simulate-plant.ts over
 * loop/streamed-trial.ts): the figures are those of the whole trace held, the CSV has every row,
 * the plot gets the kept rows. A stated identity (the streamed figures are defined as the held
 * ones), no outside reference.
 */
import { describe, expect, it } from 'vitest';
import { trialMetrics } from '../../src/analysis/index.js';
import { main } from '../../src/cli/index.js';
import { chunksCsv, parseRunArgs, runPlant, traceCsvChunks, type RunOptions } from '../../src/cli/commands/run.js';
import { runMetricsJson } from '../../src/cli/run-report.js';
import { STREAM_ROWS, streamedTrial } from '../../src/loop/index.js';
import { loadPlant } from '../../src/model/index.js';
import { runTrial } from '../../src/sim/index.js';
import { fileLoop } from '../../src/tune/index.js';
import { fakeIo } from './fake-io.js';

/** The test loop over `duration` s, its events at the same shares of it. */
function plantText(duration: number): string {
  const at = (share: number): string => `${(share * duration).toPrecision(6)} s`;
  return `name: long
model: { type: first_order, gain: 2, time_constant: 20 s }
sensor: { noise_std: 0.01, seed: 3 }
loop:
  sample_time: 0.01 s
  step: 0.01 s
  controller: { structure: pi, form: ideal, kc: 0.5, ti: 20 s }
  trial:
    duration: ${duration} s
    events:
      - { at: ${at(1 / 300)}, setpoint: 1 }
      - { at: ${at(0.5)}, disturbance: { load: 0.2 } }
      - { at: ${at(2 / 3)}, setpoint: 2 }
`;
}

describe('run on a trial too long to hold', { timeout: 120_000 }, () => {
  it('streams it (the report keeps the kept rows): the figures of the whole trace', async () => {
    const text = plantText(3000);
    const plant = loadPlant(text, 'long.yaml').plant!;
    expect(300001).toBeGreaterThan(STREAM_ROWS);
    const { loop } = fileLoop(plant);
    const held = runTrial(loop.dynamics, loop.controller(), loop.config, loop.trial);
    const whole = trialMetrics(held.trace, loop.trial, plant.loop.requirements);

    const report = runPlant(parseRunArgs(['long.yaml']) as RunOptions, fakeIo({ 'long.yaml': text }));
    expect(report.replay).not.toBeNull();
    expect(report.result.trace.length).toBeLessThan(6 * 4096 + 1);
    expect(report.metrics).toEqual(whole);

    const io = fakeIo({ 'long.yaml': text });
    expect(await main(['run', 'long.yaml', '--json'], io)).toBe(0);
    const doc = JSON.parse(io.stdout);
    expect(doc.status).toBe('ok');
    const step = doc.events.find((e: { kind: string; at: number }) => e.kind === 'setpoint' && e.at === 2000);
    expect(step.rise_time).toBe(whole.steps[1].riseTime);
    expect(step.settling_time).toBe(whole.steps[1].settlingTime);
    expect(step.iae).toBe(whole.steps[1].iae);
    expect(doc.metrics).toEqual(JSON.parse(JSON.stringify(runMetricsJson(whole))));
    expect(doc.events.length).toBe(whole.steps.length + whole.disturbances.length);
    const dist = doc.events.find((e: { kind: string }) => e.kind === 'disturbance');
    expect(dist.recovery_time).toBe(whole.disturbances[0].recoveryTime);
  });

  it('its CSV has every row, as the whole trace gives it', () => {
    const plant = loadPlant(plantText(30), 'short.yaml').plant!;
    const { loop } = fileLoop(plant);
    const held = runTrial(loop.dynamics, loop.controller(), loop.config, loop.trial);
    const s = streamedTrial(loop, plant.loop.requirements, { chunkRows: 77 });
    expect([...chunksCsv(held.trace.disturbanceNames, s.replay())].join('')).toBe([...traceCsvChunks(held.trace)].join(''));
  });
});
