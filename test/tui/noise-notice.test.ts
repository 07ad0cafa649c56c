/**
 * The screen's noise notice for the edited gains: the same estimate as tune's
 * noise-at-rate-limit flag (tested against the simulated valve in test/tune/noise-activity.test.ts).
 */
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { loadPlant } from '../../src/model/index.js';
import type { PlantSpec } from '../../src/model/types.js';
import { gainNoiseActivity } from '../../src/tune/index.js';
import { fileEdit, runningGains, setupLoop } from '../../src/tui/engine.js';
import { noiseNotice } from '../../src/tui/noise-notice.js';

function plant(name: string): PlantSpec {
  const file = join(import.meta.dirname, '..', '..', 'plants', name);
  return loadPlant(readFileSync(file, 'utf8'), file).plant!;
}

describe('noiseNotice', () => {
  const setup = setupLoop(plant('surge-tank.yaml'));
  const base = fileEdit(setup);

  it("the file's gains (kc 3): noise cuts ~12 % of the valve's moves short, shown as information", () => {
    const n = noiseNotice(setup, base)!;
    expect(n.tone).toBe('info');
    expect(n.text).toMatch(/~12 % of samples/);
  });

  it('kc 15: most samples are rate-limited by noise, a warning with the same numbers as the flag', () => {
    const hot = { ...base, gains: { ...base.gains, kc: 15 } };
    const n = noiseNotice(setup, hot)!;
    expect(n.tone).toBe('warn');
    const share = gainNoiseActivity(setup.plant, runningGains(hot), hot.structure)!.rateLimitedShare;
    expect(n.text).toContain(`~${(100 * share).toFixed(0)} % of samples`);
  });

  it('a gentle kc, or a plant without sensor noise, gives no notice', () => {
    expect(noiseNotice(setup, { ...base, gains: { ...base.gains, kc: 1 } })).toBeNull();
    const text = readFileSync(join(import.meta.dirname, '..', '..', 'plants', 'surge-tank.yaml'), 'utf8').replace(/noise_std: 0\.003, /, '');
    const quiet = setupLoop(loadPlant(text, 'quiet.yaml').plant!);
    expect(quiet.plant.sensor.noiseStd).toBe(0);
    expect(noiseNotice(quiet, { ...fileEdit(quiet), gains: { ...fileEdit(quiet).gains, kc: 15 } })).toBeNull();
  });
});
