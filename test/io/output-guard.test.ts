import { spawnSync } from 'node:child_process';
import { existsSync, mkdirSync, readFileSync, symlinkSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { UserError } from '../../src/core/errors.js';
import { FOLDER_MARKER, folderMarker } from '../../src/io/atomic.js';
import {
  checkFileOutput,
  checkOutputPath,
  fileOutputSidecars,
  realOutputPath,
} from '../../src/io/output-guard.js';
import { tempDir } from '../helpers/cli.js';

function refusal(run: () => void): string {
  try {
    run();
  } catch (error) {
    expect(error).toBeInstanceOf(UserError);
    return (error as UserError).describe();
  }
  throw new Error('expected a refusal');
}

describe('checkOutputPath', () => {
  it('refuses the input itself, however the path is spelled (., .., a linked folder)', () => {
    const dir = tempDir();
    const input = join(dir, 'data.csv');
    writeFileSync(input, 'sample,label,x\n');
    mkdirSync(join(dir, 'sub'));
    symlinkSync(dir, join(dir, 'alias'));
    for (const out of [input, join(dir, 'sub', '..', 'data.csv'), join(dir, 'alias', 'data.csv')]) {
      expect(refusal(() => checkFileOutput(out, [input]))).toMatch(
        /--out is the input .*data\.csv; writing would replace it — write to another path$/,
      );
    }
    // A sidecar landing on the input is refused too (here the input is named like a provenance sidecar).
    const sidecarInput = join(dir, 'x.csv.provenance.json');
    writeFileSync(sidecarInput, '{}');
    expect(refusal(() => checkFileOutput(join(dir, 'x.csv'), [sidecarInput]))).toMatch(/is the input/);
    expect(() => checkFileOutput(join(dir, 'other.csv'), [input])).not.toThrow();
    expect(readFileSync(input, 'utf8')).toBe('sample,label,x\n');
  });

  it('refuses an output inside an input folder, and a folder output that contains an input', () => {
    const dir = tempDir();
    const dataset = join(dir, 'field');
    mkdirSync(dataset);
    writeFileSync(join(dataset, 'labels.csv'), 'file,label\n');
    expect(refusal(() => checkFileOutput(join(dataset, 'features.csv'), [dataset]))).toMatch(
      /--out is inside the input folder .*field; write outside it/,
    );
    const input = join(dir, 'runs', 'data.csv');
    mkdirSync(join(dir, 'runs'));
    writeFileSync(input, 'x');
    expect(
      refusal(() => checkOutputPath(join(dir, 'runs'), [input], { folder: true, option: '--save' })),
    ).toMatch(/--save contains the input .*data\.csv; replacing the folder would delete it/);
    expect(
      refusal(() => checkOutputPath(dir, [input], { folder: true, force: true, option: '--save' })),
    ).toMatch(/contains the input/);
  });

  it('refuses a symbolic link (the link and its target stay as they were)', () => {
    const dir = tempDir();
    const target = join(dir, 'precious.csv');
    writeFileSync(target, 'keep');
    const link = join(dir, 'out.csv');
    symlinkSync(target, link);
    expect(refusal(() => checkFileOutput(link, []))).toMatch(
      /--out is a symbolic link; landform does not write through links/,
    );
    const folderLink = join(dir, 'model');
    symlinkSync(dir, folderLink);
    expect(refusal(() => checkOutputPath(folderLink, [], { folder: true }))).toMatch(/symbolic link/);
    expect(readFileSync(target, 'utf8')).toBe('keep');
  });

  it('refuses a device and a FIFO', (context) => {
    if (existsSync('/dev/null'))
      expect(refusal(() => checkFileOutput('/dev/null', []))).toMatch(
        /--out is a device, not a regular file/,
      );
    const dir = tempDir();
    const fifo = join(dir, 'pipe');
    const made = spawnSync('mkfifo', [fifo]);
    if (made.status !== 0) {
      context.skip('mkfifo is not available here');
      return;
    }
    expect(refusal(() => checkFileOutput(fifo, []))).toMatch(/--out is a FIFO, not a regular file/);
  });

  it('refuses a non-empty folder landform did not make, unless forced; accepts its own and empty ones', () => {
    const dir = tempDir();
    const folder = join(dir, 'results');
    mkdirSync(folder);
    expect(() => checkOutputPath(folder, [], { folder: true })).not.toThrow(); // empty
    writeFileSync(join(folder, 'thesis.tex'), 'years of work');
    expect(refusal(() => checkOutputPath(folder, [], { folder: true }))).toMatch(
      /--out is a folder that landform did not make and it is not empty; .* add --force to replace it as a whole/,
    );
    expect(() => checkOutputPath(folder, [], { folder: true, force: true })).not.toThrow();
    // Only names the command writes (a folder of an earlier landform, before the marker): landform's.
    const legacy = join(dir, 'legacy');
    mkdirSync(legacy);
    writeFileSync(join(legacy, 'metrics.json'), '{}');
    expect(() => checkOutputPath(legacy, [], { folder: true, known: ['metrics.json'] })).not.toThrow();
    writeFileSync(join(legacy, 'notes.txt'), 'mine');
    expect(() => checkOutputPath(legacy, [], { folder: true, known: ['metrics.json'] })).toThrow(UserError);
    // The marker says landform made it, whatever else it holds.
    writeFileSync(join(legacy, FOLDER_MARKER), folderMarker('evaluate'));
    expect(() => checkOutputPath(legacy, [], { folder: true, known: ['metrics.json'] })).not.toThrow();
    // A file where a folder is wanted, and the reverse.
    expect(refusal(() => checkOutputPath(join(legacy, 'notes.txt'), [], { folder: true }))).toMatch(
      /names a folder, but this is a file/,
    );
    expect(refusal(() => checkFileOutput(legacy, []))).toMatch(/names a file, but this is a folder/);
  });

  it("refuses names landform keeps for its own temporary files, and lists an NPY file's sidecars", () => {
    const dir = tempDir();
    expect(refusal(() => checkFileOutput(join(dir, '.landform-tmp-x'), []))).toMatch(/keeps for its own/);
    expect(fileOutputSidecars(join(dir, 'f.npy'))).toEqual([
      join(dir, 'f.npy.provenance.json'),
      join(dir, 'f.samples.csv'),
      join(dir, 'f.columns.csv'),
    ]);
    expect(realOutputPath(join(dir, 'not', 'yet', 'there.csv'))).toBe(
      join(realOutputPath(dir), 'not', 'yet', 'there.csv'),
    );
  });
});
