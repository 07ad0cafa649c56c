/**
 * A separate process that writes one file through the CLI's writer, for tests that must run it
 * as another user (root may create files in any folder). The test compiles it to plain JavaScript
 * beside a compiled writer (write-file.test.ts childForOtherUser) and runs:
 *   node write-child.mjs TARGET TEXT_FILE [--expect-existing]
 * Prints "ready" before writing and the outcome (JSON) after it; exit 1 with {error} on failure.
 */
import { readFileSync } from 'node:fs';
import { writeFileKeeping } from '../../../src/cli/write-file.js';

const [target, source, flag] = process.argv.slice(2);
const text = readFileSync(source, 'utf8');
process.stdout.write('ready\n');
try {
  const outcome = writeFileKeeping(target, text, { expectExisting: flag === '--expect-existing' });
  process.stdout.write(`${JSON.stringify(outcome)}\n`);
} catch (error) {
  process.stdout.write(`${JSON.stringify({ error: (error as Error).message })}\n`);
  process.exitCode = 1;
}
