/** The output panel's series: with a sticky valve the controller's command is drawn beside the stem. */
import { describe, expect, it } from 'vitest';
import { createTrace } from '../../src/sim/index.js';
import { outputSeries } from '../../src/tui/trend-series.js';

function trace() {
  const tr = createTrace(4, []);
  tr.t.set([0, 1, 2, 3]);
  tr.uc.set([10, 12, 14, 16]);
  tr.u.set([10, 10, 10, 15]);
  tr.length = 4;
  return tr;
}

describe('outputSeries', () => {
  it('draws the command (dashed, the stem setpoint) and the stem when the valve has stiction', () => {
    const s = outputSeries(trace(), null, 0, 3, 4, { min: 0, max: 100, stiction: { static: 2 } });
    const command = s.filter((x) => x.tag === 'sp');
    const stem = s.filter((x) => x.tag === 'output');
    // Each one line (the middle of each column) with the column's range beside it.
    expect(command).toHaveLength(1);
    expect(stem).toHaveLength(1);
    expect(Math.max(...Array.from(command[0].spread!.hi))).toBe(16);
    expect(Math.max(...Array.from(stem[0].spread!.hi))).toBe(15);
  });
  it('draws only the actuator output on a clean valve', () => {
    expect(outputSeries(trace(), null, 0, 3, 4, { min: 0, max: 100 }).some((x) => x.tag === 'sp')).toBe(false);
  });
});
