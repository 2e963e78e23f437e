import { spawnSync } from 'node:child_process';
import { existsSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { runCli, tempDir, withoutCompletion } from '../helpers/cli.js';

const root = new URL('../../', import.meta.url).pathname;
const hasScript = existsSync('/usr/bin/script');

/** Runs landform under a pseudo-terminal (util-linux `script`), so stderr is a TTY as on a user's screen. */
function runOnTerminal(args: string[]): string {
  const command = ['node', '--import', 'tsx', 'src/cli/main.ts', ...args].map((a) => `'${a}'`).join(' ');
  const env = { ...process.env };
  delete env.CI;
  const r = spawnSync('script', ['-qec', command, '/dev/null'], { cwd: root, env, encoding: 'utf8' });
  return r.stdout;
}

describe('landform inspect', () => {
  it('summarises each shipped dataset: kind, samples, classes with counts, sizes', () => {
    const lattice = runCli(['inspect', 'datasets/lattice.csv']);
    expect(lattice.code, lattice.stderr).toBe(0);
    expect(lattice.stdout).toMatch(/^kind\s+points$/m);
    expect(lattice.stdout).toMatch(/^samples\s+75$/m);
    expect(lattice.stdout).toMatch(/^classes\s+3: broken-strut 25, intact 25, merged-cells 25$/m);
    expect(lattice.stdout).toMatch(/^dimensions\s+2$/m);
    expect(lattice.stdout).toMatch(/^points per sample\s+min 1\d\d, median 1\d\d(\.5)?, max 1\d\d$/m);
    const pump = runCli(['inspect', 'datasets/pump.csv']);
    expect(pump.stdout).toMatch(/^values per signal\s+min 400, median 400, max 400$/m);
    const field = runCli(['inspect', 'datasets/field']);
    expect(field.stdout).toMatch(/^kind\s+image$/m);
    expect(field.stdout).toMatch(/^image shapes\s+40×40$/m);
    expect(withoutCompletion(field.stderr)).toBe('');
  });

  it('prints JSON with the version and options, and obeys --kind', () => {
    const dir = tempDir();
    const file = join(dir, 'few.csv');
    writeFileSync(file, 'sample,label,a,b\ns1,x,1,2\ns2,y,3,4\ns3,,5,6\n');
    const table = runCli(['inspect', file, '--json']);
    expect(table.code, table.stderr).toBe(0);
    const summary = JSON.parse(table.stdout);
    expect(summary).toMatchObject({ kind: 'table', samples: 3, unlabelled: 1, options: { kind: null } });
    expect(summary.classes).toEqual([
      { label: 'x', count: 1 },
      { label: 'y', count: 1 },
    ]);
    expect(typeof summary.version).toBe('string');
    const points = runCli(['inspect', file, '--kind', 'points']);
    expect(points.stdout).toMatch(/^kind\s+points$/m);
    expect(points.stdout).toMatch(/^points per sample\s+min 1, median 1, max 1$/m);
    expect(points.stdout).toMatch(/5-fold cross-validation needs at least 5 per class/);
  });

  it('shows no progress bar in a pipe, even outside CI', () => {
    const r = runCli(['inspect', 'datasets/lattice.csv'], { env: { CI: '' } });
    expect(r.code).toBe(0);
    expect(withoutCompletion(r.stderr)).toBe('');
  });

  it.skipIf(!hasScript)('shows a progress bar on a terminal, and none with --quiet', () => {
    const shown = runOnTerminal(['inspect', 'datasets/lattice.csv']);
    expect(shown).toMatch(/loading \[.*\] 100%/);
    expect(shown).toMatch(/samples\s+75/);
    const quiet = runOnTerminal(['inspect', 'datasets/lattice.csv', '--quiet']);
    expect(quiet).toMatch(/samples\s+75/);
    expect(quiet).not.toMatch(/loading \[/);
  });
});

describe('landform inspect: a distances folder that falls back to points', () => {
  it('prints one note on stderr naming the failing file and check, and none with --quiet', () => {
    const dir = tempDir();
    writeFileSync(join(dir, 'm.csv'), '0,1,2\n1,0,1.5\n2,1.6,0\n');
    writeFileSync(join(dir, 'labels.csv'), 'file,label\nm.csv,a\n');
    const r = runCli(['inspect', dir]);
    expect(r.code).toBe(0);
    expect(r.stderr).toBe(
      'landform: note: read as point clouds, not distance matrices: m.csv not symmetric: entry (2, 3) is 1.5 but (3, 2) is 1.6 (line 2); give --kind distances to be refused with the reason, or --kind points to silence this\n',
    );
    expect(runCli(['inspect', dir, '--quiet']).stderr).toBe('');
    const strict = runCli(['inspect', dir, '--kind', 'distances']);
    expect(strict.code).toBe(2);
    expect(strict.stderr).toMatch(/m\.csv:2: not symmetric/);
  });
});
