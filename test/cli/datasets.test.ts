import { readdirSync, readFileSync, statSync, writeFileSync } from 'node:fs';
import { join, relative } from 'node:path';
import { describe, expect, it } from 'vitest';
import { runCli, tempDir } from '../helpers/cli.js';

const shipped = new URL('../../datasets/', import.meta.url).pathname;

function listFiles(dir: string): string[] {
  const out: string[] = [];
  const walk = (d: string): void => {
    for (const name of readdirSync(d).sort()) {
      const p = join(d, name);
      if (statSync(p).isDirectory()) walk(p);
      else out.push(relative(dir, p));
    }
  };
  walk(dir);
  return out;
}

describe('landform datasets', () => {
  it('regenerates every shipped dataset byte for byte, twice in a row', () => {
    const a = tempDir();
    const b = tempDir();
    const ra = runCli(['datasets', '--out', a]);
    const rb = runCli(['datasets', '--out', b]);
    expect(ra.code, ra.stderr).toBe(0);
    expect(rb.code, rb.stderr).toBe(0);
    expect(ra.stdout).toMatch(/lattice\s+points\s+75 samples/);
    const files = listFiles(shipped);
    expect(files).toContain('README.md');
    expect(files).toContain('field/labels.csv');
    expect(listFiles(a)).toEqual(files);
    expect(listFiles(b)).toEqual(files);
    for (const f of files) {
      const want = readFileSync(join(shipped, f));
      expect(readFileSync(join(a, f)).equals(want), `${f} differs from datasets/`).toBe(true);
      expect(readFileSync(join(b, f)).equals(want), `${f} differs on the second run`).toBe(true);
    }
  });

  it('writes only the chosen sets and refuses an unknown name with exit 2', () => {
    const dir = tempDir();
    const r = runCli(['datasets', '--out', dir, '--only', 'pump']);
    expect(r.code, r.stderr).toBe(0);
    expect(listFiles(dir)).toEqual(['pump.csv']);
    const bad = runCli(['datasets', '--out', dir, '--only', 'nothing']);
    expect(bad.code).toBe(2);
    expect(bad.stderr).toMatch(
      /^landform: --only 'nothing' is not known; choose from lattice, pump, field\n$/,
    );
  });
});

describe('landform datasets and demo: outputs', () => {
  it('refuse a folder holding other files unless --force, before any work', () => {
    const dir = tempDir();
    writeFileSync(join(dir, 'thesis.tex'), 'mine');
    for (const command of [
      ['datasets', '--only', 'pump'],
      ['demo', '--quick'],
    ]) {
      const r = runCli([...command, '--out', dir]);
      expect(r.code, command[0]).toBe(2);
      expect(r.stderr, command[0]).toMatch(/^landform: .*not made by landform|^landform: .*--force/);
      expect(r.stderr.split('\n')).toHaveLength(2);
    }
    expect(readdirSync(dir)).toEqual(['thesis.tex']);
    const forced = runCli(['datasets', '--only', 'pump', '--out', dir, '--force']);
    expect(forced.code).toBe(0);
    expect(readdirSync(dir).sort()).toEqual(['pump.csv', 'thesis.tex']);
    expect(readFileSync(join(dir, 'thesis.tex'), 'utf8')).toBe('mine');
  });
});
