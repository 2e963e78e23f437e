import { describe, expect, it } from 'vitest';
import { formatDuration, parseProgressMode, phaseLines } from '../../src/cli/progress.js';
import { isUserError } from '../../src/core/errors.js';

describe('progress lines', () => {
  it('prints a line at each phase start and end, at most one per interval between, with the time left', () => {
    let t = 0;
    const out: string[] = [];
    const p = phaseLines({ every: 10, now: () => t, write: (s) => out.push(s) });
    p.update('inner CV', 0, 4);
    t = 5_000;
    p.update('inner CV', 1, 4); // 5 s after the last line: quiet
    t = 12_000;
    p.update('inner CV', 2, 4); // 12 s: a line; 6 s per unit so far, 2 units left → 12 s
    t = 15_000;
    p.update('inner CV', 3, 4);
    t = 16_000;
    p.update('inner CV', 4, 4);
    p.update('inner CV', 4, 4); // the end is printed once
    t = 17_000;
    p.update('outer folds', 0, 4);
    expect(out).toEqual([
      'landform: inner CV 0/4 (0%), 0s elapsed\n',
      'landform: inner CV 2/4 (50%), 12s elapsed, about 12s left\n',
      'landform: inner CV 4/4 (100%), done in 16s\n',
      'landform: outer folds 0/4 (0%), 0s elapsed\n',
    ]);
  });

  it('formats durations and reads the mode from the option, then the environment', () => {
    expect(formatDuration(42.4)).toBe('42s');
    expect(formatDuration(185)).toBe('3m05s');
    expect(formatDuration(3720)).toBe('1h02m');
    expect(parseProgressMode(undefined, {})).toBe('auto');
    expect(parseProgressMode(undefined, { LANDFORM_PROGRESS: 'lines' })).toBe('lines');
    expect(parseProgressMode('none', { LANDFORM_PROGRESS: 'lines' })).toBe('none');
    let caught: unknown;
    try {
      parseProgressMode(undefined, { LANDFORM_PROGRESS: 'bar' });
    } catch (e) {
      caught = e;
    }
    expect(isUserError(caught)).toBe(true);
    expect((caught as Error).message).toBe("LANDFORM_PROGRESS must be one of auto, lines, none, got 'bar'");
  });
});
