/**
 * `looprig schema`: print the plant file's JSON Schema (generated from the loader's own field
 * tables). The package ships the same document as plants/plant.schema.json.
 */
import { plantJsonSchema } from '../../model/index.js';
import { UserError } from '../errors.js';
import type { Io } from '../io.js';

export const SCHEMA_USAGE = `Usage: looprig schema

Prints the JSON Schema (draft-07) of plant files on stdout. Editors that use the YAML language
server pick it up from a first line like
  # yaml-language-server: $schema=plant.schema.json
`;

/** The schema text exactly as committed in plants/plant.schema.json. */
export function schemaText(): string {
  return `${JSON.stringify(plantJsonSchema(), null, 2)}\n`;
}

/** `looprig schema` */
export async function schemaCommand(args: readonly string[], io: Io): Promise<number> {
  if (args.includes('-h') || args.includes('--help')) {
    io.out(SCHEMA_USAGE);
    return 0;
  }
  if (args.length > 0) throw new UserError(`schema: no arguments expected, got ${args.join(' ')}`);
  io.out(schemaText());
  return 0;
}
