import { describe, expect, it } from 'vitest';
import { accuracyCaption, layerList, superlevelOf } from '../../src/report/captions.js';

describe('superlevelOf', () => {
  it('names the negated quantity only where superlevel sets were used', () => {
    // As the demo records it.
    expect(superlevelOf('image', { degrees: [0, 1], superlevel: true })).toBe('grey level');
    // As landform evaluate records it: an image's default filtration is written 'rips' and means grey.
    expect(superlevelOf('image', { superlevel: true, embed: null, filtration: 'rips' })).toBe('grey level');
    expect(superlevelOf('image', { superlevel: true, filtration: 'grey,erosion' }, 'grey')).toBe(
      'grey level',
    );
    // The binarised image filtrations ignore superlevel.
    expect(
      superlevelOf('image', { superlevel: true, filtration: 'grey,erosion' }, 'erosion'),
    ).toBeUndefined();
    expect(superlevelOf('image', { superlevel: true, filtration: 'erosion' })).toBeUndefined();
    expect(superlevelOf('image', { superlevel: false })).toBeUndefined();
    expect(superlevelOf('signal', { superlevel: true, embed: null })).toBe('signal value');
    // A delay-embedded signal is a point cloud: no superlevel sets.
    expect(superlevelOf('signal', { superlevel: true, embed: { dimension: 3, delay: 1 } })).toBeUndefined();
    expect(superlevelOf('points', { superlevel: true })).toBeUndefined();
    expect(superlevelOf('diagrams', 'given')).toBeUndefined();
    expect(superlevelOf('image', undefined)).toBeUndefined();
  });
});

describe('layerList', () => {
  it('writes layer lists', () => {
    expect(layerList([2])).toBe('λ2');
    expect(layerList([1, 2])).toBe('λ1 and λ2');
    expect(layerList([1, 2, 3])).toBe('λ1–λ3');
    expect(layerList([1, 3, 4])).toBe('λ1, λ3 and λ4');
  });
});

describe('accuracyCaption', () => {
  it('names the bars cut at 0 or 1, escaped', () => {
    expect(accuracyCaption([{ features: 'landscape', model: 'pca-svm', mean: 0.8, std: 0.1 }])).toBe(
      'Cross-validated accuracy by feature set and model; bars are mean ± 1 sd, clipped to [0, 1].',
    );
    expect(
      accuracyCaption([
        { features: 'a<b', model: 'm', mean: 0.95, std: 0.1 },
        { features: 'raw', model: 'dense', mean: 0.05, std: 0.1 },
        { features: 'raw', model: 'forest', mean: 0.5, std: 0.6 },
      ]),
    ).toBe(
      'Cross-validated accuracy by feature set and model; bars are mean ± 1 sd, clipped to [0, 1]. ' +
        'Clipped here: a&lt;b · m (at 1), raw · dense (at 0) and raw · forest (both ends).',
    );
  });
});
