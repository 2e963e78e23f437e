import { spawn, spawnSync } from 'node:child_process';
import { existsSync, mkdirSync, readdirSync, readFileSync, rmSync, utimesSync, writeFileSync } from 'node:fs';
import { hostname } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { UserError } from '../../src/core/errors.js';
import {
  acquireOutputLock,
  asidePath,
  cleanLeftovers,
  lockPath,
  processRunning,
  recoverFolderSwap,
  temporaryName,
  writeFileAtomic,
  writeFilesAtomic,
  writeFolderAtomic,
} from '../../src/io/atomic.js';
import { runCli, tempDir } from '../helpers/cli.js';

/** The pid of a process that has exited (a finished child). */
function deadPid(): number {
  const child = spawnSync(process.execPath, ['-e', 'process.stdout.write(String(process.pid))'], {
    encoding: 'utf8',
  });
  const pid = Number(child.stdout);
  expect(processRunning(pid)).toBe(false);
  return pid;
}

/** A live child process (sleeping) and a way to end it. */
function liveChild(): { pid: number; stop: () => void } {
  const child = spawn(process.execPath, ['-e', 'setTimeout(() => {}, 60000)'], { stdio: 'ignore' });
  return { pid: child.pid as number, stop: () => child.kill() };
}

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
    // The new folder carries landform's marker (it is how a later run recognises its own folder).
    expect(readdirSync(target).sort()).toEqual(['.landform-output.json', 'new.txt']);
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

  it('takes over a stale lock (its process is gone), waits for a live one, then refuses in one line', () => {
    const dir = tempDir();
    const out = join(dir, 'model');
    writeFileSync(lockPath(out), JSON.stringify({ pid: deadPid(), host: hostname() }));
    const release = acquireOutputLock(out, { waitMs: 0 });
    expect(JSON.parse(readFileSync(lockPath(out), 'utf8')).pid).toBe(process.pid);
    release();
    expect(existsSync(lockPath(out))).toBe(false);
    const live = liveChild();
    try {
      writeFileSync(lockPath(out), JSON.stringify({ pid: live.pid, host: hostname() }));
      const started = Date.now();
      let error: unknown;
      try {
        acquireOutputLock(out, { waitMs: 300 });
      } catch (e) {
        error = e;
      }
      expect(Date.now() - started).toBeGreaterThanOrEqual(300);
      expect(error).toBeInstanceOf(UserError);
      expect((error as UserError).describe()).toMatch(
        new RegExp(
          `model: another landform run \\(process ${live.pid} on .*\\) is writing this output; wait`,
        ),
      );
      // The live run's lock is left alone.
      expect(JSON.parse(readFileSync(lockPath(out), 'utf8')).pid).toBe(live.pid);
    } finally {
      live.stop();
    }
  });

  it("removes leftovers of dead processes and day-old ones, keeps a live process's and its own", () => {
    const dir = tempDir();
    const dead = deadPid();
    const live = liveChild();
    try {
      const name = (pid: number, tag: string) => `.landform-tmp-out.csv-${pid}-${tag}`;
      writeFileSync(join(dir, name(dead, '0000000a')), 'half');
      mkdirSync(join(dir, name(dead, '0000000b')));
      writeFileSync(join(dir, name(dead, '0000000b'), 'metrics.json'), '{');
      writeFileSync(join(dir, name(live.pid, '0000000c')), 'in progress');
      writeFileSync(join(dir, name(live.pid, '0000000d')), 'two days old');
      const old = (Date.now() - 2 * 24 * 3600 * 1000) / 1000;
      utimesSync(join(dir, name(live.pid, '0000000d')), old, old);
      writeFileSync(join(dir, name(process.pid, '0000000e')), 'ours');
      writeFileSync(join(dir, 'data.csv'), 'not ours to touch');
      cleanLeftovers(dir);
      expect(readdirSync(dir).sort()).toEqual(
        ['data.csv', name(live.pid, '0000000c'), name(process.pid, '0000000e')].sort(),
      );
      // Any write into the folder cleans the same way.
      writeFileSync(join(dir, name(dead, '0000000f')), 'half');
      writeFileAtomic(join(dir, 'other.csv'), 'x');
      expect(existsSync(join(dir, name(dead, '0000000f')))).toBe(false);
    } finally {
      live.stop();
    }
  });

  it('finishes a folder swap a killed run left half done, either way, before the next write', async () => {
    const parent = tempDir();
    const dir = join(parent, 'model');
    // Killed after the old folder was moved aside and before the new one came in: the old one goes back.
    mkdirSync(asidePath(dir));
    writeFileSync(join(asidePath(dir), 'manifest.json'), 'old model');
    expect(recoverFolderSwap(dir)).toBe('restored');
    expect(readFileSync(join(dir, 'manifest.json'), 'utf8')).toBe('old model');
    expect(existsSync(asidePath(dir))).toBe(false);
    // Killed after the new one came in, before the old one was removed: the old one goes.
    mkdirSync(asidePath(dir));
    writeFileSync(join(asidePath(dir), 'manifest.json'), 'older model');
    expect(recoverFolderSwap(dir)).toBe('finished');
    expect(readdirSync(parent)).toEqual(['model']);
    // The next write recovers first, then swaps: no aside folder, no temporary folder, no lock remain.
    mkdirSync(asidePath(dir));
    rmSync(dir, { recursive: true });
    await writeFolderAtomic(dir, (tmp) => writeFileSync(join(tmp, 'manifest.json'), 'new model'));
    expect(readFileSync(join(dir, 'manifest.json'), 'utf8')).toBe('new model');
    expect(readdirSync(parent)).toEqual(['model']);
  });
});
