/**
 * The verdict strip marks a requirement somewhere exactly when the rule check fails it (the same
 * verdict, checked on every bundled plant with detuned gains and limits that some trials break),
 * and marks it where it is broken in time.
 */
import { describe, it, expect } from 'vitest';
import { readdirSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { checkRequirements } from '../../src/analysis/index.js';
import { loadPlant } from '../../src/model/index.js';
import type { Requirements } from '../../src/model/types.js';
import { createTrace } from '../../src/sim/index.js';
import { evaluate, fileEdit, setupLoop } from '../../src/tui/engine.js';
import { paramList, withParam } from '../../src/tui/state.js';
import { stripSteps, verdictStrip, type VerdictKey } from '../../src/tui/verdict-strip.js';

const dirs = [join(import.meta.dirname, '..', '..', 'plants'), join(import.meta.dirname, '..', 'fixtures', 'plants')];

describe('tui verdict strip', () => {
  for (const dir of dirs) {
    for (const name of readdirSync(dir).filter((f) => f.endsWith('.yaml'))) {
      it(`${name}: marks exactly the requirements the rule check fails`, () => {
        const loaded = loadPlant(readFileSync(join(dir, name), 'utf8'), name);
        const setup = setupLoop(loaded.plant!);
        const file = fileEdit(setup);
        // Verdicts seen over the six trials: the comparison means something only if both occur.
        let fails = 0;
        let passes = 0;
        for (const scale of [0.4, 1, 2.5]) {
          const kc = paramList(file)[0];
          const edit = withParam(file, kc, Number((file.values[kc] * scale).toPrecision(6)));
          if ('error' in edit) throw new Error(edit.error);
          const ev = evaluate(setup, edit);
          const span = ev.metrics.overall.duration;
          // Limits that some of these trials break and others meet.
          for (const req of [
            { overshootPct: 5, settlingTime: span / 6, riseTime: span / 40, steadyStateError: 1e-3 },
            { overshootPct: 25, settlingTime: span / 3, maxOutput: 0.9 * ev.metrics.overall.maxAbsOutput, saturatedTime: span / 20 },
          ] satisfies Requirements[]) {
            const checks = checkRequirements(ev.metrics, req);
            const strip = verdictStrip({
              trace: ev.result.trace,
              steps: stripSteps(ev.metrics),
              req,
              overall: ev.metrics.overall,
              divergedAt: ev.result.status === 'diverged' ? ev.result.divergedAt : null,
              t0: 0,
              t1: span,
              columns: 71,
            });
            if (ev.result.status === 'diverged') {
              expect(strip.broken).toContain('diverged');
              continue;
            }
            const failed = checks.filter((c) => c.status === 'fail').map((c) => c.name as VerdictKey);
            fails += failed.length;
            passes += checks.filter((c) => c.status === 'pass').length;
            expect([...strip.broken].sort(), `${name} ×${scale} ${JSON.stringify(req)}`).toEqual([...failed].sort());
            expect(strip.cells.length).toBe(71);
          }
        }
        expect(fails, `${name}: requirements failed`).toBeGreaterThan(0);
        expect(passes, `${name}: requirements met`).toBeGreaterThan(0);
      });
    }
  }

  it('marks the overshoot where the output is beyond the line, settling from the allowed time on', () => {
    // A hand-made step at t = 10 s from 0 to 1: output 1.3 on [12, 14), then 1.05 to 30 s, then 1.
    const tr = createTrace(101, []);
    for (let i = 0; i <= 100; i++) {
      const t = i * 0.5;
      tr.t[i] = t;
      tr.y[i] = t < 10 ? 0 : t < 12 ? 0.95 : t < 14 ? 1.3 : t < 30 ? 1.05 : 1;
    }
    tr.length = 101;
    const strip = verdictStrip({
      trace: tr,
      steps: [{ at: 10, end: 50, from: 0, target: 1, band: 0.02, figures: { overshootPct: 30, riseTime: 0.4, settlingTime: 20, steadyStateError: 0 } }],
      req: { overshootPct: 10, settlingTime: 15 },
      overall: null,
      divergedAt: null,
      t0: 0,
      t1: 50,
      columns: 50,
    });
    // One column per second: overshoot at 12 … 13.5 s, settling broken from 25 s (10 + 15) to 30 s.
    const at = (k: VerdictKey): number[] => strip.cells.flatMap((c, x) => (c === k ? [x] : []));
    expect(at('overshoot_pct')).toEqual([12, 13]);
    expect(at('settling_time')).toEqual([25, 26, 27, 28, 29, 30]);
    expect(strip.broken).toEqual(['overshoot_pct', 'settling_time']);
  });
});
