import { Command } from 'commander';
import { describe, expect, it } from 'vitest';
import { addFiltrationOptions, parseFiltrationOptions } from '../../src/cli/filtration-options.js';
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
