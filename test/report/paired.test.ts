import { describe, expect, it } from 'vitest';
import { pairedTableHtml, signedDifference } from '../../src/report/paired.js';

describe('the paired-difference table of the report', () => {
  it('writes signed differences with a typographic minus', () => {
    expect(signedDifference(0.03)).toBe('+0.030');
    expect(signedDifference(-0.0204)).toBe('−0.020');
    expect(signedDifference(-0.0001)).toBe('0.000');
    expect(signedDifference(Number.NaN)).toBe('—');
  });

  it('shows one row per comparison, reads the interval against 0, escapes names, and is empty without rows', () => {
    expect(pairedTableHtml([])).toBe('');
    const html = pairedTableHtml([
      {
        features: 'landscape',
        baseline: 'raw',
        model: 'pca-svm',
        pairs: 5,
        mean: 0.03,
        lower: -0.02,
        upper: 0.08,
        level: 0.95,
      },
      {
        features: 'combined',
        baseline: 'raw',
        model: '<m>',
        pairs: 5,
        mean: 0.2,
        lower: 0.1,
        upper: 0.3,
        level: 0.95,
      },
      {
        features: 'betti',
        baseline: 'raw',
        model: 'forest',
        pairs: 5,
        mean: -0.2,
        lower: -0.3,
        upper: -0.1,
        level: 0.95,
      },
    ]);
    expect(html).toContain(
      '<td>landscape − raw</td><td>pca-svm</td><td class="num">+0.030 [−0.020, +0.080]</td>',
    );
    expect(html).toContain('mean difference [95% interval]');
    expect(html).toContain('<td>&lt;m&gt;</td>');
    expect(html).not.toContain('<m>');
    const readings = [...html.matchAll(/<td>(no clear difference|[a-z]+ higher)<\/td><\/tr>/g)].map(
      (m) => m[1],
    );
    expect(readings).toEqual(['no clear difference', 'combined higher', 'raw higher']);
  });
});
