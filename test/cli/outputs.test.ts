import { spawn, spawnSync } from 'node:child_process';
import {
  closeSync,
  existsSync,
  mkdirSync,
  openSync,
  readdirSync,
  readFileSync,
  symlinkSync,
  writeFileSync,
} from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { runCli, STUDY_FOLDER, tempDir, withoutCompletion } from '../helpers/cli.js';
import { writeShapes } from './shapes-fixture.js';

const root = new URL('../../', import.meta.url).pathname;
const FAST = ['--depths', '2', '--grid-sizes', '8', '--workers', '1'];
const STUDY = ['--models', 'pca-svm', '--feature-sets', 'landscape', '--folds', '3', ...FAST, '--quiet'];

/** Exactly one line on stderr, exit 2. */
function oneLineRefusal(r: { code: number; stderr: string }): string {
  expect(r.code).toBe(2);
  expect(r.stderr.split('\n')).toHaveLength(2);
  return r.stderr;
}

describe('outputs never destroy data', () => {
  const dir = tempDir();
  const input = join(dir, 'shapes.csv');
  writeShapes(input, 5, 16);
  const original = readFileSync(input);

  it('train --save refuses a non-empty folder it did not make (files kept), replaces it with --force', () => {
    const folder = join(dir, 'mine');
    mkdirSync(folder);
    writeFileSync(join(folder, 'notes.txt'), 'unrelated work');
    const r = runCli(['train', input, ...FAST, '--save', folder]);
    expect(oneLineRefusal(r)).toMatch(
      /^landform: .*mine: --save is a folder that landform did not make and it is not empty; choose a new or empty folder, or add --force/,
    );
    expect(readdirSync(folder)).toEqual(['notes.txt']);
    const forced = runCli(['train', input, ...FAST, '--quiet', '--save', folder, '--force']);
    expect(withoutCompletion(forced.stderr)).toBe('');
    expect(forced.code).toBe(0);
    expect(readdirSync(folder).sort()).toEqual(['.landform-output.json', 'classifier.json', 'manifest.json']);
    // Its own folder is replaced without --force, as a whole, and nothing is left beside it.
    const again = runCli(['train', input, ...FAST, '--quiet', '--save', folder]);
    expect(again.code).toBe(0);
    expect(readdirSync(dir).filter((n) => n.startsWith('.landform'))).toEqual([]);
  });

  it('two train runs on one --save at the same time leave one whole, verifiable model', async () => {
    const folder = join(dir, 'race');
    const run = (seed: string) =>
      new Promise<number | null>((done) => {
        const child = spawn(
          process.execPath,
          [
            '--import',
            'tsx',
            join(root, 'src/cli/main.ts'),
            'train',
            input,
            ...FAST,
            '--seed',
            seed,
            '--quiet',
            '--save',
            folder,
          ],
          { cwd: root, stdio: 'ignore' },
        );
        child.on('close', (code) => done(code));
      });
    expect(await Promise.all([run('1'), run('2')])).toEqual([0, 0]);
    const { loadModelFolder } = await import('../../src/learn/model-folder.js');
    const { manifest } = await loadModelFolder(folder);
    expect(manifest.kind).toBe('landform.model-folder');
    expect(readdirSync(folder).sort()).toEqual(['.landform-output.json', 'classifier.json', 'manifest.json']);
    expect(readdirSync(dir).filter((n) => n.startsWith('.landform'))).toEqual([]);
  }, 120_000);

  it('train --save refuses the input file and a folder holding the input', () => {
    const r = runCli(['train', input, ...FAST, '--save', input]);
    expect(oneLineRefusal(r)).toMatch(/--save names a folder, but this is a file/);
    const nested = join(dir, 'project');
    mkdirSync(nested);
    const inner = join(nested, 'shapes.csv');
    writeFileSync(inner, original);
    const c = runCli(['train', inner, ...FAST, '--save', nested, '--force']);
    expect(oneLineRefusal(c)).toMatch(/--save contains the input .*; replacing the folder would delete it/);
    expect(readFileSync(inner).equals(original)).toBe(true);
    expect(readFileSync(input).equals(original)).toBe(true);
  });

  it('diagrams and vectorize refuse --out equal to the input, also through another spelling', () => {
    const d = runCli(['diagrams', input, '--workers', '1', '--out', input]);
    expect(oneLineRefusal(d)).toMatch(/--out is the input .*shapes\.csv; writing would replace it/);
    const v = runCli([
      'vectorize',
      input,
      '--workers',
      '1',
      '--out',
      join(dir, '.', 'x', '..', 'shapes.csv'),
    ]);
    expect(oneLineRefusal(v)).toMatch(/--out is the input/);
    expect(readFileSync(input).equals(original)).toBe(true);
  });

  it('a run removes temporary leftovers of killed runs beside its output, and leaves no lock', () => {
    const out = join(dir, 'clean');
    mkdirSync(out);
    const dead = spawnSync(process.execPath, ['-e', 'process.stdout.write(String(process.pid))'], {
      encoding: 'utf8',
    });
    const leftover = join(out, `.landform-tmp-d.csv-${dead.stdout}-0badc0de`);
    writeFileSync(leftover, 'half a file from a run that was killed');
    const r = runCli(['diagrams', input, '--workers', '1', '--quiet', '--out', join(out, 'd.csv')]);
    expect(r.code).toBe(0);
    expect(readdirSync(out).sort()).toEqual(['d.csv', 'd.csv.provenance.json']);
  });

  it('diagrams refuses a symbolic link and a FIFO at --out at once (no hang, link and target kept)', (context) => {
    const target = join(dir, 'elsewhere.csv');
    writeFileSync(target, 'keep me');
    const link = join(dir, 'link.csv');
    symlinkSync(target, link);
    const l = runCli(['diagrams', input, '--workers', '1', '--out', link]);
    expect(oneLineRefusal(l)).toMatch(/--out is a symbolic link; landform does not write through links/);
    expect(readFileSync(link, 'utf8')).toBe('keep me');
    const fifo = join(dir, 'fifo.csv');
    if (spawnSync('mkfifo', [fifo]).status !== 0) {
      context.skip('mkfifo is not available here');
      return;
    }
    const f = runCli(['diagrams', input, '--workers', '1', '--out', fifo]);
    expect(oneLineRefusal(f)).toMatch(/--out is a FIFO, not a regular file/);
  });

  it('evaluate with class labels that read like handlers writes metrics and report; --no-report replaces the folder whole', () => {
    const labelled = join(dir, 'batches.csv');
    writeShapes(labelled, 6, 16, 4, ['batch one=7', 'x onload=1']);
    const out = join(dir, 'study');
    const r = runCli(['evaluate', labelled, ...STUDY, '--out', out]);
    expect(withoutCompletion(r.stderr)).toBe('');
    expect(r.code).toBe(0);
    expect(readdirSync(out).sort()).toEqual([...STUDY_FOLDER, 'report.html']);
    expect(JSON.parse(readFileSync(join(out, 'metrics.json'), 'utf8')).classes).toEqual([
      'batch one=7',
      'x onload=1',
    ]);
    expect(readFileSync(join(out, 'report.html'), 'utf8')).toContain('x onload=1');
    // A second run without the report leaves no report of the first run beside its new metrics.
    const n = runCli(['evaluate', labelled, ...STUDY, '--seed', '2', '--no-report', '--out', out]);
    expect(n.code).toBe(0);
    expect(n.stdout).toMatch(/cross-validated estimates: validate on independent data[^\n]*\n$/);
    expect(readdirSync(out).sort()).toEqual(STUDY_FOLDER);
    expect(JSON.parse(readFileSync(join(out, 'metrics.json'), 'utf8')).seed).toBe(2);
  });

  it('evaluate refuses a folder it did not make before computing anything', () => {
    const out = join(dir, 'paper');
    mkdirSync(out);
    writeFileSync(join(out, 'draft.md'), 'words');
    const r = runCli(['evaluate', input, ...STUDY, '--out', out]);
    expect(oneLineRefusal(r)).toMatch(/--out is a folder that landform did not make/);
    expect(readdirSync(out)).toEqual(['draft.md']);
  });
});

/** A diagram CSV of many samples, so `landscape` prints megabytes (more than a pipe holds). */
function writeManyDiagrams(file: string, samples: number): void {
  const lines = ['sample,label,degree,birth,death'];
  for (let i = 0; i < samples; i++) {
    const b = (i % 17) / 40;
    lines.push(`s${i},a,1,${b},${b + 0.5}`, `s${i},a,1,${b + 0.1},${b + 0.3}`);
  }
  writeFileSync(file, `${lines.join('\n')}\n`);
}

describe('standard output that cannot take more', () => {
  const dir = tempDir();
  const diagrams = join(dir, 'many.csv');
  writeManyDiagrams(diagrams, 3000);
  const cli = [process.execPath, '--import', 'tsx', join(root, 'src/cli/main.ts')];

  it('a reader that closes early (| head) ends the run quietly with exit 2', async () => {
    const child = spawn(cli[0], [...cli.slice(1), 'landscape', diagrams], {
      cwd: root,
      stdio: ['ignore', 'pipe', 'pipe'],
    });
    let stderr = '';
    child.stderr.on('data', (chunk: Buffer) => {
      stderr += chunk.toString();
    });
    // Take the first chunk, then close our end, as `head -c` does.
    child.stdout.once('data', () => child.stdout.destroy());
    const code = await new Promise<number | null>((done) => child.on('close', (c) => done(c)));
    expect(stderr).toBe('');
    expect(code).toBe(2);
  }, 60_000);

  it('a full device on standard output is one line, exit 2 (/dev/full)', (context) => {
    if (!existsSync('/dev/full')) {
      context.skip('/dev/full does not exist on this system');
      return;
    }
    const fd = openSync('/dev/full', 'w');
    try {
      const r = spawnSync(cli[0], [...cli.slice(1), 'landscape', diagrams], {
        cwd: root,
        stdio: ['ignore', fd, 'pipe'],
        encoding: 'utf8',
      });
      expect(r.stderr).toBe('landform: cannot write standard output: disk full (or over quota)\n');
      expect(r.status).toBe(2);
    } finally {
      closeSync(fd);
    }
  }, 60_000);
});
