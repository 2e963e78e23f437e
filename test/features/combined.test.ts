import { readFileSync } from 'node:fs';
import { describe, expect, it } from 'vitest';
import type { Sample } from '../../src/core/sample.js';
import {
  checkFeatureSet,
  FEATURE_SET_NAMES,
  FeatureExtractor,
  featureSetsFor,
} from '../../src/features/combined.js';
import { randomSets, TRAIN, twoFiltrations } from './diagram-fixtures.js';

const root = new URL('../../', import.meta.url).pathname;

function dataOf(n: number, seed: number, scale = 1) {
  const diagrams = twoFiltrations(randomSets(n, seed, scale));
  const samples = diagrams.map(
    (d): Sample => ({ id: d.sample, label: d.label, kind: 'diagrams', diagrams: d.diagrams }) as Sample,
  );
  return { samples, diagrams };
}

describe('FeatureExtractor with the betti, stats and pimage sets', () => {
  it('builds each set from the diagrams, with the landscape options’ degrees and essential-class policy', () => {
    const data = dataOf(25, 3);
    const landscape = { degrees: [1], infinite: { mode: 'clip' as const, value: 3 }, gridSize: 12 };
    const betti = new FeatureExtractor('betti', { landscape }).fit(data, TRAIN);
    expect(betti.diagram?.options()).toMatchObject({
      degrees: [1],
      gridSize: 12,
      infinite: landscape.infinite,
    });
    expect(betti.transform(data).cols).toBe(2 * 12);
    const stats = new FeatureExtractor('stats', { landscape, stats: { degrees: [0, 1] } }).fit(data, TRAIN);
    expect(stats.featureNames()).toContain('height:1:0/H0/entropy');
    const pimage = new FeatureExtractor('pimage', { landscape, pimage: { resolution: 4 } }).fit(data, TRAIN);
    expect(pimage.featureNames().length).toBe(2 * 16);
    // The inner CV's copy keeps the set's own options.
    expect(pimage.withLandscape({ depth: 2 }).diagram?.options()).toEqual(pimage.diagram?.options());
    expect(pimage.landscape).toBeUndefined();
  });

  it('round-trips every new set through JSON (format 1) and learns nothing from the test rows', () => {
    const data = dataOf(30, 5);
    const larger = dataOf(30, 5);
    const swapped = {
      samples: [...data.samples.slice(0, 20), ...dataOf(10, 9, 10).samples],
      diagrams: [...larger.diagrams.slice(0, 20), ...dataOf(10, 9, 10).diagrams],
    };
    for (const set of ['betti', 'stats', 'pimage'] as const) {
      const e = new FeatureExtractor(set).fit(data, TRAIN);
      const json = JSON.parse(JSON.stringify(e.toJSON()));
      expect(json.format).toBe(1);
      const again = FeatureExtractor.fromJSON(json);
      expect([...again.transform(data).data]).toEqual([...e.transform(data).data]);
      expect(again.featureNames()).toEqual(e.featureNames());
      const f = new FeatureExtractor(set).fit(swapped, TRAIN);
      expect(f.toJSON()).toEqual(e.toJSON());
      expect(() => FeatureExtractor.fromJSON({ ...json, [set]: undefined })).toThrow(`lack their ${set}`);
    }
  });

  it('still loads a saved extractor of the first format (a model folder saved before the other sets)', () => {
    // test/fixtures/model-format-1: the shipped lattice model as saved by landform 0.1.0 before betti, stats,
    // pimage and the recorded sample shape existed.
    const manifest = JSON.parse(readFileSync(`${root}test/fixtures/model-format-1/manifest.json`, 'utf8'));
    const e = FeatureExtractor.fromJSON(manifest.extractor);
    expect(e.set).toBe('landscape');
    expect(e.diagram).toBeUndefined();
    expect(e.featureNames().length).toBeGreaterThan(0);
  });

  it('allows the diagram sets for diagram datasets, none but raw for tables, and keeps the default list', () => {
    for (const set of ['landscape', 'betti', 'stats', 'pimage'] as const) checkFeatureSet(set, 'diagrams');
    expect(() => checkFeatureSet('combined', 'diagrams')).toThrow(/landscape, betti, stats, pimage/);
    expect(() => checkFeatureSet('stats', 'table')).toThrow(/use --feature-sets raw/);
    expect(featureSetsFor('points')).toEqual(['landscape', 'raw', 'combined']);
    expect(FEATURE_SET_NAMES).toContain('pimage');
  });
});
