import { describe, it, expect } from 'vitest';
import { main } from '../../src/cli/index.js';
import { fakeIo } from './fake-io.js';

// A Smith predictor needs a self-regulating internal model; an integrating plant has none.
const FILE = `name: smith on an integrator
model: { type: integrating, gain: 0.1, delay: 5 s }
loop:
  sample_time: 0.5 s
  controller: { structure: smith_pi, kc: 1, ti: 20 s }
  trial:
    duration: 100 s
    events: [{ at: 1 s, setpoint: 1 }]
`;

describe('a structure the plant cannot support', () => {
  it('is a clear message and exit 2, not a stack trace', async () => {
    const io = fakeIo({ 'smith.yaml': FILE });
    const code = await main(['run', 'smith.yaml'], io);
    expect(code).toBe(2);
    expect(io.stderr).toMatch(/^looprig: /);
    expect(io.stderr).not.toMatch(/\n\s+at /);
  });
});
