/** Readable features: class means with bands, permutation tests, discriminative maps, the HTML report, the demo study. */
export { bandCovers, type BandOptions, DEFAULT_BAND_OPTIONS, multiplierBand, type SampledBand } from './bands.js';
export { holmAdjust, holmRejects } from './holm.js';
export {
  type ContrastTest,
  contrastAll,
  DEFAULT_PERMUTATION_OPTIONS,
  type PermutationOptions,
  type PermutationResult,
  permutationTest,
} from './permutation.js';
export { type GridSpec, type LandscapeStack, sampledDistance, sampledNorm, stackLandscapes, stackMean } from './stack.js';
export { type ClassMean, classMeans, type ClassMeansOptions, classStacks, type DegreeMeans, sharedGrid } from './means.js';
export { type ContrastOptions, type ContrastResult, contrastDiagrams, contrastJson, contrastText } from './contrast.js';
export {
  combinePairWeights,
  type FeatureGroup,
  type GroupImportance,
  groupsByDegreeLayer,
  permutationImportance,
  weightCurves,
} from './importance.js';
export { CAUTION_TEXT, type DatasetReport, escapeHtml, renderReport, type ReportInput } from './html.js';
export { renderSvg, type WeightCurve } from './charts.js';
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
