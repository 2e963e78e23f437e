import type { SampledBand } from './bands.js';
import { type AccuracyRow, clippedAccuracyBars, meanLayers } from './charts.js';
import { escapeHtml } from './escape.js';

/**
 * Caption text the report computes from the data a chart shows: every count, layer and clipped bar named
 * here comes from that data, never from a constant. Returned strings are HTML (user text escaped here).
 */

/** Layers as text: [2] → 'λ2', [3, 4] → 'λ3 and λ4', [2, 3, 4] → 'λ2–λ4' (contiguous), else a list. */
export function layerList(layers: readonly number[]): string {
  const names = layers.map((k) => `λ${k}`);
  if (names.length <= 1) return names.join('');
  const contiguous = layers.every((k, i) => i === 0 || k === layers[i - 1] + 1);
  if (contiguous && names.length > 2) return `${names[0]}–${names[names.length - 1]}`;
  return `${names.slice(0, -1).join(', ')} and ${names[names.length - 1]}`;
}

/** 'a', 'a and b', 'a, b and c'. */
export function wordList(items: readonly string[]): string {
  return items.length <= 1
    ? items.join('')
    : `${items.slice(0, -1).join(', ')} and ${items[items.length - 1]}`;
}

/**
 * The quantity a channel's scale is the negative of, when its diagrams come from superlevel sets, from the
 * sample kind and the diagram options as `landform evaluate` and the demo record them (`DatasetReport`'s
 * `summary.kind` and `options.diagrams`, whose `superlevel` is true): the grey levels of images under the
 * grey filtration (the binarised image filtrations ignore superlevel), the values of signals filtered on
 * their own (a delay-embedded signal is a point cloud). Undefined otherwise.
 */
export function superlevelOf(kind: string, diagrams: unknown, filtration?: string): string | undefined {
  if (diagrams === null || typeof diagrams !== 'object') return undefined;
  const record = diagrams as { superlevel?: unknown; embed?: unknown; filtration?: unknown };
  if (record.superlevel !== true) return undefined;
  if (kind === 'signal') return record.embed == null ? 'signal value' : undefined;
  if (kind !== 'image') return undefined;
  // An untagged channel is the only filtration: the recorded one (an image's default, recorded as rips, is grey).
  const chosen = filtration ?? (typeof record.filtration === 'string' ? record.filtration : 'grey');
  return chosen === 'grey' || chosen === 'rips' ? 'grey level' : undefined;
}

/**
 * What a class-means caption says about its layers: the panels drawn of the layers computed, the layers
 * zero for every class (no panel) and the classes zero in a drawn layer (no band or line). `channel` is
 * the channel's name as HTML.
 */
export function meanLayersNote(
  channel: string,
  classes: ReadonlyArray<{ label: string; band: SampledBand }>,
  layers: number,
): string {
  const content = meanLayers(classes, layers);
  const notes: string[] = [];
  if (content.shown.length > 0)
    notes.push(
      `Panels: ${layerList(content.shown)} of the ${content.depth} layer${content.depth === 1 ? '' : 's'} computed, on one shared y axis.`,
    );
  if (content.zeroForAll.length > 0) {
    // λk ≥ λk+1, so the first zero layer says it all: fewer than k pairs are ever alive at once.
    const k = content.zeroForAll[0];
    const many = content.zeroForAll.length > 1;
    notes.push(
      `${layerList(content.zeroForAll)} ${many ? 'are' : 'is'} zero for every class (no sample has ${k} ${channel} pairs alive at the same scale), so ${many ? 'they have' : 'it has'} no panel.`,
    );
  }
  for (const z of content.zeroFor) {
    const many = z.classes.length > 1;
    notes.push(
      `In λ${z.layer} the mean of ${wordList(z.classes.map(escapeHtml))} ${many ? 'are' : 'is'} zero (no sample of ${many ? 'those classes' : 'that class'} has ${z.layer} ${channel} pairs alive at the same scale): no band or line drawn.`,
    );
  }
  return notes.join(' ');
}

/** The accuracy chart's caption: what the bars are, and which of them were cut at 0 or 1. */
export function accuracyCaption(rows: readonly AccuracyRow[]): string {
  const clipped = clippedAccuracyBars(rows).map(
    (c) =>
      `${escapeHtml(c.features)} · ${escapeHtml(c.model)} (${c.at === 'both' ? 'both ends' : `at ${c.at}`})`,
  );
  return (
    'Cross-validated accuracy by feature set and model; bars are mean ± 1 sd, clipped to [0, 1].' +
    (clipped.length > 0 ? ` Clipped here: ${wordList(clipped)}.` : '')
  );
}
