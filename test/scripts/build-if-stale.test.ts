import { spawnSync } from 'node:child_process';
import {
  copyFileSync,
  mkdirSync,
  readFileSync,
  rmSync,
  statSync,
  symlinkSync,
  utimesSync,
  writeFileSync,
} from 'node:fs';
import { join, resolve } from 'node:path';
import { describe, expect, it } from 'vitest';
import { tempDir } from '../helpers/cli.js';

/**
 * `prepare` (scripts/build-if-stale.mjs) compiles only when a source is newer than the last build, so the
 * first `npx landform` in a clone does not rebuild what `npm ci` just built. Checked on a tiny project of its
 * own that borrows this repository's TypeScript.
 */
const ROOT = resolve(__dirname, '../..');

function project(): string {
  const dir = tempDir();
  mkdirSync(join(dir, 'scripts'));
  mkdirSync(join(dir, 'src'));
  copyFileSync(join(ROOT, 'scripts', 'build-if-stale.mjs'), join(dir, 'scripts', 'build-if-stale.mjs'));
  symlinkSync(join(ROOT, 'node_modules'), join(dir, 'node_modules'), 'dir');
  writeFileSync(join(dir, 'package.json'), '{"name":"tiny","type":"module"}\n');
  writeFileSync(
    join(dir, 'tsconfig.json'),
    JSON.stringify({
      compilerOptions: { target: 'ES2022', module: 'NodeNext', outDir: 'dist', rootDir: '.', strict: true },
      include: ['src'],
    }),
  );
  writeFileSync(join(dir, 'src', 'a.ts'), 'export const a: number = 1;\n');
  return dir;
}

function prepare(dir: string): number {
  return (
    spawnSync(process.execPath, [join(dir, 'scripts', 'build-if-stale.mjs')], { encoding: 'utf8' }).status ??
    -1
  );
}

describe('scripts/build-if-stale.mjs', () => {
  it('builds a fresh clone, skips an up-to-date one, and rebuilds after a source changes', () => {
    const dir = project();
    const out = join(dir, 'dist', 'src', 'a.js');
    expect(prepare(dir)).toBe(0);
    expect(readFileSync(out, 'utf8')).toContain('export const a = 1;');

    // Up to date: the compiler does not run. A file with a type error, dated before the build, would fail
    // any compile; the check passes because nothing is compiled.
    const old = new Date(Date.now() - 60_000);
    writeFileSync(join(dir, 'src', 'b.ts'), 'export const b: number = "not a number";\n');
    utimesSync(join(dir, 'src', 'b.ts'), old, old);
    utimesSync(out, old, old);
    expect(prepare(dir)).toBe(0);
    expect(Math.abs(statSync(out).mtimeMs - old.getTime())).toBeLessThan(1);
    // The same file dated now is newer than the build: compiled, and its error fails prepare.
    const now = new Date(Date.now() + 2_000);
    utimesSync(join(dir, 'src', 'b.ts'), now, now);
    expect(prepare(dir)).not.toBe(0);
    rmSync(join(dir, 'src', 'b.ts'));

    // A newer source: compiled again.
    writeFileSync(join(dir, 'src', 'a.ts'), 'export const a: number = 2;\n');
    const later = new Date(Date.now() + 5_000);
    utimesSync(join(dir, 'src', 'a.ts'), later, later);
    expect(prepare(dir)).toBe(0);
    expect(readFileSync(out, 'utf8')).toContain('export const a = 2;');
  });
});
