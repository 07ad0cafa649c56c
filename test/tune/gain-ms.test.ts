/**
 * The Ms-only evaluation (analysis' loopMs, loop's worstMs, tune's gainMs) against the full one it
 * stands in for: the claim is the SAME number, bit for bit (Object.is), because loopMs runs the one
 * evaluation of loopMargins and only skips the |T| peak, the bandwidth and the notes, which Ms and
 * the stability verdict do not read. Checked on every bundled plant (all its operating points) and
 * the FOPDT reference plant, for gain sets from timid to unstable.
 */
import { readdirSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { effectiveMs, loopMargins, loopMs } from '../../src/analysis/index.js';
import { loadPlant } from '../../src/model/index.js';
import type { GainSet } from '../../src/model/types.js';
import { gainMargins, gainMs, tuningContext } from '../../src/tune/index.js';
import { fopdtPlant } from './plants.js';

const root = join(__dirname, '..', '..');
const plants = readdirSync(join(root, 'plants')).filter((f) => f.endsWith('.yaml'));

/** The file's gains scaled in kc (0.3x to 6x: the last ones destabilise most loops) and ti. */
function variants(g: GainSet): GainSet[] {
  const out: GainSet[] = [];
  for (const k of [0.3, 1, 2.5, 6]) for (const t of [0.5, 1, 3]) out.push({ ...g, kc: g.kc * k, ti: g.ti * t });
  return out;
}

describe('gainMs equals effectiveMs(gainMargins) bit for bit', () => {
  for (const file of plants) {
    it(file, () => {
      const spec = loadPlant(readFileSync(join(root, 'plants', file), 'utf8'), file).plant!;
      const ctx = tuningContext(spec);
      let compared = 0;
      for (const g of variants(spec.loop.controller.gains)) {
        const full = gainMargins(ctx, g);
        const ms = gainMs(ctx, g);
        if (full === null) {
          expect(ms).toBeNull();
          continue;
        }
        expect(Object.is(ms, effectiveMs(full))).toBe(true);
        compared++;
      }
      expect(compared).toBeGreaterThan(0);
    });
  }

  it('loopMs gives loopMargins Ms, its frequency and the stability verdict (FOPDT, stable and unstable gains)', () => {
    const spec = fopdtPlant({ l: 0.4 });
    const ctx = tuningContext(spec);
    const response = ctx.response!;
    let unstable = 0;
    for (const kc of [0.2, 1, 2, 4, 8]) {
      const g = { ...spec.loop.controller.gains, kc };
      const a = loopMargins(response, g, spec.loop.sampleTime, spec.sensor);
      const b = loopMs(response, g, spec.loop.sampleTime, spec.sensor);
      expect(Object.is(b.maxSensitivity, a.maxSensitivity)).toBe(true);
      expect(Object.is(b.maxSensitivityFrequency, a.maxSensitivityFrequency)).toBe(true);
      expect(b.closedLoopStable).toBe(a.closedLoopStable);
      if (a.closedLoopStable === false) unstable++;
    }
    expect(unstable).toBeGreaterThan(0);
  });
});
