import { spawnSync } from 'node:child_process';
import { existsSync, mkdirSync, readdirSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { runCli, tempDir } from '../helpers/cli.js';

/**
 * The error contract of every command (issue 4): a user's mistake gives exactly one line on stderr,
 * `landform: <file>:<line>: <what is wrong and what to do>`, exit code 2, no stack trace unless --debug, and
 * no output file. Internal failures exit 1 and ask for a report.
 */
function expectOneLine(r: { code: number; stderr: string; stdout: string }, pattern: RegExp): void {
  expect(r.code, r.stderr).toBe(2);
  const lines = r.stderr.split('\n').filter((l) => l !== '');
  expect(lines, r.stderr).toHaveLength(1);
  expect(lines[0]).toMatch(/^landform: /);
  expect(lines[0]).toMatch(pattern);
  expect(r.stderr).not.toMatch(/\n\s+at /);
}

describe('the error contract', () => {
  const dir = tempDir();
  const write = (name: string, text: string): string => {
    const path = join(dir, name);
    writeFileSync(path, text);
    return path;
  };
  const cases: Array<[string, () => string[], RegExp]> = [
    [
      'a missing file',
      () => ['inspect', join(dir, 'absent.csv')],
      /absent\.csv: file not found; check the path$/,
    ],
    [
      'an unknown option',
      () => ['inspect', write('ok.csv', 'sample,label,x\na,r,1\na,r,2\n'), '--colour'],
      /unknown option '--colour'/,
    ],
    [
      'an unknown kind',
      () => ['inspect', write('ok2.csv', 'sample,label,x\na,r,1\n'), '--kind', 'cloud'],
      /--kind 'cloud' is not known; choose from points, distances/,
    ],
    [
      'a bad option value',
      () => ['datasets', '--out', dir, '--only', 'lattice,moon'],
      /--only 'moon' is not known; choose from lattice, pump, field/,
    ],
    [
      'a non-numeric number',
      () => ['inspect', write('nan.csv', 'sample,label,x,y\na,r,1,2\na,r,1,two\n')],
      /nan\.csv:3: 'two' is not a number in column y/,
    ],
    [
      'a non-finite number',
      () => ['inspect', write('inf.csv', 'sample,label,x,y\na,r,1,2\na,r,-inf,2\n')],
      /inf\.csv:3: '-inf' is not a finite number in column x/,
    ],
    [
      'a ragged row',
      () => ['inspect', write('ragged.csv', 'sample,label,x,y\na,r,1,2\na,r,1\n')],
      /ragged\.csv:3: has 3 fields, the header has 4/,
    ],
    ['an empty file', () => ['inspect', write('empty.csv', '')], /empty\.csv: empty file; expected a header/],
    [
      'a header only',
      () => ['inspect', write('header.csv', 'sample,label,x,y\n')],
      /header\.csv:1: header only, no rows; add at least one sample/,
    ],
    [
      'labels.csv naming a missing file',
      () => {
        const folder = join(dir, 'frames');
        mkdirSync(folder, { recursive: true });
        writeFileSync(join(folder, 'labels.csv'), 'file,label\na.pgm,disc\n');
        return ['inspect', folder];
      },
      /frames\/labels\.csv:2: 'a\.pgm' does not exist in .*frames; fix the name or add the file/,
    ],
    [
      'a labels.csv path that leaves the folder',
      () => {
        const folder = join(dir, 'escape');
        mkdirSync(folder, { recursive: true });
        writeFileSync(join(folder, 'labels.csv'), 'file,label\n../ok.csv,x\n');
        return ['inspect', folder];
      },
      /escape\/labels\.csv:2: '\.\.\/ok\.csv' leaves the dataset folder/,
    ],
  ];

  it.each(cases)('%s: one line, exit 2', (_name, args, pattern) => {
    expectOneLine(runCli(args()), pattern);
  });

  it('writes no output file when the input is at fault', () => {
    const out = tempDir();
    const bad = write('bad-points.csv', 'sample,label,x,y\na,r,0,0\na,r,1,oops\n');
    const r = runCli(['diagrams', bad, '--out', join(out, 'diagrams.csv')]);
    expectOneLine(r, /bad-points\.csv:3: 'oops' is not a number in column y/);
    expect(readdirSync(out)).toEqual([]);
  });

  it('shows the stack trace with --debug, still exit 2', () => {
    const r = runCli(['inspect', join(dir, 'absent.csv'), '--debug']);
    expect(r.code).toBe(2);
    expect(r.stderr.split('\n')[0]).toMatch(/^landform: .*absent\.csv: file not found/);
    expect(r.stderr).toMatch(/\n\s+at /);
  });

  it('exits 1 on an internal failure and asks for a report', () => {
    // A command that fails with an ordinary exception (a bug), added to the command list in a fresh process.
    const root = new URL('../../', import.meta.url).pathname;
    const script = `
      const { COMMANDS } = await import(${JSON.stringify(join(root, 'src/cli/commands/index.ts'))});
      COMMANDS.push({ name: 'explode', load: async () => (p) => p.command('explode').action(() => { null.property; }) });
      const { main } = await import(${JSON.stringify(join(root, 'src/cli/main.ts'))});
      process.exitCode = await main(process.argv.slice(1));
    `;
    const run = (args: string[]) =>
      spawnSync(process.execPath, ['--import', 'tsx', '--input-type=module', '-e', script, ...args], {
        encoding: 'utf8',
        cwd: root,
      });
    const r = run(['explode']);
    expect(r.status).toBe(1);
    const lines = r.stderr.split('\n').filter((l) => l !== '');
    expect(lines).toHaveLength(1);
    expect(lines[0]).toMatch(/^landform: internal error: .*This is a bug in landform; please report it/);
    const debug = run(['explode', '--debug']);
    expect(debug.status).toBe(1);
    expect(debug.stderr).toMatch(/\n\s+at /);
  });

  it('turns a file-system refusal on output into one line, exit 2', () => {
    const file = write('plain.txt', 'x');
    const r = runCli(['datasets', '--out', join(file, 'inside')]);
    expectOneLine(r, /plain\.txt\/inside: a part of the path is a file, not a folder; check the path$/);
    expect(existsSync(join(file, 'inside'))).toBe(false);
  });
});
