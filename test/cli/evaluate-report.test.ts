import { readdirSync, readFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it, vi } from 'vitest';
import { STUDY_FOLDER, tempDir } from '../helpers/cli.js';
import { writeShapes } from './shapes-fixture.js';

// The report renderer, broken on purpose: whatever fails while the report is made must not cost the
// cross-validation already done.
vi.mock('../../src/report/layout.js', () => ({
  evaluationReportHtml: async () => {
    throw new Error('renderer broke');
  },
}));

const { main } = await import('../../src/cli/main.js');

describe('landform evaluate when the report fails', () => {
  it('has written metrics.json first, and says so in its one error line', async () => {
    const dir = tempDir();
    const input = join(dir, 'shapes.csv');
    writeShapes(input, 5, 16);
    const out = join(dir, 'study');
    let stderr = '';
    const err = vi.spyOn(process.stderr, 'write').mockImplementation((chunk) => {
      stderr += String(chunk);
      return true;
    });
    const log = vi.spyOn(process.stdout, 'write').mockImplementation(() => true);
    let code: number;
    try {
      code = await main([
        'evaluate',
        input,
        '--models',
        'pca-svm',
        '--feature-sets',
        'landscape',
        '--folds',
        '3',
        '--depths',
        '2',
        '--grid-sizes',
        '8',
        '--workers',
        '1',
        '--quiet',
        '--out',
        out,
      ]);
    } finally {
      err.mockRestore();
      log.mockRestore();
    }
    expect(code).toBe(1);
    expect(stderr.split('\n')).toHaveLength(2);
    expect(stderr).toContain(
      `the report failed after ${join(out, 'metrics.json')} was written (rerun with --no-report to skip it): renderer broke`,
    );
    expect(readdirSync(out).sort()).toEqual(STUDY_FOLDER);
    expect(JSON.parse(readFileSync(join(out, 'metrics.json'), 'utf8')).classes).toEqual(['disc', 'loop']);
    expect(readdirSync(dir).filter((n) => n.startsWith('.landform'))).toEqual([]);
  }, 120_000);
});
