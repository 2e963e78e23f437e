import { readFileSync } from 'node:fs';
import { UserError } from '../core/errors.js';
import type { Provenance } from '../core/version.js';
import { writeFilesAtomic } from './atomic.js';

/**
 * Data files whose layout is a fixed contract (the diagram CSV, feature CSV, NPY) carry their provenance in
 * a sidecar `<file>.provenance.json`, written in the same atomic step as the file itself.
 */
export function provenancePath(file: string): string {
  return `${file}.provenance.json`;
}

export function writeWithProvenance(
  file: string,
  data: string | Uint8Array,
  provenance: Provenance,
  extra: Array<{ path: string; data: string | Uint8Array }> = [],
): void {
  writeFilesAtomic([
    { path: file, data },
    ...extra,
    { path: provenancePath(file), data: JSON.stringify(provenance, null, 2) + '\n' },
  ]);
}

/** The provenance recorded beside `file`, or undefined when there is none. */
export function readProvenance(file: string): Provenance | undefined {
  let text: string;
  try {
    text = readFileSync(provenancePath(file), 'utf8');
  } catch {
    return undefined;
  }
  try {
    return JSON.parse(text) as Provenance;
  } catch {
    throw new UserError('provenance file is not valid JSON; delete it or recompute the output', {
      file: provenancePath(file),
    });
  }
}
