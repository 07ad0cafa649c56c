/**
 * The valve's stiction bands in `uncertainty`: read as names of the file, and swept like a model
 * parameter (batched and one at a time alike); a case with a clean valve settles where the sticky
 * ones do not.
 */
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { loadPlant } from '../../src/model/index.js';
import { robustnessSweep } from '../../src/tune/index.js';

const base = readFileSync(new URL('../../plants/sticky-flow-valve.yaml', import.meta.url), 'utf8').replace('noise_std: 0.05, ', '');

describe('stiction bands in uncertainty', () => {
  it('refuses a band name when the valve has none', () => {
    const r = loadPlant(base.replace('stiction: { static: 1.5, dynamic: 0.7 }', 'lag: 0 s').replace('  lag: 1 s', '').replace('uncertainty: { gain: [0.35, 0.45] }', "uncertainty: { 'stiction.static': [0, 2] }"), 'x.yaml');
    expect(r.plant).toBeUndefined();
    expect(r.diagnostics.find((d) => d.severity === 'error')?.message).toMatch(/uncertainty names 'stiction\.static'/);
  });
  it('sweeps the static band: the corner without stiction settles, the one with it does not; batched = sequential', () => {
    const text = base.replace('uncertainty: { gain: [0.35, 0.45] }', "uncertainty: { 'stiction.static': [0, 2], 'stiction.dynamic': [0, 0.7] }");
    const spec = loadPlant(text, 'x.yaml').plant!;
    expect(spec.uncertainty['stiction.static']).toEqual([0, 2]);
    const g = spec.loop.controller.gains;
    const batched = robustnessSweep(spec, g, { samples: 0 });
    const sequential = robustnessSweep(spec, g, { samples: 0, runner: 'sequential' });
    expect(batched.cases.map((c) => c.iae)).toEqual(sequential.cases.map((c) => c.iae));
    const clean = batched.cases.find((c) => c.values['stiction.static'] === 0)!;
    const sticky = batched.cases.find((c) => c.values['stiction.static'] === 2 && c.values['stiction.dynamic'] === 0.7)!;
    expect(Number.isFinite(clean.settlingTime)).toBe(true);
    expect(sticky.settlingTime).toBe(Infinity);
  });
});
