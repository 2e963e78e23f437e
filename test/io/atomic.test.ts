import { mkdirSync, readdirSync, readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { temporaryName, writeFileAtomic, writeFilesAtomic, writeFolderAtomic } from '../../src/io/atomic.js';
import { runCli, tempDir } from '../helpers/cli.js';

describe('atomic writes', () => {
  it('writes through a temporary name in the same folder and leaves only the final file', () => {
    const dir = tempDir();
    const path = join(dir, 'out.csv');
    expect(temporaryName(path).startsWith(join(dir, '.landform-tmp-out.csv-'))).toBe(true);
    writeFileAtomic(path, 'a,b\n');
    writeFileAtomic(path, 'c,d\n');
    expect(readFileSync(path, 'utf8')).toBe('c,d\n');
    expect(readdirSync(dir)).toEqual(['out.csv']);
  });

  it('leaves nothing behind when one of several files fails part-way', () => {
    const dir = tempDir();
    writeFileSync(join(dir, 'blocker'), 'a file where a folder is needed');
    expect(() =>
      writeFilesAtomic([
        { path: join(dir, 'first.csv'), data: 'x' },
        { path: join(dir, 'second.npy'), data: new Uint8Array([1, 2, 3]) },
        { path: join(dir, 'blocker', 'third.json'), data: '{}' },
      ]),
    ).toThrow();
    expect(readdirSync(dir)).toEqual(['blocker']);
  });

  it('builds a folder in a temporary place and replaces the old one only on success', async () => {
    const parent = tempDir();
    const target = join(parent, 'report');
    mkdirSync(target);
    writeFileSync(join(target, 'old.txt'), 'old');
    await expect(
      writeFolderAtomic(target, (tmp) => {
        writeFileSync(join(tmp, 'half.txt'), 'half');
        throw new Error('failed part-way');
      }),
    ).rejects.toThrow('failed part-way');
    expect(readdirSync(parent)).toEqual(['report']);
    expect(readdirSync(target)).toEqual(['old.txt']);
    await writeFolderAtomic(target, (tmp) => writeFileSync(join(tmp, 'new.txt'), 'new'));
    expect(readdirSync(target)).toEqual(['new.txt']);
    expect(readdirSync(parent)).toEqual(['report']);
  });

  it('a command that fails while writing several files leaves none of them', () => {
    const out = tempDir();
    // `field` is a plain file, so writing field/labels.csv fails after lattice.csv and pump.csv were staged.
    writeFileSync(join(out, 'field'), 'in the way');
    const r = runCli(['datasets', '--out', out]);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(
      /^landform: .*field: is in the way \(a file where a folder is needed, or the reverse\)/,
    );
    expect(readdirSync(out)).toEqual(['field']);
  });
});
