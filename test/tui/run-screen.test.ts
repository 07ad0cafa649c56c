/**
 * The entry point's refusals, in-process: a file that cannot be read or loaded, and no terminal
 * to take keys from. Each exits 2 with a message, never a stack trace.
 */
import { describe, it, expect } from 'vitest';
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { runScreen } from '../../src/tui/run-screen.js';

const root = join(import.meta.dirname, '..', '..');

function sink() {
  const chunks: string[] = [];
  return { stream: { write: (s: string) => (chunks.push(s), true) } as unknown as NodeJS.WriteStream, text: () => chunks.join('') };
}

describe('tui runScreen refusals', () => {
  it('a plant file with an error: FILE:LINE:COL message, exit 2', async () => {
    const file = 'test/fixtures/bad/unknown-type.yaml';
    const text = readFileSync(join(root, file), 'utf8');
    const err = sink();
    const out = sink();
    const code = await runScreen(file, {
      io: { readText: () => text, writeText: () => undefined },
      stderr: err.stream,
      stdout: out.stream,
    });
    expect(code).toBe(2);
    expect(err.text()).toMatch(/^test\/fixtures\/bad\/unknown-type\.yaml:\d+:\d+: /);
    expect(err.text()).not.toMatch(/\n\s+at /);
    // The terminal was never taken over.
    expect(out.text()).toBe('');
  });

  it('a file that cannot be read: exit 2 with the reason', async () => {
    const err = sink();
    const code = await runScreen('nowhere.yaml', {
      io: {
        readText: () => {
          throw new Error('ENOENT: no such file');
        },
        writeText: () => undefined,
      },
      stderr: err.stream,
    });
    expect(code).toBe(2);
    expect(err.text()).toBe('looprig: cannot read nowhere.yaml: ENOENT: no such file\n');
  });

  it('no terminal for keys: exit 2, pointing at looprig run', async () => {
    const file = join(root, 'test/fixtures/plants/surge-tank.yaml');
    const err = sink();
    const code = await runScreen(file, {
      io: { readText: (p) => readFileSync(p, 'utf8'), writeText: () => undefined },
      stdin: { isTTY: false } as unknown as NodeJS.ReadStream,
      stderr: err.stream,
    });
    expect(code).toBe(2);
    expect(err.text()).toContain("use 'looprig run FILE'");
  });
});

describe('tui runScreen: a structure the plant cannot support', () => {
  it('exit 2 with the reason from the tune layer, no stack trace, the terminal never taken', async () => {
    const text = [
      'name: Smith on an integrator',
      'model: { type: integrating, gain: 0.1, delay: 5 s }',
      'loop:',
      '  sample_time: 0.5 s',
      '  controller: { structure: smith_pi, kc: 1, ti: 20 s }',
      '  trial: { duration: 100 s, events: [{ at: 5 s, setpoint: 1 }] }',
      '',
    ].join('\n');
    const err = sink();
    const out = sink();
    const code = await runScreen('s.yaml', { io: { readText: () => text, writeText: () => undefined }, stderr: err.stream, stdout: out.stream });
    expect(code).toBe(2);
    expect(err.text()).toMatch(/^s\.yaml: cannot set the loop up: the Smith predictor .*integrating plant/);
    expect(err.text()).not.toMatch(/\n\s+at /);
    expect(out.text()).toBe('');
  });
});
