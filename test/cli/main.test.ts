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
});
