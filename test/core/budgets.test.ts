import { afterEach, describe, expect, it } from 'vitest';
import {
  checkFeatureColumns,
  checkLandscapeValues,
  FEATURE_COLUMN_BUDGET,
  formatBytes,
  MEMORY_LIMIT_VARIABLE,
  MIN_MEMORY_BUDGET,
  memoryBudget,
  memoryLimitFromEnvironment,
} from '../../src/core/budgets.js';
import { UserError } from '../../src/core/errors.js';

describe('resource budgets', () => {
  const saved = process.env[MEMORY_LIMIT_VARIABLE];
  afterEach(() => {
    if (saved === undefined) delete process.env[MEMORY_LIMIT_VARIABLE];
    else process.env[MEMORY_LIMIT_VARIABLE] = saved;
  });

  it('reads the memory limit from the environment in bytes or binary units, and refuses other text', () => {
    expect(memoryLimitFromEnvironment({})).toBeUndefined();
    expect(memoryLimitFromEnvironment({ [MEMORY_LIMIT_VARIABLE]: '4294967296' })).toBe(2 ** 32);
    expect(memoryLimitFromEnvironment({ [MEMORY_LIMIT_VARIABLE]: '512M' })).toBe(2 ** 29);
    expect(memoryLimitFromEnvironment({ [MEMORY_LIMIT_VARIABLE]: '1.5GiB' })).toBe(1.5 * 2 ** 30);
    expect(() => memoryLimitFromEnvironment({ [MEMORY_LIMIT_VARIABLE]: '0x10' })).toThrow(UserError);
    expect(() => memoryLimitFromEnvironment({ [MEMORY_LIMIT_VARIABLE]: 'lots' })).toThrow(
      /LANDFORM_MEMORY_LIMIT='lots' is not a number of bytes/,
    );
  });

  it('takes the limit given, then the environment, then a share of free memory of at least 1 GiB', () => {
    process.env[MEMORY_LIMIT_VARIABLE] = '3G';
    expect(memoryBudget(1000)).toBe(1000);
    expect(memoryBudget()).toBe(3 * 2 ** 30);
    delete process.env[MEMORY_LIMIT_VARIABLE];
    expect(memoryBudget()).toBeGreaterThanOrEqual(MIN_MEMORY_BUDGET);
  });

  it('words sizes in MB below 10 GB and in GB above', () => {
    expect(formatBytes(2 ** 20)).toBe('1 MB');
    expect(formatBytes(8 * 2 ** 30)).toBe('8192 MB');
    expect(formatBytes(35_999_640_000)).toBe('33.5 GB');
  });

  it('refuses --depths 10000 --grid-sizes 10000 by columns, and a matrix too large for memory by bytes', () => {
    // Two degrees × 10,000 layers × 10,000 points = 200,000,000 columns.
    expect(() => checkFeatureColumns(2 * 10_000 * 10_000, '--degrees × --depths × --grid-sizes')).toThrow(
      `--degrees × --depths × --grid-sizes make 200000000 feature columns a sample, above the limit of ${FEATURE_COLUMN_BUDGET}; use fewer layers or grid points`,
    );
    expect(() => checkFeatureColumns(FEATURE_COLUMN_BUDGET, 'x')).not.toThrow();
    // 1,000 samples × 100,000 columns × 8 bytes × 4 copies = 3.2e9 bytes, above a 1 GiB limit.
    expect(() => checkFeatureColumns(100_000, 'x', 1000, 2 ** 30)).toThrow(
      /a feature matrix of 1000 samples × 100000 columns \(4 copies of float64\) needs about 3052 MB of memory \(limit 1024 MB/,
    );
    expect(() => checkFeatureColumns(100_000, 'x', 100, 2 ** 30)).not.toThrow();
  });

  it('refuses landscape output above the value budget', () => {
    expect(() => checkLandscapeValues(3, 5, 1_000_000)).toThrow(
      /3 samples × 5 layers × 1000000 grid points make 15000000 values/,
    );
    expect(() => checkLandscapeValues(1, 5, 1_000_000)).not.toThrow();
  });
});
