import { existsSync, readFileSync, writeFileSync } from 'node:fs';
import { availableParallelism } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { parseDiagramCsv } from '../../src/io/diagram-csv.js';
import { runCli, tempDir, withoutCompletion } from '../helpers/cli.js';

/** Two rings and two small blobs of 40 points each (a demo scenario: printed struts seen end-on). */
function ringsCsv(): string {
  const lines = ['sample,label,x,y'];
  for (let c = 0; c < 4; c++) {
    const ring = c % 2 === 1;
    for (let i = 0; i < 40; i++) {
      const a = (2 * Math.PI * i) / 40;
      const r = ring ? 1 : 0.1;
      lines.push(
        `strut-${c},${ring ? 'hollow' : 'solid'},${r * Math.cos(a)},${r * Math.sin(a) + 0.001 * (i % 3)}`,
      );
    }
  }
  return lines.join('\n') + '\n';
}

describe('landform diagrams', () => {
  it('writes the diagram CSV and its provenance; hollow struts have one long loop', () => {
    const dir = tempDir();
    const input = join(dir, 'struts.csv');
    writeFileSync(input, ringsCsv());
    const out = join(dir, 'd.csv');
    const r = runCli(['diagrams', input, '--degrees', '0,1', '--workers', '2', '--out', out]);
    expect(withoutCompletion(r.stderr)).toBe('');
    expect(r.code).toBe(0);
    const sets = parseDiagramCsv(readFileSync(out, 'utf8'), out);
    expect(sets.map((s) => s.sample)).toEqual(['strut-0', 'strut-1', 'strut-2', 'strut-3']);
    for (const s of sets) {
      const h1 = s.diagrams.find((d) => d.degree === 1);
      let long = 0;
      if (h1) for (let i = 0; i < h1.births.length; i++) if (h1.deaths[i] - h1.births[i] > 0.5) long++;
      expect(long).toBe(s.label === 'hollow' ? 1 : 0);
      // Each cloud is connected in the end: exactly one essential H0 class.
      const h0 = s.diagrams.find((d) => d.degree === 0);
      expect(Array.from(h0?.deaths ?? []).filter((x) => x === Infinity).length).toBe(1);
    }
    const prov = JSON.parse(readFileSync(`${out}.provenance.json`, 'utf8'));
    expect(prov.command).toBe('diagrams');
    expect(prov.options.degrees).toEqual([0, 1]);
    expect(prov.options.metric).toBe('euclidean');
    // One thread gives the same file; --timings reports the stages on one stderr line.
    const out1 = join(dir, 'd1.csv');
    const timed = runCli(['diagrams', input, '--workers', '1', '--out', out1, '--timings']);
    expect(timed.code).toBe(0);
    expect(readFileSync(out1, 'utf8')).toBe(readFileSync(out, 'utf8'));
    expect(timed.stdout).toBe('');
    const m =
      /^landform: timings: start-up ([\d.]+) s, reading ([\d.]+) s, computing ([\d.]+) s \(4 samples, 1 thread\), writing ([\d.]+) s\n$/.exec(
        withoutCompletion(timed.stderr),
      );
    expect(m, timed.stderr).not.toBeNull();
    // The completion line comes last.
    expect(timed.stderr).toMatch(
      /\nlandform diagrams: wrote .*d1\.csv \(CSV diagrams, 4 samples, [\d.]+ s\)\n$/,
    );
    expect(Number(m?.[1])).toBeGreaterThan(0);
  }, 60000);

  it('embeds long signals with --embed and refuses loops without it', () => {
    const dir = tempDir();
    const input = join(dir, 'pump.csv');
    const lines = ['sample,label,value'];
    for (let t = 0; t < 120; t++) lines.push(`run-1,steady,${Math.sin((2 * Math.PI * t) / 30)}`);
    writeFileSync(input, lines.join('\n') + '\n');
    const out = join(dir, 'd.csv');
    const bad = runCli(['diagrams', input, '--degrees', '0,1', '--out', out]);
    expect(bad.code).toBe(2);
    expect(bad.stderr).toMatch(/^landform: .*--embed/);
    expect(existsSync(out)).toBe(false);
    const ok = runCli([
      'diagrams',
      input,
      '--degrees',
      '1',
      '--embed',
      '2:7',
      '--workers',
      '1',
      '--out',
      out,
    ]);
    expect(ok.code).toBe(0);
    const [set] = parseDiagramCsv(readFileSync(out, 'utf8'), out);
    const h1 = set.diagrams[0];
    expect(Math.max(...Array.from(h1.deaths).map((d, i) => d - h1.births[i]))).toBeGreaterThan(0.5);
  }, 60000);

  it('passes --filtration and --subsample through and records them', () => {
    const dir = tempDir();
    const input = join(dir, 'struts.csv');
    writeFileSync(input, ringsCsv());
    const out = join(dir, 'd.csv');
    const r = runCli([
      'diagrams',
      input,
      '--filtration',
      'dtm:4',
      '--subsample',
      'maxmin:20',
      '--workers',
      '1',
      '--out',
      out,
    ]);
    expect(withoutCompletion(r.stderr)).toBe('');
    expect(r.code).toBe(0);
    const prov = JSON.parse(readFileSync(`${out}.provenance.json`, 'utf8'));
    expect(prov.options.filtration).toBe('dtm:4');
    expect(prov.options.coveringRadius.largest).toBeGreaterThan(0);
    // DTM values are radii and vertices enter at their DTM value (> 0), unlike plain Rips.
    const sets = parseDiagramCsv(readFileSync(out, 'utf8'), out);
    expect(Math.min(...Array.from(sets[0].diagrams[0].births))).toBeGreaterThan(0);
  }, 60000);

  it('explains bad options on one line with exit code 2', () => {
    const dir = tempDir();
    const input = join(dir, 'struts.csv');
    writeFileSync(input, ringsCsv());
    // No --out: the CSV goes to standard output, the same bytes as the file, and no completion line.
    const noOut = runCli(['diagrams', input, '--workers', '1']);
    expect(noOut.code).toBe(0);
    expect(noOut.stderr).toBe('');
    const file = join(dir, 'file.csv');
    expect(runCli(['diagrams', input, '--workers', '1', '--out', file]).code).toBe(0);
    expect(noOut.stdout).toBe(readFileSync(file, 'utf8'));
    const shard = runCli(['diagrams', input, '--shard', '1/2']);
    expect(shard.code).toBe(2);
    expect(shard.stderr).toBe(
      'landform: --shard needs --out FILE: each shard is written beside it as FILE.shard-I-of-N\n',
    );
    const embed = runCli(['diagrams', input, '--embed', '3', '--out', join(dir, 'x.csv')]);
    expect(embed.code).toBe(2);
    expect(embed.stderr).toMatch(/DIM:DELAY/);
    expect(embed.stderr.trim().split('\n').length).toBe(1);
  }, 60000);
});

describe('landform diagrams: resource guards', () => {
  it('caps --workers 1000 at the cores of the machine with one line on stderr, silent with --quiet', () => {
    const dir = tempDir();
    const input = join(dir, 'struts.csv');
    writeFileSync(input, ringsCsv());
    const cores = availableParallelism();
    const many = runCli([
      'diagrams',
      input,
      '--degrees',
      '0,1',
      '--workers',
      '1000',
      '--out',
      join(dir, 'many.csv'),
    ]);
    expect(many.code).toBe(0);
    expect(withoutCompletion(many.stderr)).toBe(
      `landform: --workers 1000 is more than the ${cores} core${cores === 1 ? '' : 's'} of this machine; using ${cores}\n`,
    );
    const one = runCli([
      'diagrams',
      input,
      '--degrees',
      '0,1',
      '--workers',
      '1',
      '--quiet',
      '--out',
      join(dir, 'one.csv'),
    ]);
    expect(one.code).toBe(0);
    // The diagrams do not depend on the thread count.
    expect(readFileSync(join(dir, 'many.csv'), 'utf8')).toBe(readFileSync(join(dir, 'one.csv'), 'utf8'));
    const quiet = runCli(['diagrams', input, '--workers', '1000', '--quiet', '--out', join(dir, 'q.csv')]);
    expect(quiet.code).toBe(0);
    expect(withoutCompletion(quiet.stderr)).toBe('');
  });

  it('refuses a 60,000-point cloud in one line before computing its distances', () => {
    const dir = tempDir();
    const input = join(dir, 'big.csv');
    const rows = ['sample,label,x,y'];
    for (let i = 0; i < 60_000; i++) rows.push(`big,a,${(i % 250) / 250},${Math.floor(i / 250) / 240}`);
    writeFileSync(input, rows.join('\n') + '\n');
    const r = runCli(['diagrams', input, '--workers', '1', '--out', join(dir, 'd.csv')], {
      env: { LANDFORM_MEMORY_LIMIT: '8G' },
    });
    expect(r.code).toBe(2);
    // 60,000 points need 12 bytes a pair and 4n² bytes before any scale is known: 33.5 GiB.
    expect(r.stderr).toMatch(
      /^landform: sample 'big': the Rips filtration of 60000 points \(1799970000 pairwise distances\) needs about 33\.5 GB of memory \(limit 8192 MB, set by LANDFORM_MEMORY_LIMIT\); subsample the cloud/,
    );
    expect(r.stderr.split('\n')).toHaveLength(2);
    expect(existsSync(join(dir, 'd.csv'))).toBe(false);
  });
});
