import { spawnSync } from 'node:child_process';
import { existsSync, readFileSync, writeFileSync } from 'node:fs';
import { dirname, join, resolve } from 'node:path';
import { describe, expect, it } from 'vitest';
import { LANDSCAPE_VALUE_BUDGET } from '../../src/core/budgets.js';
import { runCli, tempDir } from '../helpers/cli.js';

const root = resolve(dirname(new URL(import.meta.url).pathname), '../..');

/** A small diagram file of two samples; values chosen so the layers are easy to work by hand. */
const DIAGRAMS = [
  'sample,label,degree,birth,death',
  'ring-1,ring,0,0,inf',
  'ring-1,ring,0,0,0.5',
  'ring-1,ring,1,0,4',
  'ring-1,ring,1,1,3',
  'ring-1,ring,1,2,6',
  'ring-1,ring,1,2,6',
  'ring-1,ring,1,5,7',
  'ring-1,ring,1,8,9',
  'disc-1,disc,0,0,inf',
  'disc-1,disc,1,0.5,1.5',
  '',
].join('\n');

function writeDiagrams(dir: string, text = DIAGRAMS): string {
  const file = join(dir, 'diagrams.csv');
  writeFileSync(file, text);
  return file;
}

describe('landform landscape', () => {
  it('prints the sampled JSON contract for one sample', () => {
    const dir = tempDir();
    const r = runCli([
      'landscape',
      writeDiagrams(dir),
      '--sample',
      'ring-1',
      '--grid',
      '0:9:10',
      '--depth',
      '4',
    ]);
    expect(r.code).toBe(0);
    const lines = r.stdout.trim().split('\n');
    expect(lines).toHaveLength(1);
    const out = JSON.parse(lines[0]);
    expect(Object.keys(out).slice(0, 3)).toEqual(['degree', 't', 'layers']);
    expect(out.degree).toBe(1);
    expect(out.t).toEqual([0, 1, 2, 3, 4, 5, 6, 7, 8, 9]);
    // Worked by hand from λ_k(t) = k-th largest of max(0, min(t − b, d − t)) (Chazal, Fasy, Lecci, Rinaldo, Wasserman, 2014).
    expect(out.layers).toEqual([
      [0, 1, 2, 1, 2, 1, 1, 0, 0, 0],
      [0, 0, 1, 1, 2, 1, 0, 0, 0, 0],
      [0, 0, 0, 1, 0, 0, 0, 0, 0, 0],
      [0, 0, 0, 0, 0, 0, 0, 0, 0, 0],
    ]);
    expect(out.sample).toBe('ring-1');
    expect(out.infinite).toBe('drop');
    expect(out.provenance.version).toMatch(/^\d+\.\d+\.\d+/);
    expect(out.provenance.options.depth).toBe(4);
  });

  it('prints the exact JSON contract, and defaults the grid to cover the pairs', () => {
    const dir = tempDir();
    const file = writeDiagrams(dir);
    const exact = runCli(['landscape', file, '--sample', 'ring-1', '--exact', '--depth', '2']);
    expect(exact.code).toBe(0);
    const e = JSON.parse(exact.stdout);
    expect(Object.keys(e).slice(0, 2)).toEqual(['degree', 'layers']);
    expect(e.layers).toEqual([
      [
        [0, 0],
        [2, 2],
        [3, 1],
        [4, 2],
        [5.5, 0.5],
        [6, 1],
        [7, 0],
        [8, 0],
        [8.5, 0.5],
        [9, 0],
      ],
      [
        [1, 0],
        [2, 1],
        [2.5, 0.5],
        [4, 2],
        [6, 0],
      ],
    ]);
    const sampled = JSON.parse(runCli(['landscape', file, '--sample', 'disc-1']).stdout);
    expect(sampled.t).toHaveLength(100);
    expect(sampled.t[0]).toBe(0.5);
    expect(sampled.t[99]).toBe(1.5);
    expect(sampled.layers).toHaveLength(5);
  });

  it('writes one JSON object per sample on a shared grid, or CSV, and says what it did with essential classes', () => {
    const dir = tempDir();
    const file = writeDiagrams(dir);
    const all = runCli([
      'landscape',
      file,
      '--degree',
      '0',
      '--infinite',
      'clip:1',
      '--depth',
      '1',
      '--grid',
      '0:1:3',
    ]);
    expect(all.code).toBe(0);
    const objs = all.stdout
      .trim()
      .split('\n')
      .map((l) => JSON.parse(l));
    expect(objs.map((o) => o.sample)).toEqual(['ring-1', 'disc-1']);
    // Clipped (0, inf) → (0, 1): tent peak 0.5 at t = 0.5.
    expect(objs[1].layers).toEqual([[0, 0.5, 0]]);
    expect(objs[0].infinite).toBe('clip:1');
    expect(all.stderr).toMatch(/2 essential classes \(death inf\) of degree 0 clipped to death 1/);
    const out = join(dir, 'land.csv');
    const csv = runCli([
      'landscape',
      file,
      '--sample',
      'disc-1',
      '--format',
      'csv',
      '--grid',
      '0:2:5',
      '--depth',
      '1',
      '--out',
      out,
    ]);
    expect(csv.code).toBe(0);
    expect(readFileSync(out, 'utf8')).toBe(
      'sample,degree,layer,t,value\ndisc-1,1,1,0,0\ndisc-1,1,1,0.5,0\ndisc-1,1,1,1,0.5\ndisc-1,1,1,1.5,0\ndisc-1,1,1,2,0\n',
    );
    expect(JSON.parse(readFileSync(`${out}.provenance.json`, 'utf8')).options.format).toBe('csv');
    // Exact breakpoints as CSV rows: the single tent (0.5, 1.5) peaks at (1, 0.5).
    const exactCsv = runCli(['landscape', file, '--sample', 'disc-1', '--format', 'csv', '--exact']);
    expect(exactCsv.stdout).toBe(
      'sample,degree,layer,t,value\ndisc-1,1,1,0.5,0\ndisc-1,1,1,1,0.5\ndisc-1,1,1,1.5,0\n',
    );
  });

  it.each([
    [
      'non-numeric',
      'sample,label,degree,birth,death\ns,a,1,0,x\n',
      [],
      /diagrams\.csv:2: 'x' is not a number in column death/,
    ],
    [
      'death before birth',
      'sample,label,degree,birth,death\ns,a,1,0,1\ns,a,1,3,2\n',
      [],
      /diagrams\.csv:3: death 2 is before birth 3/,
    ],
    ['NaN', 'sample,label,degree,birth,death\ns,a,1,NaN,1\n', [], /diagrams\.csv:2: 'NaN' is not a number/],
    ['missing column', 'sample,label,birth,death\ns,a,0,1\n', [], /diagrams\.csv:1: missing column 'degree'/],
    [
      'unknown degree in the file',
      'sample,label,degree,birth,death\ns,a,H1,0,1\n',
      [],
      /diagrams\.csv:2: unknown degree 'H1'/,
    ],
    [
      'degree not in the file',
      'sample,label,degree,birth,death\ns,a,1,0,1\n',
      ['--degree', '2'],
      /diagrams\.csv: degree 2 is not in the file; it has degree 1/,
    ],
    [
      'unknown sample',
      'sample,label,degree,birth,death\ns,a,1,0,1\n',
      ['--sample', 'q'],
      /diagrams\.csv: no sample 'q'/,
    ],
  ])('refuses %s with one line, exit 2, nothing written', (_what, text, extra, message) => {
    const dir = tempDir();
    const out = join(dir, 'out.json');
    const r = runCli(['landscape', writeDiagrams(dir, text), '--out', out, ...extra]);
    expect(r.code).toBe(2);
    expect(r.stderr.trim().split('\n')).toHaveLength(1);
    expect(r.stderr).toMatch(/^landform: /);
    expect(r.stderr).toMatch(message);
    expect(r.stderr).not.toMatch(/\bat .*\.ts:\d+/);
    expect(existsSync(out)).toBe(false);
  });

  it('refuses a missing file and bad options', () => {
    const missing = runCli(['landscape', '/nonexistent/diagrams.csv']);
    expect(missing.code).toBe(2);
    expect(missing.stderr).toBe('landform: /nonexistent/diagrams.csv: file not found; check the path\n');
    const dir = tempDir();
    const grid = runCli(['landscape', writeDiagrams(dir), '--grid', '1:0:5']);
    expect(grid.code).toBe(2);
    expect(grid.stderr).toMatch(/^landform: --grid '1:0:5': STOP must be greater than START\n$/);
  });

  it('loads no neural-network, SVM or chart library', () => {
    // Records every module the process resolves, through a loader hook, and checks the heavy ones are absent.
    const dir = tempDir();
    const trace = join(dir, 'trace.txt');
    writeFileSync(
      join(dir, 'hooks.mjs'),
      "import { appendFileSync } from 'node:fs';\nexport async function resolve(s, c, next) { const r = await next(s, c); appendFileSync(process.env.LANDFORM_TRACE, r.url + '\\n'); return r; }\n",
    );
    writeFileSync(
      join(dir, 'register.mjs'),
      "import { register } from 'node:module';\nregister('./hooks.mjs', import.meta.url);\n",
    );
    const run = spawnSync(
      process.execPath,
      [
        '--import',
        'tsx',
        '--import',
        join(dir, 'register.mjs'),
        join(root, 'src/cli/main.ts'),
        'landscape',
        writeDiagrams(dir),
        '--sample',
        'ring-1',
      ],
      { cwd: root, env: { ...process.env, CI: 'true', LANDFORM_TRACE: trace }, encoding: 'utf8' },
    );
    expect(run.status).toBe(0);
    const loaded = readFileSync(trace, 'utf8');
    expect(loaded).toMatch(/src\/landscape\/sampled-landscape\.ts/);
    for (const heavy of [
      '@tensorflow',
      'libsvm-js',
      '/vega/',
      '/vega-lite/',
      'playwright-core',
      'apache-arrow',
    ]) {
      expect(loaded.includes(heavy), heavy).toBe(false);
    }
  });
});

describe('landform landscape: output budget', () => {
  it('refuses --grid 0:1:1000000 over two samples before sampling, giving the count and the limit', () => {
    const dir = tempDir();
    const r = runCli([
      'landscape',
      writeDiagrams(dir),
      '--degree',
      '1',
      '--grid',
      '0:1:1000000',
      '--out',
      join(dir, 'l.json'),
    ]);
    // 2 samples × 5 layers (the default depth) × 1,000,000 points = 10,000,000 values.
    expect(r.stderr).toBe(
      `landform: 2 samples × 5 layers × 1000000 grid points make 10000000 values, above the limit of ${LANDSCAPE_VALUE_BUDGET}; use a coarser --grid, a smaller --depth or one --sample\n`,
    );
    expect(r.code).toBe(2);
    expect(existsSync(join(dir, 'l.json'))).toBe(false);
    // One sample at the same grid, depth 1: 1,000,000 values, within the limit. At t = 1, λ1 = 1 from the
    // pair (0, 4) (λ_k(t) = k-th largest of max(0, min(t − b, d − t)); Chazal, Fasy, Lecci, Rinaldo,
    // Wasserman, 2014).
    const one = runCli([
      'landscape',
      writeDiagrams(dir),
      '--sample',
      'ring-1',
      '--degree',
      '1',
      '--depth',
      '1',
      '--grid',
      '0:1:1000000',
    ]);
    expect(one.code).toBe(0);
    const layers = JSON.parse(one.stdout).layers;
    expect(layers[0].length).toBe(1_000_000);
    expect(layers[0][999_999]).toBeCloseTo(1, 12);
  });
});
