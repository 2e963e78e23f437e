import { existsSync, readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { Command } from 'commander';
import { describe, expect, it } from 'vitest';
import {
  addFiltrationOptions,
  filtrationRecord,
  parseFiltrationOptions,
} from '../../src/cli/shared-options.js';
import { UserError } from '../../src/core/errors.js';
import { parseDiagramCsv } from '../../src/io/diagram-csv.js';
import { runCli, tempDir } from '../helpers/cli.js';
import { writeShapes } from './shapes-fixture.js';

describe('--filtration and --subsample', () => {
  it('default to plain Rips without landmarks', () => {
    const cmd = addFiltrationOptions(new Command('x')).exitOverride();
    cmd.parse([], { from: 'user' });
    expect(parseFiltrationOptions(cmd.opts())).toEqual({ filtration: 'rips' });
  });

  it('read dtm:K and a landmark spec', () => {
    const cmd = addFiltrationOptions(new Command('x')).exitOverride();
    cmd.parse(['--filtration', 'dtm:8', '--subsample', 'random:300:4'], { from: 'user' });
    expect(parseFiltrationOptions(cmd.opts())).toEqual({
      filtration: { kind: 'dtm', k: 8 },
      subsample: { method: 'random', count: 300, seed: 4 },
    });
  });

  it('explain bad values and what to write instead', () => {
    expect(() => parseFiltrationOptions({ filtration: 'dtm' })).toThrow(UserError);
    expect(() => parseFiltrationOptions({ filtration: 'cech' })).toThrow(/rips, dtm:K .* alpha/);
    expect(() => parseFiltrationOptions({ subsample: 'maxmin' })).toThrow(/maxmin:N or random:N/);
  });
});

describe('provenance record of the filtration', () => {
  it('names the filtration, the landmark rule and each covering radius', () => {
    expect(filtrationRecord({ filtration: 'alpha' })).toEqual({ filtration: 'alpha' });
    const record = filtrationRecord(
      { filtration: { kind: 'dtm', k: 5 }, subsample: { method: 'maxmin', count: 50, seed: 1 } },
      [
        { sample: 'a', coveringRadius: 0.25 },
        { sample: 'b', coveringRadius: 0.5 },
      ],
    );
    expect(record).toEqual({
      filtration: 'dtm:5',
      subsample: 'maxmin:50:1',
      coveringRadius: { largest: 0.5, perSample: { a: 0.25, b: 0.5 } },
    });
  });
});

/** Three gasket outlines of 60 points (invented demo data): two rings and a blank, in the plane or lifted to 3-D. */
function outlinesCsv(dim: 2 | 3): string {
  const lines = [dim === 2 ? 'sample,label,x,y' : 'sample,label,x,y,z'];
  for (let c = 0; c < 3; c++) {
    for (let i = 0; i < 60; i++) {
      const a = (2 * Math.PI * i) / 60;
      const r = c < 2 ? 1 : ((i * 7) % 60) / 60;
      const x = r * Math.cos(a) + 0.01 * (i % 3);
      const y = r * Math.sin(a);
      lines.push(`part-${c},${c < 2 ? 'single' : 'blank'},${x},${y}${dim === 3 ? `,${0.01 * (i % 5)}` : ''}`);
    }
  }
  return `${lines.join('\n')}\n`;
}

describe('--filtration and --subsample on landform diagrams', () => {
  it('computes alpha diagrams (radii: the unit ring dies at radius 1) and records the filtration', () => {
    const dir = tempDir();
    const input = join(dir, 'parts.csv');
    writeFileSync(input, outlinesCsv(2));
    const out = join(dir, 'd.csv');
    const r = runCli(['diagrams', input, '--filtration', 'alpha', '--workers', '1', '--out', out]);
    expect(r.stderr).toBe('');
    expect(r.code).toBe(0);
    const sets = parseDiagramCsv(readFileSync(out, 'utf8'), out);
    const ring = sets.find((s) => s.sample === 'part-0');
    const h1 = ring?.diagrams.find((d) => d.degree === 1);
    // Alpha = Čech on radii: a loop of 60 nearly even points on the unit circle dies near radius 1.
    const longest = Math.max(...Array.from(h1?.deaths ?? [0]));
    expect(longest).toBeGreaterThan(0.95);
    expect(longest).toBeLessThan(1.05);
    const prov = JSON.parse(readFileSync(`${out}.provenance.json`, 'utf8')) as {
      options: Record<string, unknown>;
    };
    expect(prov.options.filtration).toBe('alpha');
  });

  it('takes landmarks before DTM and writes each covering radius to the provenance', () => {
    const dir = tempDir();
    const input = join(dir, 'parts.csv');
    writeFileSync(input, outlinesCsv(2));
    const out = join(dir, 'd.csv');
    const r = runCli([
      'diagrams',
      input,
      '--filtration',
      'dtm:4',
      '--subsample',
      'maxmin:20:3',
      '--workers',
      '2',
      '--out',
      out,
    ]);
    expect(r.stderr).toBe('');
    expect(r.code).toBe(0);
    const prov = JSON.parse(readFileSync(`${out}.provenance.json`, 'utf8')) as {
      options: {
        filtration: string;
        subsample: string;
        coveringRadius: { largest: number; perSample: Record<string, number> };
      };
    };
    expect(prov.options.filtration).toBe('dtm:4');
    expect(prov.options.subsample).toBe('maxmin:20:3');
    expect(Object.keys(prov.options.coveringRadius.perSample).sort()).toEqual(['part-0', 'part-1', 'part-2']);
    // 20 maxmin landmarks on a unit ring of 60 points: every point is within a few spacings of one.
    expect(prov.options.coveringRadius.perSample['part-0']).toBeGreaterThan(0);
    expect(prov.options.coveringRadius.perSample['part-0']).toBeLessThan(0.35);
  });

  it('refuses alpha on 3-D clouds in one line that names the filtrations that apply', () => {
    const dir = tempDir();
    const input = join(dir, 'parts3.csv');
    writeFileSync(input, outlinesCsv(3));
    const r = runCli([
      'diagrams',
      input,
      '--filtration',
      'alpha',
      '--workers',
      '1',
      '--out',
      join(dir, 'd.csv'),
    ]);
    expect(r.code).toBe(2);
    expect(r.stderr.trim().split('\n').length).toBe(1);
    expect(r.stderr).toMatch(/2-D point clouds only.*--filtration rips or --filtration dtm:K/);
    expect(existsSync(join(dir, 'd.csv'))).toBe(false);
  });

  it('refuses an unknown filtration with exit 2', () => {
    const dir = tempDir();
    const input = join(dir, 'parts.csv');
    writeFileSync(input, outlinesCsv(2));
    const r = runCli(['diagrams', input, '--filtration', 'dtm', '--out', join(dir, 'd.csv')]);
    expect(r.code).toBe(2);
    expect(r.stderr).toMatch(/--filtration 'dtm' is not known/);
  });
});

describe('--filtration through vectorize and train', () => {
  it('records the filtration in the feature provenance and keeps it in a saved model', () => {
    const dir = tempDir();
    const input = join(dir, 'shapes.csv');
    writeShapes(input, 3, 15);
    const out = join(dir, 'features.csv');
    const r = runCli([
      'vectorize',
      input,
      '--filtration',
      'alpha',
      '--depth',
      '2',
      '--grid-size',
      '5',
      '--workers',
      '1',
      '--out',
      out,
    ]);
    expect(r.stderr).toBe('');
    expect(r.code).toBe(0);
    expect(readFileSync(`${out}.provenance.json`, 'utf8')).toMatch(/"filtration": "alpha"/);
    const model = join(dir, 'model');
    const t = runCli([
      'train',
      input,
      '--filtration',
      'dtm:3',
      '--depths',
      '2',
      '--grid-sizes',
      '6',
      '--inner-folds',
      '2',
      '--workers',
      '1',
      '--save',
      model,
    ]);
    expect(t.stderr).toBe('');
    expect(t.code).toBe(0);
    const manifest = JSON.parse(readFileSync(join(model, 'manifest.json'), 'utf8'));
    expect(manifest.record.diagramOptions.filtration).toEqual({ kind: 'dtm', k: 3 });
  });
});

describe('--filtration through contrast', () => {
  it('compares class means of DTM landscapes and records the filtration and landmarks', () => {
    const dir = tempDir();
    const input = join(dir, 'shapes.csv');
    writeShapes(input, 4, 30);
    const r = runCli([
      'contrast',
      input,
      '--filtration',
      'dtm:3',
      '--subsample',
      'random:20:2',
      '--permutations',
      '19',
      '--grid-count',
      '20',
      '--workers',
      '1',
      '--quiet',
    ]);
    expect(r.stderr).toBe('');
    expect(r.code).toBe(0);
    const result = JSON.parse(r.stdout) as {
      options: {
        filtration: string;
        subsample: string;
        coveringRadius: { perSample: Record<string, number> };
      };
    };
    expect(result.options.filtration).toBe('dtm:3');
    expect(result.options.subsample).toBe('random:20:2');
    expect(Object.keys(result.options.coveringRadius.perSample)).toHaveLength(8);
  });
});
