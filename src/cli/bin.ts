#!/usr/bin/env node
import { UserError } from './errors.js';
import { nodeIo } from './io.js';
import { main } from './main.js';

main(process.argv.slice(2), nodeIo()).then(
  (code) => {
    process.exitCode = code;
  },
  (error: unknown) => {
    if (error instanceof UserError) {
      process.stderr.write(`looprig: ${error.message}\n`);
      process.exitCode = error.exitCode;
      return;
    }
    // A bug, not a user mistake: show where it happened.
    process.stderr.write(`looprig: internal error\n${error instanceof Error ? (error.stack ?? error.message) : String(error)}\n`);
    process.exitCode = 70;
  },
);
