import { existsSync, readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { Command } from 'commander';
import { describe, expect, it, vi } from 'vitest';
import { closestNames, editDistance } from '../../src/cli/options.js';
import {
  addDiagramOptions,
  addFiltrationOptions,
  addLandscapeOptions,
  addStudyOptions,
  EMBED_LIMITS,
  filtrationRecord,
  parseDiagramOptions,
  parseEmbedOption,
  parseFiltrationOptions,
  parseLandscapeOptions,
  parseStudyOptions,
} from '../../src/cli/shared-options.js';
import { UserError } from '../../src/core/errors.js';
import { parseDiagramCsv } from '../../src/io/diagram-csv.js';
import { runCli, tempDir, withoutCompletion } from '../helpers/cli.js';
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
    expect(() => parseFiltrationOptions({ filtration: 'rips,erossion' })).toThrow(
      /^--filtration 'erossion' is not known \(did you mean erosion\?\); choose rips, dtm:K/,
    );
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
    expect(withoutCompletion(r.stderr)).toBe('');
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
    expect(withoutCompletion(r.stderr)).toBe('');
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
    expect(withoutCompletion(r.stderr)).toBe('');
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
    expect(withoutCompletion(t.stderr)).toBe('');
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
      '--grid-size',
      '20',
      '--workers',
      '1',
      '--quiet',
    ]);
    expect(withoutCompletion(r.stderr)).toBe('');
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

describe('the shared option parser (src/cli/shared-options.ts)', () => {
  /** A command with the shared options, parsed like the CLI parses it. */
  function parsed(args: string[], add: (c: Command) => Command): Record<string, unknown> {
    const cmd = add(new Command('x')).option('--quiet').exitOverride();
    cmd.parse(args, { from: 'user' });
    return cmd.opts();
  }

  it('parses the diagram options once, with one set of limits for every command', () => {
    const o = parsed(
      [
        '--degrees',
        '1,0,1',
        '--metric',
        'manhattan',
        '--embed',
        '4:8:2',
        '--max-scale',
        '2',
        '--kind',
        'signal',
      ],
      addDiagramOptions,
    );
    const p = parseDiagramOptions(o);
    expect(p.degrees).toEqual([0, 1]);
    expect(p.kind).toBe('signal');
    expect(p.diagramOptions).toEqual({
      degrees: [0, 1],
      metric: 'manhattan',
      maxScale: 2,
      embed: { dimension: 4, delay: 8, stride: 2 },
    });
    // Defaults: degrees 0,1 and the Euclidean metric, as in every command.
    expect(parseDiagramOptions(parsed([], addDiagramOptions)).diagramOptions).toEqual({
      degrees: [0, 1],
      metric: 'euclidean',
    });
    // One embedding limit (contrast allowed 64 dimensions, diagrams 1000 before).
    expect(parseEmbedOption(`${EMBED_LIMITS.dimension}:1`).dimension).toBe(EMBED_LIMITS.dimension);
    expect(() => parseEmbedOption(`${EMBED_LIMITS.dimension + 1}:1`)).toThrow(
      /--embed DIM '1001' is not a whole number from 1 to 1000/,
    );
    expect(() => parseDiagramOptions({ degrees: '3' })).toThrow(
      /--degrees '3' is not a whole number from 0 to 2/,
    );
    expect(() => parseDiagramOptions({ metric: 'euclidian' })).toThrow(
      "--metric 'euclidian' is not known (did you mean euclidean?); choose from euclidean, manhattan, chebyshev",
    );
  });

  it('reads --grid-size, and contrast’s old --grid-count with one note (not with --quiet), never both', () => {
    const add = (c: Command) => addLandscapeOptions(c, { depth: 5, gridSize: 200, oldGridCount: true });
    expect(parseLandscapeOptions(parsed([], add), { gridSize: 200 })).toMatchObject({
      depth: 5,
      gridSize: 200,
      gridSizeGiven: false,
    });
    const write = vi.spyOn(process.stderr, 'write').mockImplementation(() => true);
    try {
      expect(parseLandscapeOptions(parsed(['--grid-size', '40'], add), { gridSize: 200 }).gridSize).toBe(40);
      expect(write).not.toHaveBeenCalled();
      expect(parseLandscapeOptions(parsed(['--grid-count', '30'], add), { gridSize: 200 }).gridSize).toBe(30);
      expect(write).toHaveBeenCalledTimes(1);
      expect(write.mock.calls[0][0]).toBe(
        'landform: note: --grid-count is now --grid-size; the old name will be removed in the next release\n',
      );
      parseLandscapeOptions(parsed(['--grid-count', '30', '--quiet'], add), { gridSize: 200 });
      expect(write).toHaveBeenCalledTimes(1);
    } finally {
      write.mockRestore();
    }
    expect(() =>
      parseLandscapeOptions(parsed(['--grid-count', '30', '--grid-size', '40'], add), { gridSize: 200 }),
    ).toThrow('--grid-count is the old name of --grid-size; give --grid-size only');
    // The old name is hidden from help.
    expect(add(new Command('x')).helpInformation()).not.toContain('--grid-count');
  });

  it('takes lists for evaluate and one value for train, under singular and plural names that match', () => {
    const base = ['--depths', '3', '--grid-sizes', '10,20'];
    const list = parseStudyOptions(
      parsed([...base, '--models', 'forest,pca-svm', '--feature-sets', 'raw,betti'], (c) =>
        addStudyOptions(c),
      ) as never,
    );
    expect(list.models).toEqual(['forest', 'pca-svm']);
    expect(list.featureSets).toEqual(['raw', 'betti']);
    expect(list.landscapeCandidates).toEqual([
      { depth: 3, gridSize: 10 },
      { depth: 3, gridSize: 20 },
    ]);
    const one = parseStudyOptions(
      parsed([...base, '--model', 'forest', '--feature-set', 'stats'], (c) =>
        addStudyOptions(c, true),
      ) as never,
      true,
    );
    expect(one.models).toEqual(['forest']);
    expect(one.featureSets).toEqual(['stats']);
    expect(() =>
      parseStudyOptions(parsed(['--model', 'forest,dense'], (c) => addStudyOptions(c, true)) as never, true),
    ).toThrow("--model takes one value here, got 'forest,dense'");
    expect(() =>
      parseStudyOptions(parsed(['--feature-sets', 'landscap'], (c) => addStudyOptions(c)) as never),
    ).toThrow("--feature-sets 'landscap' is not known (did you mean landscape?)");
    // Help shows the singular names for train and the plural ones for evaluate, never the old ones.
    const single = addStudyOptions(new Command('train'), true).helpInformation();
    expect(single).toMatch(/--model <name>/);
    expect(single).toMatch(/--feature-set <name>/);
    expect(single).not.toMatch(/--models|--features/);
    const lists = addStudyOptions(new Command('evaluate')).helpInformation();
    expect(lists).toMatch(/--models <list>/);
    expect(lists).toMatch(/--feature-sets <list>/);
    expect(lists).not.toMatch(/--features /);
  });
});

describe('suggestions by edit distance', () => {
  it('computes the optimal string alignment distance', () => {
    // The classic worked example (Levenshtein distance): kitten → sitting takes 3 edits.
    expect(editDistance('kitten', 'sitting')).toBe(3);
    // A swap of neighbours counts once (Damerau, "A technique for computer detection and correction of
    // spelling errors", 1964).
    expect(editDistance('pcasvm', 'pcsavm')).toBe(1);
    expect(editDistance('', 'abc')).toBe(3);
    expect(editDistance('same', 'same')).toBe(0);
  });

  it('suggests the closest known names, none when nothing is close', () => {
    expect(closestNames('pca-svn', ['pca-svm', 'dense', 'forest'])).toEqual(['pca-svm']);
    expect(closestNames('tabel', ['table', 'label', 'image'])).toEqual(['table', 'label']);
    expect(closestNames('quantum', ['pca-svm', 'dense', 'forest'])).toEqual([]);
  });
});

describe('the shared options through two commands', () => {
  const dir = tempDir();
  const input = join(dir, 'shapes.csv');
  writeShapes(input, 3, 12);

  it('contrast and vectorize take --grid-size and refuse the same bad --embed with the same line', () => {
    const c = runCli(['contrast', input, '--grid-size', '1', '--quiet']);
    const v = runCli(['vectorize', input, '--grid-size', '1', '--quiet']);
    expect(c.code).toBe(2);
    expect(c.stderr).toBe("landform: --grid-size '1' is not a whole number from 2 to 100000\n");
    expect(v.stderr).toBe(c.stderr);
    const ce = runCli(['contrast', input, '--embed', '2000:1']);
    const ve = runCli(['vectorize', input, '--embed', '2000:1']);
    expect(ce.code).toBe(2);
    expect(ce.stderr).toBe("landform: --embed DIM '2000' is not a whole number from 1 to 1000\n");
    expect(ve.stderr).toBe(ce.stderr);
    // contrast's old --grid-count still works for one release, with the note.
    const old = runCli(['contrast', input, '--grid-count', '20', '--permutations', '9', '--workers', '1']);
    expect(old.code).toBe(0);
    expect(old.stderr).toBe(
      'landform: note: --grid-count is now --grid-size; the old name will be removed in the next release\n',
    );
    expect(JSON.parse(old.stdout).options.gridSize).toBe(20);
  });
});
