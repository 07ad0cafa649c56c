/** The library entry point alone is enough to load, simulate, measure, diagnose and tune a plant. */
import { describe, it, expect } from 'vitest';
import { readFileSync } from 'node:fs';
import * as looprig from '../src/index.js';

describe('library entry point', () => {
  it('runs the demo plant through the public names only', () => {
    const text = readFileSync(new URL('../plants/surge-tank.yaml', import.meta.url), 'utf8');
    const { plant, diagnostics } = looprig.loadPlant(text, 'surge-tank.yaml');
    expect(diagnostics.filter((d) => d.severity === 'error')).toEqual([]);
    const dyn = looprig.compilePlant(plant!);
    const ctl = looprig.buildController(plant!.loop.controller, plant!.loop.sampleTime);
    const loop = { actuator: plant!.actuator, sensor: plant!.sensor, sampleTime: plant!.loop.sampleTime, step: plant!.loop.step ?? 0, integrator: plant!.loop.integrator };
    const result = looprig.runTrial(dyn, ctl, loop, plant!.loop.trial);
    expect(result.status).toBe('ok');
    const m = looprig.trialMetrics(result.trace, plant!.loop.trial, plant!.loop.requirements);
    expect(Number.isFinite(m.overall.iae)).toBe(true);
  });
  it('exports the shells nowhere: no Ink, React or command line in the library', () => {
    for (const name of ['main', 'nodeIo', 'runScreen', 'UserError']) expect(name in looprig).toBe(false);
  });
});
