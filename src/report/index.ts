/** Readable features: class means with bands, permutation tests, discriminative maps, the HTML report, the demo study. */
export {
  type BandOptions,
  bandCovers,
  DEFAULT_BAND_OPTIONS,
  multiplierBand,
  type SampledBand,
} from './bands.js';
export { renderSvg, type WeightCurve } from './charts.js';
export {
  type ContrastOptions,
  type ContrastResult,
  contrastDiagrams,
  contrastJson,
  contrastText,
} from './contrast.js';
export { holmAdjust, holmRejects } from './holm.js';
export { CAUTION_TEXT, type DatasetReport, escapeHtml, type ReportInput, renderReport } from './html.js';
export {
  combinePairWeights,
  type FeatureGroup,
  type GroupImportance,
  groupsByDegreeLayer,
  permutationImportance,
  weightCurves,
} from './importance.js';
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
  type ContrastTest,
  contrastAll,
  DEFAULT_PERMUTATION_OPTIONS,
  type PermutationOptions,
  type PermutationResult,
  permutationTest,
} from './permutation.js';
export {
  type GridSpec,
  type LandscapeStack,
  sampledDistance,
  sampledNorm,
  stackLandscapes,
  stackMean,
} from './stack.js';
export {
  buildDatasetReport,
  DEMO_DATASETS,
  type DemoDataset,
  type DemoOptions,
  type DemoResult,
  findingsOf,
  type ReportOptions,
  runDemo,
} from './study.js';
export { findActiveContent } from './svg-check.js';
