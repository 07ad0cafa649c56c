/** `looprig schema` prints the committed plants/plant.schema.json byte for byte. */
import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import { main } from '../../src/cli/index.js';
import { fakeIo } from './fake-io.js';

describe('looprig schema', () => {
  it('prints the schema shipped in plants/ (the package ships plants/), exit 0', async () => {
    const io = fakeIo();
    expect(await main(['schema'], io)).toBe(0);
    expect(io.stdout).toBe(readFileSync('plants/plant.schema.json', 'utf8'));
    expect(JSON.parse(io.stdout).$schema).toBe('http://json-schema.org/draft-07/schema#');
  });

  it('arguments are refused (exit 2); --help explains the modeline', async () => {
    const io = fakeIo();
    expect(await main(['schema', 'x'], io)).toBe(2);
    const help = fakeIo();
    expect(await main(['schema', '--help'], help)).toBe(0);
    expect(help.stdout).toContain('# yaml-language-server: $schema=');
  });
});
