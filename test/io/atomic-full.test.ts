import { readdirSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it, vi } from 'vitest';
import { UserError } from '../../src/core/errors.js';
import { tempDir } from '../helpers/cli.js';

// A disk that fills up mid-write, injected: the real writeFileSync, except that writes to a temporary
// name fail with ENOSPC while `full` is set (as the kernel reports it, with no path on a write error).
const state = vi.hoisted(() => ({ full: false }));
vi.mock('node:fs', async (importOriginal) => {
  const fs = await importOriginal<typeof import('node:fs')>();
  return {
    ...fs,
    writeFileSync: (...args: Parameters<typeof fs.writeFileSync>) => {
      if (state.full && String(args[0]).includes('.landform-tmp-')) {
        const error = new Error('ENOSPC: no space left on device, write') as NodeJS.ErrnoException;
        error.code = 'ENOSPC';
        error.syscall = 'write';
        throw error;
      }
      return fs.writeFileSync(...args);
    },
  };
});

const { writeFileAtomic, writeFilesAtomic, writeFolderAtomic } = await import('../../src/io/atomic.js');

describe('atomic writes on a full disk', () => {
  it('say "disk full" naming the final file, keep the old file, and leave no temporary file', async () => {
    const dir = tempDir();
    const file = join(dir, 'diagrams.csv');
    writeFileAtomic(file, 'old\n');
    state.full = true;
    try {
      let error: unknown;
      try {
        writeFilesAtomic([
          { path: file, data: 'new\n' },
          { path: `${file}.provenance.json`, data: '{}' },
        ]);
      } catch (e) {
        error = e;
      }
      expect(error).toBeInstanceOf(UserError);
      expect((error as UserError).describe()).toBe(
        `${file}: cannot write: disk full (or over quota); free some space or write elsewhere`,
      );
      await expect(writeFolderAtomic(join(dir, 'model'), () => {})).rejects.toThrow(/disk full/);
    } finally {
      state.full = false;
    }
    expect(readFileSync(file, 'utf8')).toBe('old\n');
    expect(readdirSync(dir)).toEqual(['diagrams.csv']);
  });
});
