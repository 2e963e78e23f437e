import { mkdirSync, symlinkSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { UserError } from '../../src/core/errors.js';
import { checkInsidePath, readLabelsFile } from '../../src/io/labels-file.js';
import { tempDir } from '../helpers/cli.js';

function caught(fn: () => unknown): UserError {
  try {
    fn();
  } catch (error) {
    if (error instanceof UserError) return error;
    throw error;
  }
  throw new Error('expected a UserError');
}

describe('labels.csv', () => {
  it('lists files with labels, ids without extensions, and subfolders', () => {
    const dir = tempDir();
    mkdirSync(join(dir, 'day 2'));
    writeFileSync(join(dir, 'a.csv'), '1,2\n');
    writeFileSync(join(dir, 'day 2', 'b.npy'), '');
    writeFileSync(join(dir, 'labels.csv'), 'file,label\na.csv,ring\n"day 2/b.npy",\n');
    const rows = readLabelsFile(dir);
    expect(rows.map((r) => [r.file, r.id, r.label, r.line])).toEqual([
      ['a.csv', 'a', 'ring', 2],
      ['day 2/b.npy', 'day 2/b', '', 3],
    ]);
  });

  it.each([
    ['/etc/passwd', /is an absolute path/],
    ['C:\\data\\a.csv', /is an absolute path/],
    ['../outside.csv', /leaves the dataset folder/],
    ['sub/../../outside.csv', /leaves the dataset folder/],
    ['sub\\..\\..\\outside.csv', /leaves the dataset folder/],
  ])("refuses the path escape '%s' with its line", (path, message) => {
    const e = caught(() => checkInsidePath(path, { file: 'labels.csv', line: 7 }));
    expect(e.describe()).toMatch(/^labels\.csv:7: /);
    expect(e.describe()).toMatch(message);
  });

  it('refuses a symbolic link that leads out of the folder, a missing file and a repeated id', () => {
    const outside = tempDir();
    writeFileSync(join(outside, 'secret.csv'), '1,2\n');
    const dir = tempDir();
    symlinkSync(join(outside, 'secret.csv'), join(dir, 'link.csv'));
    writeFileSync(join(dir, 'labels.csv'), 'file,label\nlink.csv,x\n');
    const link = caught(() => readLabelsFile(dir));
    expect(link.line).toBe(2);
    expect(link.message).toMatch(/leads outside the dataset folder/);
    writeFileSync(join(dir, 'labels.csv'), 'file,label\nmissing.csv,x\n');
    expect(caught(() => readLabelsFile(dir)).describe()).toMatch(
      /labels\.csv:2: 'missing\.csv' does not exist/,
    );
    writeFileSync(join(dir, 'a.csv'), '1\n');
    writeFileSync(join(dir, 'a.npy'), '');
    writeFileSync(join(dir, 'labels.csv'), 'file,label\na.csv,x\na.npy,y\n');
    expect(caught(() => readLabelsFile(dir)).describe()).toMatch(
      /labels\.csv:3: 'a\.npy' gives the sample id 'a' again \(first on line 2\)/,
    );
  });

  it('refuses a folder without labels.csv, an empty one, a bad header and header only', () => {
    const dir = tempDir();
    expect(caught(() => readLabelsFile(dir)).message).toMatch(/no labels\.csv in the folder/);
    writeFileSync(join(dir, 'labels.csv'), '');
    expect(caught(() => readLabelsFile(dir)).message).toMatch(/empty file/);
    writeFileSync(join(dir, 'labels.csv'), 'name,class\n');
    expect(caught(() => readLabelsFile(dir)).describe()).toMatch(
      /labels\.csv:1: the header must be file,label/,
    );
    writeFileSync(join(dir, 'labels.csv'), 'file,label\n');
    expect(caught(() => readLabelsFile(dir)).message).toMatch(/header only/);
  });
});
