import { existsSync, readFileSync } from 'node:fs';
import { dirname, join } from 'node:path';
import { fileURLToPath } from 'node:url';

let cachedRoot: string | undefined;
let cachedVersion: string | undefined;

/** The package's root folder (holding package.json), found from this file whether compiled or not. */
export function packageRoot(): string {
  if (cachedRoot === undefined) {
    let dir = dirname(fileURLToPath(import.meta.url));
    for (;;) {
      const candidate = join(dir, 'package.json');
      if (
        existsSync(candidate) &&
        (JSON.parse(readFileSync(candidate, 'utf8')) as { name?: string }).name === 'landform'
      )
        break;
      const parent = dirname(dir);
      if (parent === dir)
        throw new Error('landform: package.json not found above ' + fileURLToPath(import.meta.url));
      dir = parent;
    }
    cachedRoot = dir;
  }
  return cachedRoot;
}

/** landform's version, read from package.json once. */
export function version(): string {
  if (cachedVersion === undefined) {
    const text = readFileSync(join(packageRoot(), 'package.json'), 'utf8');
    cachedVersion = (JSON.parse(text) as { version: string }).version;
  }
  return cachedVersion;
}

/** What every output records: the tool, its version, the command, the options and the seed. */
export interface Provenance {
  tool: 'landform';
  version: string;
  command: string;
  options: Record<string, unknown>;
  seed?: number;
}

export function provenance(command: string, options: Record<string, unknown>, seed?: number): Provenance {
  return { tool: 'landform', version: version(), command, options, ...(seed === undefined ? {} : { seed }) };
}
