/**
 * Every bundled plant loads, runs its trial through `looprig run --json` and meets the
 * requirements its header promises.
 */
import { describe, it, expect } from 'vitest';
import { readdirSync } from 'node:fs';
import { dirname, join, resolve } from 'node:path';
import { fileURLToPath } from 'node:url';
import { main } from '../../src/cli/index.js';
import { fakeIo } from '../cli/fake-io.js';

const plantsDir = resolve(dirname(fileURLToPath(import.meta.url)), '..', '..', 'plants');
const files = readdirSync(plantsDir).filter((f) => f.endsWith('.yaml')).sort();

/** Requirements a plant fails on purpose (stated in its header comment). */
const DELIBERATE_FAILURES: Record<string, string[]> = {
  'pipe-outlet-temperature.yaml': ['settling_time'],
};

/**
 * Plants that cycle on purpose (their header explains the limit cycle of a sticky valve): every
 * step is still moving at its end, and they set no requirements.
 */
const DELIBERATE_CYCLES = new Set(['sticky-flow-valve.yaml']);

describe('bundled plants', () => {
  it('there are at least six', () => {
    expect(files.length).toBeGreaterThanOrEqual(6);
    expect(files).toContain('surge-tank.yaml');
  });

  for (const name of files) {
    it(`${name}: exit 0, status ok, finite metrics, requirements as documented`, async () => {
      const io = fakeIo();
      const code = await main(['run', join(plantsDir, name), '--json'], io);
      expect(io.stderr).toBe(''); // no loader warnings either
      expect(code).toBe(0);
      const doc = JSON.parse(io.stdout);
      expect(doc.status).toBe('ok');
      expect(doc.diverged_at).toBeNull();
      if (DELIBERATE_CYCLES.has(name)) {
        expect(doc.metrics.settling_time).toBeNull();
        expect(doc.events.filter((e: { kind: string }) => e.kind === 'setpoint').every((e: { settled: boolean }) => !e.settled)).toBe(true);
        expect(doc.requirements).toEqual([]);
        return;
      }
      const { worst_step_at: from, ...figures } = doc.metrics;
      for (const [key, value] of Object.entries(figures)) {
        expect(Number.isFinite(value), `${key} = ${String(value)}`).toBe(true);
      }
      // Each step figure names the setpoint step it comes from (the worst one).
      for (const [key, at] of Object.entries(from as Record<string, number>)) {
        expect(doc.events.some((e: { kind: string; at: number }) => e.kind === 'setpoint' && e.at === at), `${key} from ${at}`).toBe(true);
      }
      expect(doc.events.length).toBeGreaterThanOrEqual(2); // a setpoint step and a disturbance at least
      expect(doc.events.some((e: { kind: string }) => e.kind === 'disturbance')).toBe(true);
      for (const e of doc.events) {
        if (e.kind === 'disturbance') expect(Number.isFinite(e.recovery_time), `recovery at ${e.at}`).toBe(true);
      }
      expect(doc.requirements.length).toBeGreaterThanOrEqual(3);
      const failed = doc.requirements.filter((r: { pass: boolean }) => !r.pass).map((r: { name: string }) => r.name);
      expect(failed).toEqual(DELIBERATE_FAILURES[name] ?? []);
    });
  }
});
