import { describe, expect, it } from 'vitest';
import { runCli } from '../helpers/cli.js';

describe('landform command shell', () => {
  it('prints its version and help', () => {
    const v = runCli(['--version']);
    expect(v.code).toBe(0);
    expect(v.stdout.trim()).toMatch(/^\d+\.\d+\.\d+$/);
    const h = runCli(['--help']);
    expect(h.code).toBe(0);
    expect(h.stdout).toContain('landscape');
  });

  it('turns an unknown command or option into one line and exit code 2', () => {
    const r = runCli(['nonsense']);
    expect(r.code).toBe(2);
    expect(r.stderr.trim().split('\n')).toHaveLength(1);
    expect(r.stderr).toMatch(/^landform: unknown command 'nonsense'/);
  });

  it('names the closest command, option or value on that one line ("did you mean")', () => {
    // Commander's own suggestion (its second line) used to be cut off by our one-line rule.
    const command = runCli(['diagrms', 'x.csv']);
    expect(command.code).toBe(2);
    expect(command.stderr).toBe(
      "landform: unknown command 'diagrms' (did you mean diagrams?); see 'landform --help'\n",
    );
    const option = runCli(['vectorize', 'datasets/lattice.csv', '--grid-sise', '20']);
    expect(option.code).toBe(2);
    expect(option.stderr).toBe(
      "landform: unknown option '--grid-sise' (did you mean --grid-size?); see 'landform vectorize --help'\n",
    );
    // Hidden old names are never suggested; nothing close, no suggestion.
    const far = runCli(['distance', 'x.csv', '--colour', 'red']);
    expect(far.stderr).toBe("landform: unknown option '--colour'; see 'landform distance --help'\n");
    const value = runCli(['train', 'datasets/lattice.csv', '--model', 'pca-svn', '--save', 'never-written']);
    expect(value.code).toBe(2);
    expect(value.stderr).toBe(
      "landform: --model 'pca-svn' is not known (did you mean pca-svm?); choose from pca-svm, dense, forest\n",
    );
    const filtration = runCli(['diagrams', 'datasets/lattice.csv', '--filtration', 'alfa']);
    expect(filtration.code).toBe(2);
    expect(filtration.stderr).toMatch(
      /^landform: --filtration 'alfa' is not known \(did you mean alpha\?\); choose rips/,
    );
  });
});
