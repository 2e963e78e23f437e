import type { Provenance } from '../core/version.js';
import { writeFileAtomic } from './atomic.js';

/**
 * JSON outputs carry their own provenance: `tool`, `version`, `command`, `options` and `seed` come first, then
 * the body. Numbers that JSON cannot hold are written as strings: `"inf"`, `"-inf"`, `"nan"` (JSON, RFC 8259,
 * has no infinities), so `JSON.parse` of the file never fails and the values stay recognisable.
 */
export function formatJsonOutput(body: Record<string, unknown>, provenance: Provenance): string {
  const record = { ...provenance, ...body };
  return `${JSON.stringify(record, jsonValue, 2)}\n`;
}

function jsonValue(_key: string, value: unknown): unknown {
  if (typeof value === 'number' && !Number.isFinite(value))
    return Number.isNaN(value) ? 'nan' : value > 0 ? 'inf' : '-inf';
  if (ArrayBuffer.isView(value) && !(value instanceof DataView))
    return Array.from(value as unknown as ArrayLike<number>);
  return value;
}

/** Writes a JSON output atomically (temporary name in the same folder, then renamed). */
export function writeJsonOutput(path: string, body: Record<string, unknown>, provenance: Provenance): void {
  writeFileAtomic(path, formatJsonOutput(body, provenance));
}
