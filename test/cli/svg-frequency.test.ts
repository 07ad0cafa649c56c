/**
 * `looprig run FILE --svg-frequency OUT.svg`: the frequency view's plots as an SVG document, from
 * the same record as the screen (the loop at the operating point of the largest Ms): a well-formed
 * document with the four panels, the figures of that point (the Ms every surface reports), the
 * file's gains drawn too under --set, and a clear refusal for a loop that is not the plain PID loop.
 */
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { main } from '../../src/cli/index.js';
import { pointFigures, worstMargins } from '../../src/loop/index.js';
import { loadPlant } from '../../src/model/index.js';
import { tuningContext } from '../../src/tune/index.js';
import { fakeIo } from './fake-io.js';

describe('run --svg-frequency', () => {
  it('writes Bode, |S| |T| and Nyquist panels with the worst point’s figures; --set adds the file’s gains dashed', async () => {
    const io = fakeIo();
    expect(await main(['run', 'plants/surge-tank.yaml', '--set', 'kc=4', '--svg-frequency', 'f.svg'], io)).toBe(0);
    const svg = io.files.get('f.svg')!;
    expect(svg.startsWith('<?xml')).toBe(true);
    expect(svg.trimEnd().endsWith('</svg>')).toBe(true);
    expect(svg).not.toMatch(/NaN|undefined|Infinity/);
    for (const s of ['|L| (dB)', 'arg L (°)', '|S|, |T| (dB)', 'Im L', 'Re L', 'ω (rad/s)', '>ωc<', '1/Ms = ', 'in service (gains in the file)', 'worst at level']) expect(svg).toContain(s);
    // Four clipped panels; the file's gains dashed beside the gains run.
    expect(svg.match(/<clipPath /g)).toHaveLength(4);
    expect(svg).toContain('stroke-dasharray="5 3" clip-path');
    // The Ms shown is the worst over the operating points, the figure check and the screen report.
    const plant = loadPlant(readFileSync('plants/surge-tank.yaml', 'utf8'), 'surge-tank.yaml').plant!;
    const gains = { ...plant.loop.controller.gains, kc: 4 };
    const ctx = tuningContext(plant);
    const ms = worstMargins(pointFigures(ctx.points, gains, plant))!.maxSensitivity;
    expect(svg).toContain(`Ms ${Number(ms.toPrecision(3))}`);
  }, 60000);

  it('a Smith predictor is not the plain PID loop: exit 2 with the reason, no file', async () => {
    const io = fakeIo();
    expect(await main(['run', 'test/fixtures/check/smith-predictor.yaml', '--svg-frequency', 's.svg'], io)).toBe(2);
    expect(io.stderr).toContain('--svg-frequency draws the plain PID loop; this loop is smith_pi');
    expect(io.files.has('s.svg')).toBe(false);
  }, 60000);
});
