/**
 * `looprig --version`: the version field of the package.json beside the running code, read when
 * asked (not copied into the source at build time), so it is the one the package was published with.
 */
import { join } from 'node:path';
import { UserError } from './errors.js';
import type { Io } from './io.js';
import { packageRoot } from './plants-dir.js';

/** The package.json the version is read from. */
export function packageJsonPath(): string {
  return join(packageRoot(), 'package.json');
}

/** The package's version string, e.g. "0.1.0". */
export function packageVersion(io: Io): string {
  const path = packageJsonPath();
  let version: unknown;
  try {
    version = (JSON.parse(io.readText(path)) as { version?: unknown }).version;
  } catch (error) {
    throw new UserError(`cannot read the version from ${path}: ${(error as Error).message}`);
  }
  if (typeof version !== 'string' || version === '') throw new UserError(`${path} has no version field`);
  return version;
}
