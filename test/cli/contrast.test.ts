import { readFileSync, rmSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { afterAll, describe, expect, it } from 'vitest';
import { Random } from '../../src/core/random.js';
import { runCli, tempDir, withoutCompletion } from '../helpers/cli.js';

const dir = tempDir();
afterAll(() => rmSync(dir, { recursive: true, force: true }));

/** A diagram CSV made here: class `big` has longer H1 bars than `small` and `also-small`. */
function diagramFile(): string {
  const random = new Random(21);
  const lines = ['sample,label,degree,birth,death'];
  const classes: Array<[string, number]> = [
    ['small', 0.4],
    ['also-small', 0.4],
    ['big', 1.2],
  ];
  for (const [label, life] of classes) {
    for (let i = 0; i < 12; i++) {
      const id = `${label}-${i}`;
      lines.push(`${id},${label},0,0,inf`);
      for (let p = 0; p < 3; p++) {
        const b = random.uniform(0, 0.5);
        lines.push(`${id},${label},0,0,${random.uniform(0.05, 0.3).toFixed(4)}`);
        lines.push(`${id},${label},1,${b.toFixed(4)},${(b + life * random.uniform(0.5, 1.5)).toFixed(4)}`);
      }
    }
  }
  const file = join(dir, 'bars.csv');
  writeFileSync(file, lines.join('\n') + '\n');
  return file;
}

describe('landform contrast', () => {
  const file = diagramFile();

  it('prints the JSON contract: every pair × degree with p and Holm-adjusted p', () => {
    const result = runCli(['contrast', file, '--degrees', '0,1', '--permutations', '199', '--seed', '3']);
    expect(withoutCompletion(result.stderr)).toBe('');
    expect(result.code).toBe(0);
    const json = JSON.parse(result.stdout) as { seed: number; tests: Array<Record<string, unknown>> };
    expect(json.seed).toBe(3);
    expect(json.tests.map((t) => `${t.degree}:${t.a}|${t.b}`)).toEqual([
      '0:also-small|big',
      '0:also-small|small',
      '0:big|small',
      '1:also-small|big',
      '1:also-small|small',
      '1:big|small',
    ]);
    for (const t of json.tests) {
      expect(Object.keys(t)).toEqual(['a', 'b', 'degree', 'statistic', 'p', 'pAdjusted']);
      expect(t.p as number).toBeGreaterThanOrEqual(1 / 200);
      expect(t.pAdjusted as number).toBeGreaterThanOrEqual(t.p as number);
    }
    const h1 = (a: string, b: string) =>
      json.tests.find((t) => t.degree === 1 && t.a === a && t.b === b) as Record<string, number>;
    // The big class differs clearly in H1; Holm over 6 tests (Holm 1979) multiplies the smallest p by 6.
    expect(h1('big', 'small').pAdjusted).toBeLessThan(0.05);
    expect(h1('also-small', 'big').pAdjusted).toBeLessThan(0.05);
    // Same distribution: no evidence of a difference (a loose check, common practice, no source).
    expect(h1('also-small', 'small').p).toBeGreaterThan(0.01);
    // Same seed, same output.
    expect(
      runCli(['contrast', file, '--degrees', '0,1', '--permutations', '199', '--seed', '3']).stdout,
    ).toBe(result.stdout);
  });

  it('prints a text table and writes to --out atomically', () => {
    const out = join(dir, 'tests.txt');
    const result = runCli(['contrast', file, '--format', 'text', '--permutations', '99', '--out', out]);
    expect(result.code).toBe(0);
    const text = readFileSync(out, 'utf8');
    expect(text).toMatch(/^degree\s+class a\s+class b/);
    // Degrees 0,1 by default, as in every command: 3 pairs × 2 degrees.
    expect(text).toContain('6 tests (every pair of classes × degree), Holm-corrected together');
    expect(result.stderr).toMatch(
      new RegExp(
        `^landform contrast: wrote ${out.replace(/[.*+?^${}()|[\]\\]/g, '\\$&')} \\(text class contrasts, 36 samples, \\d+\\.\\d s\\)\n$`,
      ),
    );
  });

  it('computes diagrams of point clouds first', () => {
    const random = new Random(5);
    const lines = ['sample,label,x,y'];
    for (const label of ['circle', 'blob']) {
      for (let i = 0; i < 6; i++) {
        for (let p = 0; p < 24; p++) {
          const a = random.uniform(0, 2 * Math.PI);
          const r = label === 'circle' ? 1 + random.normal(0, 0.03) : Math.sqrt(random.next()) * 0.6;
          lines.push(
            `${label}-${i},${label},${(r * Math.cos(a)).toFixed(4)},${(r * Math.sin(a)).toFixed(4)}`,
          );
        }
      }
    }
    const clouds = join(dir, 'clouds.csv');
    writeFileSync(clouds, lines.join('\n') + '\n');
    const result = runCli(['contrast', clouds, '--permutations', '199', '--workers', '1']);
    expect(withoutCompletion(result.stderr)).toBe('');
    const json = JSON.parse(result.stdout) as {
      tests: Array<{ a: string; b: string; degree: number; p: number }>;
    };
    // Degrees 0,1 by default, as in diagrams, evaluate and train.
    expect(json.tests.map((t) => t.degree)).toEqual([0, 1]);
    // A circle has one long H1 bar, a filled blob none: with 6 against 6 every relabelling but the
    // observed one (and its mirror) gives a smaller distance, so p is near its floor 1/200.
    expect(json.tests[1].p).toBeLessThan(0.02);
  });

  it('refuses a single class, an unknown format and a bad p with one line and exit 2', () => {
    const one = join(dir, 'one.csv');
    writeFileSync(one, 'sample,label,degree,birth,death\na,x,1,0,1\nb,x,1,0,2\n');
    const single = runCli(['contrast', one]);
    expect(single.code).toBe(2);
    expect(single.stderr).toMatch(
      /^landform: .*one\.csv: found 1 class; contrast needs samples of at least two labelled classes\n$/,
    );
    const format = runCli(['contrast', file, '--format', 'xml']);
    expect(format.code).toBe(2);
    expect(format.stderr).toBe("landform: --format 'xml' is not known; choose from json, text\n");
    const kind = runCli(['contrast', file, '--kind', 'nope']);
    expect(kind.code).toBe(2);
    expect(kind.stderr).toBe(
      "landform: --kind 'nope' is not known; choose from points, distances, signal, image, table, diagrams\n",
    );
    const close = runCli(['contrast', file, '--kind', 'diagram']);
    expect(close.stderr).toBe(
      "landform: --kind 'diagram' is not known (did you mean diagrams?); choose from points, distances, signal, image, table, diagrams\n",
    );
    const p = runCli(['contrast', file, '--p', '0.5']);
    expect(p.code).toBe(2);
    expect(p.stderr).toBe("landform: --p '0.5' must be at least 1\n");
  });
});
