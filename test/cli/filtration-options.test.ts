import { Command } from 'commander';
import { describe, expect, it } from 'vitest';
import {
  addFiltrationOptions,
  filtrationRecord,
  parseFiltrationOptions,
} from '../../src/cli/filtration-options.js';
import { UserError } from '../../src/core/errors.js';

describe('--filtration and --subsample', () => {
  it('default to plain Rips without landmarks', () => {
    const cmd = addFiltrationOptions(new Command('x')).exitOverride();
    cmd.parse([], { from: 'user' });
    expect(parseFiltrationOptions(cmd.opts())).toEqual({ filtration: 'rips' });
  });

  it('read dtm:K and a landmark spec', () => {
    const cmd = addFiltrationOptions(new Command('x')).exitOverride();
    cmd.parse(['--filtration', 'dtm:8', '--subsample', 'random:300:4'], { from: 'user' });
    expect(parseFiltrationOptions(cmd.opts())).toEqual({
      filtration: { kind: 'dtm', k: 8 },
      subsample: { method: 'random', count: 300, seed: 4 },
    });
  });

  it('explain bad values and what to write instead', () => {
    expect(() => parseFiltrationOptions({ filtration: 'dtm' })).toThrow(UserError);
    expect(() => parseFiltrationOptions({ filtration: 'cech' })).toThrow(/rips, dtm:K .* alpha/);
    expect(() => parseFiltrationOptions({ subsample: 'maxmin' })).toThrow(/maxmin:N or random:N/);
  });
});

describe('provenance record of the filtration', () => {
  it('names the filtration, the landmark rule and each covering radius', () => {
    expect(filtrationRecord({ filtration: 'alpha' })).toEqual({ filtration: 'alpha' });
    const record = filtrationRecord(
      { filtration: { kind: 'dtm', k: 5 }, subsample: { method: 'maxmin', count: 50, seed: 1 } },
      [
        { sample: 'a', coveringRadius: 0.25 },
        { sample: 'b', coveringRadius: 0.5 },
      ],
    );
    expect(record).toEqual({
      filtration: 'dtm:5',
      subsample: 'maxmin:50:1',
      coveringRadius: { largest: 0.5, perSample: { a: 0.25, b: 0.5 } },
    });
  });
});
