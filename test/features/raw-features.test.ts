import { describe, expect, it } from 'vitest';
import type { DistanceSample, ImageSample, PointSample, SignalSample } from '../../src/core/sample.js';
import { covarianceEigenvalues, downsample, RawFeatures, resample } from '../../src/features/raw-features.js';

function points(id: string, coords: number[], dim = 2): PointSample {
  return {
    kind: 'points',
    id,
    label: 'a',
    dim,
    count: coords.length / dim,
    coords: Float64Array.from(coords),
  };
}

describe('RawFeatures', () => {
  it('D2 histogram of a unit square: 4 sides of length 1 and 2 diagonals of √2 (Osada et al., "Shape distributions", 2002)', () => {
    const square = points('sq', [0, 0, 1, 0, 1, 1, 0, 1]);
    const r = new RawFeatures({ bins: 4, upperQuantile: 1 }).fit([square]);
    expect(r.state!.upper).toBeCloseTo(Math.SQRT2, 12);
    const x = r.transform([square]);
    // bins of width √2/4: 1 falls in bin 2 (1/(√2/4) = 2.83), √2 at the top edge goes to the last bin.
    expect([...x.data.subarray(0, 4)]).toEqual([0, 0, 4 / 6, 2 / 6]);
    // covariance of the square's corners (n − 1 divisor): diag(1/3, 1/3)
    expect(x.data[4]).toBeCloseTo(1 / 3, 12);
    expect(x.data[5]).toBeCloseTo(1 / 3, 12);
    expect(r.featureNames()).toEqual([
      'D2/r=0.1768',
      'D2/r=0.5303',
      'D2/r=0.8839',
      'D2/r=1.2374',
      'eig/1',
      'eig/2',
    ]);
  });

  it('learns the histogram range from training samples only', () => {
    const small = points('s', [0, 0, 1, 0]);
    const big = points('b', [0, 0, 10, 0]);
    const r = new RawFeatures({ bins: 2, upperQuantile: 1 }).fit([small, big], [0]);
    expect(r.state!.upper).toBe(1);
    expect([...r.transform([small, big], [1]).data.subarray(0, 2)]).toEqual([0, 1]);
  });

  it('covariance eigenvalues of a stretched cloud, largest first, agree with the closed form', () => {
    // Points (±3, 0), (0, ±1): covariance diag(6, 2) with divisor n − 1 = 3; rotating by 30° keeps the spectrum.
    const c = Math.cos(Math.PI / 6);
    const s = Math.sin(Math.PI / 6);
    const raw = [3, 0, -3, 0, 0, 1, 0, -1];
    const rot: number[] = [];
    for (let i = 0; i < 4; i++)
      rot.push(c * raw[2 * i] - s * raw[2 * i + 1], s * raw[2 * i] + c * raw[2 * i + 1]);
    const out = new Float64Array(2);
    covarianceEigenvalues(Float64Array.from(rot), 4, 2, out);
    expect(out[0]).toBeCloseTo(6, 10);
    expect(out[1]).toBeCloseTo(2 / 3, 10);
  });

  it('distances: histogram of the entries above the diagonal', () => {
    const d: DistanceSample = {
      kind: 'distances',
      id: 'd',
      label: 'a',
      size: 3,
      matrix: Float64Array.from([0, 1, 2, 1, 0, 3, 2, 3, 0]),
    };
    const r = new RawFeatures({ bins: 3, upperQuantile: 1 }).fit([d]);
    expect([...r.transform([d]).data]).toEqual([0, 1 / 3, 2 / 3]);
  });

  it('signals resample linearly and images average boxes', () => {
    const out = new Float64Array(5);
    resample(Float64Array.from([0, 10, 20]), out);
    expect([...out]).toEqual([0, 5, 10, 15, 20]);
    const img = new Float64Array(16).map((_, i) => i);
    const small = new Float64Array(4);
    downsample(img, [4, 4], [2, 2], small);
    expect([...small]).toEqual([2.5, 4.5, 10.5, 12.5]);
    const s: SignalSample = { kind: 'signal', id: 'x', label: 'a', values: Float64Array.from([1, 2, 3, 4]) };
    const r = new RawFeatures({ signalLength: 4 }).fit([s]);
    expect([...r.transform([s]).data]).toEqual([1, 2, 3, 4]);
    const im: ImageSample = { kind: 'image', id: 'i', label: 'a', shape: [4, 4], values: img };
    const ri = new RawFeatures({ imageSize: 2 }).fit([im]);
    expect(ri.featureNames()).toEqual(['pixel/y=0,x=0', 'pixel/y=0,x=1', 'pixel/y=1,x=0', 'pixel/y=1,x=1']);
    expect(RawFeatures.fromJSON(JSON.parse(JSON.stringify(ri.toJSON()))).transform([im]).data).toEqual(
      ri.transform([im]).data,
    );
  });
});
