import { readdirSync, readFileSync } from 'node:fs';
import { dirname, join, relative, resolve } from 'node:path';
import { describe, expect, it } from 'vitest';

/**
 * The stages of src/ stand on floors; a module may import from its own floor or the floors below, never
 * from above. The shared records (samples, diagrams, matrices) live on the ground floor (src/core), so no
 * stage reaches up for a type. The order is the one DEVELOPERS.md draws (common practice, no source: a
 * layered architecture with downward dependencies only).
 */
const FLOORS = ['core', 'io', 'homology', 'landscape', 'features', 'learn', 'report', 'demo', 'cli'] as const;

const SRC = resolve(__dirname, '../src');

function sourceFiles(dir: string): string[] {
  const out: string[] = [];
  for (const entry of readdirSync(dir, { withFileTypes: true })) {
    const path = join(dir, entry.name);
    if (entry.isDirectory()) out.push(...sourceFiles(path));
    else if (entry.name.endsWith('.ts')) out.push(path);
  }
  return out;
}

/** Every relative module a file imports, statically or through `import()`. */
function importsOf(file: string): string[] {
  const text = readFileSync(file, 'utf8');
  const found: string[] = [];
  const pattern = /(?:from\s+|import\(\s*)'(\.{1,2}\/[^']+)'/g;
  for (let m = pattern.exec(text); m !== null; m = pattern.exec(text)) found.push(m[1]);
  return found;
}

function floorOf(path: string): number {
  const top = relative(SRC, path).split(/[\\/]/)[0];
  return FLOORS.indexOf(top as (typeof FLOORS)[number]);
}

describe('architecture', () => {
  const files = sourceFiles(SRC).filter((f) => dirname(f) !== SRC);

  it('places every module of src/ on a known floor', () => {
    const unplaced = files.filter((f) => floorOf(f) < 0).map((f) => relative(SRC, f));
    expect(unplaced).toEqual([]);
    expect(files.length).toBeGreaterThan(100);
  });

  it('imports only from the same floor or below', () => {
    const upward: string[] = [];
    for (const file of files) {
      const floor = floorOf(file);
      for (const spec of importsOf(file)) {
        const target = resolve(dirname(file), spec);
        const targetFloor = floorOf(target);
        if (targetFloor > floor) upward.push(`${relative(SRC, file)} → ${relative(SRC, target)}`);
      }
    }
    expect(upward).toEqual([]);
  });

  it('keeps the ground floor free of every other stage', () => {
    const core = files.filter((f) => floorOf(f) === 0);
    const reaches = core.flatMap((f) =>
      importsOf(f)
        .map((spec) => resolve(dirname(f), spec))
        .filter((target) => floorOf(target) !== 0)
        .map((target) => `${relative(SRC, f)} → ${relative(SRC, target)}`),
    );
    expect(reaches).toEqual([]);
    // the shared records are there
    for (const name of ['sample.ts', 'diagram.ts', 'matrix.ts'])
      expect(core.map((f) => relative(join(SRC, 'core'), f))).toContain(name);
  });

  it('finds an upward import when one is there (the check can fail)', () => {
    const fake = join(SRC, 'io', 'fake.ts');
    const target = resolve(dirname(fake), '../learn/model-folder.js');
    expect(floorOf(target)).toBeGreaterThan(floorOf(fake));
  });
});
