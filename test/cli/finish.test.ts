import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { completionLine, elapsed } from '../../src/cli/finish.js';
import { COMPLETION_LINE, runCli, tempDir } from '../helpers/cli.js';

describe('the completion line (src/cli/finish.ts)', () => {
  it('has one format', () => {
    expect(completionLine('diagrams', 'd.csv', 'CSV diagrams', 75, 1.234)).toBe(
      'landform diagrams: wrote d.csv (CSV diagrams, 75 samples, 1.2 s)\n',
    );
    expect(completionLine('predict', 'p.csv', 'predictions', 1, 0.04)).toBe(
      'landform predict: wrote p.csv (predictions, 1 sample, 0.0 s)\n',
    );
    expect(elapsed(59.94)).toBe('59.9 s');
    expect(elapsed(125)).toBe('2m05s');
    expect(elapsed(3 * 3600 + 61)).toBe('3h01m');
    expect(completionLine('x', 'y', 'z', 2, 61).trimEnd()).toMatch(COMPLETION_LINE);
  });

  it('ends every writing command the same way on stderr, and is silent with --quiet', () => {
    const dir = tempDir();
    const lattice = 'datasets/lattice.csv';
    const diagrams = join(dir, 'd.csv');
    const runs: Array<[string, string[], string, string, number]> = [
      ['diagrams', ['diagrams', lattice, '--out', diagrams], diagrams, 'CSV diagrams', 75],
      [
        'landscape',
        ['landscape', diagrams, '--format', 'csv', '--out', join(dir, 'l.csv')],
        join(dir, 'l.csv'),
        'sampled CSV landscapes of degree 1',
        75,
      ],
      [
        'distance',
        ['distance', diagrams, '--degree', '0', '--out', join(dir, 'm.csv')],
        join(dir, 'm.csv'),
        'bottleneck distances of degree 0',
        75,
      ],
      [
        'vectorize',
        ['vectorize', diagrams, '--depth', '2', '--grid-size', '5', '--out', join(dir, 'f.csv')],
        join(dir, 'f.csv'),
        '20 landscape features fitted on all the given samples',
        75,
      ],
      [
        'predict',
        ['predict', 'models/lattice', lattice, '--out', join(dir, 'p.csv')],
        join(dir, 'p.csv'),
        'predictions',
        75,
      ],
    ];
    for (const [command, args, path, what, samples] of runs) {
      const r = runCli(args);
      expect(r.code, r.stderr).toBe(0);
      const line = r.stderr.trimEnd().split('\n').pop() ?? '';
      const m = COMPLETION_LINE.exec(line);
      expect(m, `${command}: ${line}`).not.toBeNull();
      expect(m?.slice(1, 5)).toEqual([command, path, what, String(samples)]);
      expect(runCli([...args, '--quiet']).stderr).toBe('');
    }
    // What the lines report is what was written.
    expect(readFileSync(join(dir, 'p.csv'), 'utf8').trim().split('\n')).toHaveLength(76);
    // Output to standard output has no completion line: the data says it all.
    const stdout = runCli(['distance', diagrams, '--degree', '0']);
    expect(stdout.stderr).toBe('');
    expect(stdout.stdout).toBe(readFileSync(join(dir, 'm.csv'), 'utf8'));
  }, 120_000);
});
