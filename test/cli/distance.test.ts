import { readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { runCli, tempDir } from '../helpers/cli.js';

const A = [
  'sample,label,degree,birth,death',
  'a,x,0,0,inf',
  'a,x,0,0,0.5',
  'a,x,1,0.2,0.9',
  'a,x,1,0.3,0.5',
  'b,y,0,0,inf',
  'b,y,1,0.1,0.4',
  'c,y,0,0,inf',
  'c,y,0,0,0.2',
  'c,y,0,0.5,inf',
  '',
].join('\n');

describe('landform distance', () => {
  it('prints the symmetric matrix of bottleneck distances between the samples of one file', () => {
    const dir = tempDir();
    const file = join(dir, 'a.csv');
    writeFileSync(file, A);
    const r = runCli(['distance', file]);
    expect(r.code).toBe(0);
    // Worked by hand (Cohen-Steiner, Edelsbrunner, Harer, "Stability of persistence diagrams", 2007):
    // a–b: (0.2,0.9) to the diagonal costs 0.35, (0.3,0.5)↔(0.1,0.4) costs 0.2; c has no degree-1 pairs.
    const lines = r.stdout.trim().split('\n');
    expect(lines[0]).toBe('sample,a,b,c');
    const matrix = lines.slice(1).map((l) => l.split(',').slice(1).map(Number));
    expect(lines.slice(1).map((l) => l.split(',')[0])).toEqual(['a', 'b', 'c']);
    const want = [
      [0, 0.35, 0.35],
      [0.35, 0, 0.15],
      [0.35, 0.15, 0],
    ];
    for (let i = 0; i < 3; i++) for (let j = 0; j < 3; j++) expect(matrix[i][j]).toBeCloseTo(want[i][j], 14);
  });

  it('compares two files with Wasserstein distances, and essential classes by count', () => {
    const dir = tempDir();
    const file = join(dir, 'a.csv');
    writeFileSync(file, A);
    const other = join(dir, 'b.csv');
    writeFileSync(other, 'sample,label,degree,birth,death\nq,x,0,0,inf\nq,x,0,0,0.5\n');
    const out = join(dir, 'd.csv');
    const r = runCli([
      'distance',
      file,
      other,
      '--degree',
      '0',
      '--diagram-distance',
      'wasserstein:1',
      '--out',
      out,
    ]);
    expect(r.code).toBe(0);
    // a equals q; b lacks the (0, 0.5) point (0.25 to the diagonal); c has two essential classes, q one.
    expect(readFileSync(out, 'utf8')).toBe('sample,q\na,0\nb,0.25\nc,inf\n');
    expect(JSON.parse(readFileSync(`${out}.provenance.json`, 'utf8')).options.diagramDistance).toBe(
      'wasserstein:1',
    );
    // Dropping essential classes: c's (0, 0.2) and q's (0, 0.5) both go to the diagonal (0.1 and 0.25),
    // cheaper in the bottleneck sense than matching them (0.3).
    const dropped = runCli(['distance', file, other, '--degree', '0', '--infinite', 'drop']);
    expect(dropped.stdout).toBe('sample,q\na,0\nb,0.25\nc,0.25\n');
  });

  it('refuses a bad metric or a degree missing from a file', () => {
    const dir = tempDir();
    const file = join(dir, 'a.csv');
    writeFileSync(file, A);
    const metric = runCli(['distance', file, '--diagram-distance', 'wasserstein:0.5']);
    expect(metric.code).toBe(2);
    expect(metric.stderr).toMatch(/^landform: --diagram-distance 'wasserstein:0.5' must be[^\n]*\n$/);
    // --metric is the distance between points; here it is the old name, accepted for one release with a note.
    const old = runCli(['distance', file, '--metric', 'wasserstein:1']);
    expect(old.code).toBe(0);
    expect(old.stderr).toBe(
      'landform: note: --metric is now --diagram-distance; the old name will be removed in the next release\n',
    );
    expect(old.stdout).toBe(runCli(['distance', file, '--diagram-distance', 'wasserstein:1']).stdout);
    expect(runCli(['distance', file, '--metric', 'wasserstein:1', '--quiet']).stderr).toBe('');
    const point = runCli(['distance', file, '--metric', 'euclidean', '--quiet']);
    expect(point.code).toBe(2);
    expect(point.stderr).toMatch(/--metric is the distance between points, --diagram-distance this one\n$/);
    const degree = runCli(['distance', file, '--degree', '2']);
    expect(degree.code).toBe(2);
    expect(degree.stderr).toMatch(/a\.csv: degree 2 is not in the file/);
  });
});
