/**
 * The report's look: a palette of our own, chosen so that neighbouring hues stay apart under the common
 * forms of colour-vision deficiency (blue / orange / teal / magenta / violet differ in lightness as well as
 * hue), plus the sequential ramp of the confusion matrices and the font stack (system fonts only, so the
 * page fetches nothing).
 */
export const CATEGORY_COLOURS: readonly string[] = [
  '#1f5fa8',
  '#e08a1b',
  '#23907f',
  '#b8437a',
  '#7463bf',
  '#8a6a2c',
  '#4d4d4d',
  '#5fb0d6',
];

/** Light to dark, one hue: low counts nearly white, high counts deep blue. */
export const SEQUENTIAL_RAMP: readonly string[] = ['#f5f7fa', '#c9d9ec', '#7fa6d3', '#2f68ab', '#163c6e'];

/** Signed quantities (weights): orange for negative, blue for positive, grey at zero. */
export const DIVERGING_COLOURS = { negative: '#c56a12', zero: '#9aa0a6', positive: '#1f5fa8' } as const;

export const INK = '#1d2330';
export const MUTED_INK = '#5b6372';
export const RULE = '#d8dce3';
export const FONT_STACK = "system-ui, -apple-system, 'Segoe UI', Roboto, 'Helvetica Neue', Arial, sans-serif";
export const MONO_STACK = "ui-monospace, 'SFMono-Regular', Menlo, Consolas, 'Liberation Mono', monospace";
