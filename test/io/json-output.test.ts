import { readdirSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { provenance } from '../../src/core/version.js';
import { formatJsonOutput, writeJsonOutput } from '../../src/io/json-output.js';
import { tempDir } from '../helpers/cli.js';

describe('JSON outputs', () => {
  it('puts provenance first and writes typed arrays and non-finite numbers in a form JSON can hold', () => {
    // Source: RFC 8259, "The JavaScript Object Notation (JSON) Data Interchange Format", 2017, section 6:
    // Infinity and NaN are not permitted as numbers, so they are written as strings here.
    const text = formatJsonOutput(
      {
        deaths: Float64Array.from([0.5, Infinity]),
        gap: -Infinity,
        bad: Number.NaN,
        counts: Int32Array.from([1, 2]),
      },
      provenance('landscape', { depth: 5 }, 3),
    );
    const parsed = JSON.parse(text);
    expect(Object.keys(parsed).slice(0, 5)).toEqual(['tool', 'version', 'command', 'options', 'seed']);
    expect(parsed).toMatchObject({ tool: 'landform', command: 'landscape', options: { depth: 5 }, seed: 3 });
    expect(parsed.deaths).toEqual([0.5, 'inf']);
    expect(parsed.gap).toBe('-inf');
    expect(parsed.bad).toBe('nan');
    expect(parsed.counts).toEqual([1, 2]);
    expect(text.endsWith('}\n')).toBe(true);
  });

  it('writes atomically, leaving only the final file', () => {
    const dir = tempDir();
    writeJsonOutput(join(dir, 'out.json'), { a: 1 }, provenance('inspect', {}));
    expect(readdirSync(dir)).toEqual(['out.json']);
    expect(JSON.parse(readFileSync(join(dir, 'out.json'), 'utf8')).a).toBe(1);
  });
});
