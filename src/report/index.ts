/** Readable features: class means with bands, permutation tests, findings, the layout of a dataset's part and the HTML report. */

export {
  type BandOptions,
  bandCovers,
  DEFAULT_BAND_OPTIONS,
  multiplierBand,
  type SampledBand,
} from './bands.js';
export { renderSvg, type WeightCurve } from './charts.js';
export { type ChosenRow, chosenRows } from './chosen.js';
export {
  type ContrastOptions,
  type ContrastResult,
  contrastDiagrams,
  contrastJson,
  contrastText,
} from './contrast.js';
export {
  chooseMapChannel,
  type DistanceMap,
  diagramDistanceMap,
  distanceMapChart,
  evenSubsample,
} from './distance-map.js';
export { findingsOf } from './findings.js';
export { holmAdjust, holmRejects } from './holm.js';
export { CAUTION_TEXT, type DatasetReport, escapeHtml, type ReportInput, renderReport } from './html.js';
export {
  buildDatasetReport,
  DEFAULT_REPORT_OPTIONS,
  evaluationReportHtml,
  type ReportOptions,
  type ReportPieces,
} from './layout.js';
export {
  type ClassMean,
  type ClassMeansOptions,
  classMeans,
  classStacks,
  type DegreeMeans,
  sharedGrid,
} from './means.js';
export { type PairedRow, pairedTableHtml, signedDifference } from './paired.js';
export {
  BASE_PERMUTATIONS,
  type ContrastTest,
  contrastAll,
  DEFAULT_PERMUTATION_OPTIONS,
  PERMUTATION_BUDGET,
  type PermutationOptions,
  type PermutationReach,
  type PermutationResult,
  permutationReach,
  permutationsForFamily,
  permutationTest,
} from './permutation.js';
export { principalPlane, type SampleMap, sampleMap, sampleMapChart } from './scatter.js';
export {
  type GridSpec,
  type LandscapeStack,
  sampledDistance,
  sampledNorm,
  stackLandscapes,
  stackMean,
} from './stack.js';
export { findActiveContent } from './svg-check.js';
