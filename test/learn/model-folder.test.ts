import { createHash } from 'node:crypto';
import { existsSync, readdirSync, readFileSync, rmSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { UserError } from '../../src/core/errors.js';
import { version } from '../../src/core/version.js';
import {
  canonicalJson,
  loadClassifierFolder,
  loadModelFolder,
  saveClassifierFolder,
  saveModelFolder,
} from '../../src/learn/model-folder.js';
import { createClassifier } from '../../src/learn/models.js';
import { tempDir } from '../helpers/cli.js';
import { iris } from './models-fixtures.js';

async function userError(promise: Promise<unknown>): Promise<UserError> {
  try {
    await promise;
  } catch (error) {
    if (error instanceof UserError) return error;
    throw error;
  }
  throw new Error('expected a UserError');
}

describe('model folder', () => {
  it('writes a manifest with format, version, per-file SHA-256 and an overall checksum, and reads it back', async () => {
    const dir = join(tempDir(), 'models', 'lattice');
    await saveModelFolder(
      dir,
      { classes: ['sound', 'cracked'], seed: 4 },
      { 'weights.bin': new Uint8Array([1, 2, 3]), 'notes.txt': 'hello' },
    );
    const manifest = JSON.parse(readFileSync(join(dir, 'manifest.json'), 'utf8'));
    expect(manifest.format).toBe(1);
    expect(manifest.landform).toBe(version());
    expect(manifest.classes).toEqual(['sound', 'cracked']);
    // SHA-256 (FIPS 180-4) of "hello": a published test value (from memory), checked against node:crypto too.
    expect(manifest.files['notes.txt'].sha256).toBe(
      '2cf24dba5fb0a30e26e83b2ac5b9e29e1b161e5c1fa7425e73043362938b9824',
    );
    expect(manifest.files['weights.bin']).toEqual({
      bytes: 3,
      sha256: createHash('sha256')
        .update(new Uint8Array([1, 2, 3]))
        .digest('hex'),
    });
    const { checksum, ...body } = manifest;
    expect(checksum).toBe(createHash('sha256').update(canonicalJson(body)).digest('hex'));
    const loaded = await loadModelFolder(dir);
    expect(Array.from(loaded.files['weights.bin'])).toEqual([1, 2, 3]);
    expect(Buffer.from(loaded.files['notes.txt']).toString()).toBe('hello');
    expect(loaded.manifest.seed).toBe(4);
    expect(readdirSync(join(dir, '..'))).toEqual(['lattice']); // no temporary leftovers
  });

  it('refuses an altered file, a missing file, an edited manifest and a wrong format, naming the file', async () => {
    const base = tempDir();
    const make = async (name: string): Promise<string> => {
      const dir = join(base, name);
      await saveModelFolder(dir, { classes: ['a', 'b'] }, { 'weights.bin': new Uint8Array([9, 9, 9, 9]) });
      return dir;
    };
    const altered = await make('altered');
    writeFileSync(join(altered, 'weights.bin'), new Uint8Array([9, 9, 9, 8]));
    let e = await userError(loadModelFolder(altered));
    expect(e.file).toBe(join(altered, 'weights.bin'));
    expect(e.message).toMatch(/altered or damaged/);
    expect(e.describe()).not.toContain('\n');

    const missing = await make('missing');
    rmSync(join(missing, 'weights.bin'));
    e = await userError(loadModelFolder(missing));
    expect(e.file).toBe(join(missing, 'weights.bin'));
    expect(e.message).toMatch(/missing/);

    const edited = await make('edited');
    const path = join(edited, 'manifest.json');
    writeFileSync(path, readFileSync(path, 'utf8').replace('"a"', '"z"'));
    e = await userError(loadModelFolder(edited));
    expect(e.file).toBe(path);
    expect(e.message).toMatch(/altered after saving/);

    const future = await make('future');
    const fpath = join(future, 'manifest.json');
    writeFileSync(fpath, readFileSync(fpath, 'utf8').replace('"format": 1', '"format": 2'));
    e = await userError(loadModelFolder(future));
    expect(e.file).toBe(fpath);
    expect(e.message).toMatch(/format 2 .* reads format 1/);

    e = await userError(loadModelFolder(join(base, 'nothing-here')));
    expect(e.message).toMatch(/no model folder/);
  });

  it('refuses a bad file name or reserved field and keeps the old folder untouched', async () => {
    const base = tempDir();
    const dir = join(base, 'kept');
    await saveModelFolder(dir, { round: 1 }, { 'a.txt': 'first' });
    await expect(saveModelFolder(dir, { round: 2 }, { '../escape': 'x' })).rejects.toThrow(/plain file name/);
    await expect(saveModelFolder(dir, { checksum: 'x' }, {})).rejects.toThrow(/set by the folder/);
    expect((await loadModelFolder(dir)).manifest.round).toBe(1);
    expect(readdirSync(base)).toEqual(['kept']);
    expect(existsSync(join(base, 'escape'))).toBe(false);
  });

  it('saves and reloads a classifier with identical predictions', async () => {
    const { x, y } = iris();
    const model = createClassifier('pca-svm', { kernel: 'linear', C: 1 }, 2);
    await model.fit(x, y, 3);
    const dir = join(tempDir(), 'iris-model');
    await saveClassifierFolder(dir, model, { classes: ['setosa', 'versicolor', 'virginica'] });
    const { manifest, classifier } = await loadClassifierFolder(dir);
    expect(manifest.model).toBe('pca-svm');
    expect(manifest.hyperparameters).toEqual({ kernel: 'linear', C: 1 });
    expect(Array.from((await classifier.predictScores(x)).data)).toEqual(
      Array.from((await model.predictScores(x)).data),
    );
  });
});
