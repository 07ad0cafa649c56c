/**
 * The fault-finding suite (issue 13): random and mutated input through the whole command line,
 * in-process (`main(argv, fakeIo)`), with fixed seeds and case budgets so that a run is the same
 * on every machine and bounded in time (about a minute on the 2-core CI machine).
 *
 * The contract on every case: `main` resolves (never throws), the exit status is 0, 1 or 2, a 2
 * comes with a message on stderr that starts with its position (FILE:LINE:COL, FILE:LINE, FILE)
 * or `looprig:` (an option), and no line of stderr is a stack frame or an internal error. Speed is
 * not asserted here (benchmarks measure it); a case that hangs meets the test's timeout.
 */
import { readFileSync } from 'node:fs';
import fc from 'fast-check';
import { describe, expect, it } from 'vitest';
import { main } from '../../src/cli/index.js';
import { fakeIo } from './fake-io.js';

const SEED = 13;

const PLANT = readFileSync(new URL('../fixtures/plants/fopdt-heater.yaml', import.meta.url), 'utf8');
const ODE = readFileSync(new URL('../fixtures/plants/surge-tank.yaml', import.meta.url), 'utf8');
/** The log cut to 200 rows: the fit stays quick, the structure (header, step) stays. */
const LOG = readFileSync(new URL('../fixtures/logs/surge-tank-bump.csv', import.meta.url), 'utf8').split('\n').slice(0, 201).join('\n');

/** A stderr line that says where: FILE:LINE:COL, FILE:LINE, FILE, or looprig: for options. */
const POSITIONED = /^(looprig: |--set |[^\s:]+(:\d+(:\d+)?)?: )/;

async function expectContract(argv: string[], files: Record<string, string>): Promise<void> {
  const io = fakeIo(files);
  let code: number;
  try {
    code = await main(argv, io);
  } catch (error) {
    throw new Error(`main threw on ${JSON.stringify(argv)}: ${(error as Error).stack}`);
  }
  const context = `${JSON.stringify(argv)}\n${io.stderr.slice(0, 500)}`;
  expect([0, 1, 2], context).toContain(code);
  expect(io.stderr, context).not.toMatch(/internal error|^\s+at \S|RangeError|TypeError/m);
  if (code === 2) {
    const first = io.stderr.split('\n').find((l) => l.trim() !== '' && !/: warning: /.test(l));
    expect(first, context).toBeDefined();
    expect(first, context).toMatch(POSITIONED);
  }
}

/** Numbers at the edges: huge, tiny, negative, zero, non-finite, and plain. */
const edgeNumber = fc.constantFrom(
  '0', '-1', '1', '2.5', '1e308', '-1e308', '1e-320', '2.5e-300', '1e-9', '1e9', '4294967296', '1e100',
  '.inf', '-.inf', '.nan', '-0', '3 s', '1e8 s', '1e-7 min', '99999 h',
);
/** Values of the wrong kind. */
const wrongType = fc.constantFrom('[1, 2]', '{a: 1}', 'text', '"1"', 'true', '~', '[]', '{}', '*nope', '&a 1', '!!binary x');

describe('fault suite: the plant file', () => {
  const numberLines = (text: string): number[] =>
    text.split('\n').flatMap((l, i) => (/^\s*[\w]+:\s*[-\d.]/.test(l) || /\{.*:\s*[-\d.]/.test(l) ? [i] : []));

  it('every numeric value replaced by an edge number or a wrong type: run keeps the contract', async () => {
    for (const base of [PLANT, ODE]) {
      const lines = base.split('\n');
      const targets = numberLines(base);
      await fc.assert(
        fc.asyncProperty(fc.nat(), fc.oneof(edgeNumber, wrongType), async (pick, value) => {
          const i = targets[pick % targets.length];
          // Replace the first number on the line (a field value or an entry of a flow mapping).
          const edited = lines.map((l, j) => (j === i ? l.replace(/(:\s*)(-?[\d.][\w.+-]*(\s+(s|min|h|ms)\b)?)/, `$1${value}`) : l)).join('\n');
          await expectContract(['run', 'p.yaml'], { 'p.yaml': edited });
        }),
        { seed: SEED, numRuns: 120 },
      );
    }
  }, 240_000);

  it('truncations and byte flips: run keeps the contract', async () => {
    await fc.assert(
      fc.asyncProperty(
        fc.nat(),
        fc.constantFrom('truncate', 'flip', 'delete-line', 'duplicate-line'),
        fc.integer({ min: 0, max: 255 }),
        async (pos, op, byte) => {
          const text = pos % 2 === 0 ? PLANT : ODE;
          const i = pos % text.length;
          const lines = text.split('\n');
          const li = pos % lines.length;
          const edited =
            op === 'truncate'
              ? text.slice(0, i)
              : op === 'flip'
                ? text.slice(0, i) + String.fromCharCode(byte) + text.slice(i + 1)
                : op === 'delete-line'
                  ? [...lines.slice(0, li), ...lines.slice(li + 1)].join('\n')
                  : [...lines.slice(0, li + 1), ...lines.slice(li)].join('\n');
          await expectContract(['run', 'p.yaml'], { 'p.yaml': edited });
        },
      ),
      { seed: SEED, numRuns: 200 },
    );
  }, 240_000);
});

describe('fault suite: the CSV log', () => {
  it('cells replaced, rows cut, bytes flipped: fit keeps the contract', async () => {
    const rows = LOG.split('\n');
    const cell = fc.constantFrom('', 'x', '1e300', '-1e300', '1e-320', 'NaN', 'inf', '1,5', '"', '0', '1e10', '-5', ';', '\t');
    await fc.assert(
      fc.asyncProperty(fc.nat(), fc.nat(), cell, fc.constantFrom('cell', 'time', 'cut', 'flip', 'swap'), async (r, c, value, op) => {
        const out = [...rows];
        const ri = 1 + (r % (rows.length - 2));
        const cells = out[ri].split(',');
        if (op === 'cell') cells[c % cells.length] = value;
        else if (op === 'time') cells[0] = value === '' ? '1e10' : value;
        if (op === 'cell' || op === 'time') out[ri] = cells.join(',');
        let text = out.join('\n');
        if (op === 'cut') text = text.slice(0, (r * 7) % text.length);
        if (op === 'flip') text = text.slice(0, r % text.length) + value + text.slice((r % text.length) + 1);
        if (op === 'swap') [out[ri], out[ri + 1]] = [out[ri + 1], out[ri]];
        if (op === 'swap') text = out.join('\n');
        await expectContract(['fit', 'l.csv'], { 'l.csv': text });
      }),
      { seed: SEED, numRuns: 150 },
    );
  }, 240_000);
});

describe('fault suite: command-line options', () => {
  const value = fc.constantFrom('0', '-1', '1', '3', '1e9', '1e308', '1e-320', 'NaN', 'abc', '', '10min', '1e-12', '2/3', '0/0', 'kc=1e308', 'ti=-1', 'kp=x', '=');
  const options: Record<string, readonly string[]> = {
    run: ['--duration', '--step', '--set', '--csv'],
    diagnose: [],
    export: ['--form', '--time-unit', '--method'],
    suggest: ['--tauc', '--lambda', '--samples', '--jobs'],
    compare: ['--samples'],
    optimize: ['--ms', '--cost', '--du-weight', '--structure', '--evaluations'],
    check: ['--shard'],
    fit: ['--from', '--to', '--time', '--input', '--output', '--model'],
  };
  const flags = ['--json', '--no-limits', '--nominal', '--relay', '--discrete', '--bogus'];

  it('random options and values on every command keep the contract', async () => {
    const commands = Object.keys(options);
    await fc.assert(
      fc.asyncProperty(
        fc.nat(),
        fc.array(fc.tuple(fc.nat(), value), { maxLength: 3 }),
        fc.array(fc.constantFrom(...flags), { maxLength: 2 }),
        async (ci, pairs, extra) => {
          const cmd = commands[ci % commands.length];
          const argv = [cmd, cmd === 'fit' ? 'l.csv' : 'p.yaml'];
          const opts = options[cmd];
          for (const [oi, v] of pairs) if (opts.length > 0) argv.push(opts[oi % opts.length], v);
          argv.push(...extra.filter((f) => f !== '--json' || !argv.includes('--csv')));
          // The optimiser's wall-clock limit is its own option; keep it short here.
          if (cmd === 'optimize') argv.push('--time', '1');
          await expectContract(argv, { 'p.yaml': PLANT, 'l.csv': LOG });
        },
      ),
      { seed: SEED, numRuns: 150 },
    );
  }, 240_000);
});
