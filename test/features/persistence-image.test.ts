import { describe, expect, it } from 'vitest';
import { makeDiagram } from '../../src/core/diagram.js';
import {
  erfc,
  normalCdf,
  PersistenceImageVectorizer,
  persistenceImageInto,
} from '../../src/features/persistence-image.js';
import { leaked, randomSets, set, TRAIN, twoFiltrations } from './diagram-fixtures.js';

describe('PersistenceImageVectorizer', () => {
  it('turns one point into a Gaussian whose mass over the plane equals its weight', () => {
    // Adams et al., "Persistence images: a stable vector representation of persistent homology", JMLR
    // 2017, definitions 1–2: a point u = (b, p) contributes w(u)·φ_u, φ_u a normalised Gaussian, so its
    // integral over the plane is w(u); with their linear weight, w = p / P below P. A frame 20σ wide on each
    // side of u holds all of it (the normal tail beyond 10σ is below 1e-20).
    const frame = { birthStart: -1, birthStop: 3, persistenceStop: 4, sigma: 0.1 };
    const d = makeDiagram(1, [[1, 3]]); // u = (1, 2), w = 2 / 4
    const out = new Float64Array(40 * 40);
    persistenceImageInto(d.births, d.deaths, frame, 40, out, 0);
    expect(out.reduce((a, v) => a + v, 0)).toBeCloseTo(0.5, 7);
  });

  it('gives each pixel the integral of the Gaussian over it (checked by a fine midpoint rule)', () => {
    // The persistence image's pixel value is ∫∫ over the pixel of the persistence surface (Adams et al.
    // 2017, definition 2). Reference: the midpoint rule on a 200 × 200 sub-grid of each pixel of the density
    // w/(2πσ²)·exp(−|z − u|²/(2σ²)).
    const frame = { birthStart: 0, birthStop: 1, persistenceStop: 1, sigma: 0.15 };
    const b = 0.4;
    const p = 0.3;
    const d = makeDiagram(1, [[b, b + p]]);
    const R = 4;
    const out = new Float64Array(R * R);
    persistenceImageInto(d.births, d.deaths, frame, R, out, 0);
    const s = frame.sigma;
    const w = p / frame.persistenceStop;
    const m = 200;
    for (const [i, j] of [
      [0, 0],
      [1, 1],
      [1, 2],
      [3, 0],
    ]) {
      let sum = 0;
      const h = 1 / R / m;
      for (let a = 0; a < m; a++) {
        for (let c = 0; c < m; c++) {
          const x = j / R + (c + 0.5) * h;
          const y = i / R + (a + 0.5) * h;
          sum += Math.exp(-((x - b) ** 2 + (y - p) ** 2) / (2 * s * s));
        }
      }
      const expected = (w * sum * h * h) / (2 * Math.PI * s * s);
      expect(out[i * R + j]).toBeCloseTo(expected, 6);
    }
  });

  it('uses an error function accurate to the published bound', () => {
    // erfc reference values from Abramowitz & Stegun, "Handbook of mathematical functions", 1964, table 7.1:
    // erf(0.5) = 0.5204998778, erf(1) = 0.8427007929, erf(2) = 0.9953222650.
    expect(erfc(0.5)).toBeCloseTo(1 - 0.5204998778, 7);
    expect(erfc(1)).toBeCloseTo(1 - 0.8427007929, 7);
    expect(erfc(2)).toBeCloseTo(1 - 0.995322265, 7);
    expect(erfc(-1)).toBeCloseTo(1 + 0.8427007929, 7);
    expect(normalCdf(0)).toBeCloseTo(0.5, 7);
  });

  it('learns each channel’s frame from the training samples only', () => {
    const sets = randomSets(30, 5);
    const a = new PersistenceImageVectorizer({ resolution: 5 }).fit(sets, TRAIN);
    const b = new PersistenceImageVectorizer({ resolution: 5 }).fit(leaked(sets), TRAIN);
    expect(b.state).toEqual(a.state);
    expect([...b.transform(leaked(sets), TRAIN).data]).toEqual([...a.transform(sets, TRAIN).data]);
    // H0 births are all 0: the birth axis is centred there with the persistence axis's width.
    const h0 = a.state!.frames[0].frame;
    expect(h0.birthStop - h0.birthStart).toBeCloseTo(h0.persistenceStop, 12);
    expect(h0.sigma).toBeCloseTo(0.05 * h0.persistenceStop, 12);
    expect(a.featureNames().length).toBe(2 * 25);
    expect(a.featureNames()[0]).toMatch(/^H0\/pimage\/p=[0-9.]+\/b=-?[0-9.]+$/);
  });

  it('round-trips through JSON with identical features, one block per channel', () => {
    const sets = twoFiltrations(randomSets(22, 4));
    const v = new PersistenceImageVectorizer({ resolution: 3, sigma: 0.1 }).fit(sets);
    expect(v.state!.frames.length).toBe(4);
    const again = PersistenceImageVectorizer.fromJSON(JSON.parse(JSON.stringify(v.toJSON())));
    expect([...again.transform(sets).data]).toEqual([...v.transform(sets).data]);
    expect(again.featureNames()).toEqual(v.featureNames());
    expect(again.featureNames()[18]).toMatch(/^radial:0:0\/H0\/pimage\//);
    expect(() => new PersistenceImageVectorizer({ resolution: 0 })).toThrow(/resolution 0/);
    expect(() =>
      PersistenceImageVectorizer.fromJSON({ kind: 'landform.persistence-images', format: 1 }),
    ).toThrow(/lacks its options/);
    expect(new PersistenceImageVectorizer({ degrees: [1] }).fitTransform([set('a', [], [])]).cols).toBe(400);
  });
});
