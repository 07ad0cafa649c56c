/**
 * A separate process that writes one file through the CLI's writer, for tests that must kill
 * a writer mid-write or run it as another user. Usage:
 *   node --import tsx/esm test/cli/helpers/write-child.ts TARGET TEXT_FILE|--fill=LABEL:BYTES [--expect-existing]
 * Prints "ready" before writing and the outcome (JSON) after it.
 */
import { readFileSync } from 'node:fs';
import { writeFileKeeping } from '../../../src/cli/write-file.js';
import { fillText } from './fill-text.js';

const [target, source, flag] = process.argv.slice(2);
const fill = /^--fill=([a-z]+):(\d+)$/.exec(source);
const text = fill !== null ? fillText(fill[1], Number(fill[2])) : readFileSync(source, 'utf8');
process.stdout.write('ready\n');
try {
  const outcome = writeFileKeeping(target, text, { expectExisting: flag === '--expect-existing' });
  process.stdout.write(`${JSON.stringify(outcome)}\n`);
} catch (error) {
  process.stdout.write(`${JSON.stringify({ error: (error as Error).message })}\n`);
  process.exitCode = 1;
}
