/**
 * Writes the small example logs in test/fixtures/logs/ (run: npx tsx test/ident/make-fixtures.ts).
 * The test fixtures.test.ts regenerates them in memory and checks the files still match.
 */
import { writeFileSync } from 'node:fs';
import { fileURLToPath } from 'node:url';
import { Rng } from '../../src/num/index.js';
import { STEP_RESPONSES } from './synthetic.js';

/** Surge tank (parameters of plants/surge-tank.yaml), valve 0.5 -> 0.52 at 200 s, level every 5 s. */
function surgeTank(): string {
  const A = 1.5;
  const qmax = 0.008;
  const c = 0.004;
  const rng = new Rng(3);
  const lines = ['time_s,valve,level_m'];
  let h = ((qmax * 0.5) / c) ** 2;
  const f = (x: number, u: number): number => (qmax * u - c * Math.sqrt(Math.max(x, 0))) / A;
  for (let k = 0; k <= 1000; k++) {
    const t = k * 5;
    const u = t >= 200 ? 0.52 : 0.5;
    lines.push(`${t},${u},${(h + 0.0005 * rng.nextGaussian()).toFixed(5)}`);
    for (let s = 0; s < 50; s++) {
      const d = 0.1;
      const k1 = f(h, u);
      const k2 = f(h + (d / 2) * k1, u);
      const k3 = f(h + (d / 2) * k2, u);
      const k4 = f(h + d * k3, u);
      h += (d / 6) * (k1 + 2 * k2 + 2 * k3 + k4);
    }
  }
  return lines.join('\n') + '\n';
}

/** A heater outlet temperature log as a spreadsheet in a decimal-comma locale would save it. */
function heaterSemicolon(): string {
  const rng = new Rng(4);
  const step = STEP_RESPONSES.firstOrder(0.8, 40, 12);
  const lines = ['Zeit;Ventil;Temperatur'];
  const t0 = Date.UTC(2024, 2, 5, 14, 0, 0);
  for (let k = 0; k < 300; k++) {
    const t = k * 2;
    const u = t >= 60 ? 55 : 45;
    const y = 62 + 10 * step(t - 60) + 0.05 * rng.nextGaussian();
    const stamp = new Date(t0 + t * 1000).toISOString().replace('.000Z', 'Z');
    lines.push(`${stamp};${u.toFixed(1).replace('.', ',')};${y.toFixed(3).replace('.', ',')}`);
  }
  return lines.join('\r\n') + '\r\n';
}

/** Rows out of order (line 6 goes back in time). */
function unsorted(): string {
  return 'time,valve,level\n0,1,2\n1,1,2\n2,2,2.1\n3,2,2.3\n2.5,2,2.4\n4,2,2.5\n';
}

export const FIXTURES: Record<string, () => string> = {
  'surge-tank-bump.csv': surgeTank,
  'heater-semicolon-iso.csv': heaterSemicolon,
  'bad-unsorted.csv': unsorted,
};

if (import.meta.url === `file://${process.argv[1]}`) {
  for (const [name, make] of Object.entries(FIXTURES)) {
    writeFileSync(fileURLToPath(new URL(`../fixtures/logs/${name}`, import.meta.url)), make());
  }
}
