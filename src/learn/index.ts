export * from './classifier.js';
export { DenseClassifier, DenseNetwork, type DenseOptions, type DenseState } from './dense.js';
export {
  applyFixed,
  checkStudy,
  type EvaluationOptions,
  type EvaluationResult,
  type FoldOutcome,
  foldScore,
  formatMetricsJson,
  type LinearWeights,
  PAIRED_BASELINE,
  pairedComparisons,
  runEvaluation,
  type StudyPhase,
  type StudyResult,
  serialUnitRunner,
  type UnitRunner,
  withFixed,
} from './evaluate.js';
export { bestResult, type DiscriminativeMaps, discriminativeMaps } from './explain.js';
export {
  checkFoldable,
  classCounts,
  encodeLabels,
  type Fold,
  type FoldOptions,
  stratifiedFolds,
} from './folds.js';
export {
  FOREST_HYPERPARAMETERS,
  ForestClassifier,
  type ForestJSON,
  type ForestTrees,
  featuresPerSplit,
} from './forest.js';
export {
  combinePairWeights,
  type FeatureGroup,
  type GroupImportance,
  groupsByDegreeLayer,
  permutationImportance,
  type WeightCurve,
  weightCurves,
} from './importance.js';
export {
  accuracy,
  argmaxRows,
  balancedAccuracy,
  type Confusion,
  confusionMatrix,
  formatConfusionText,
  type LabelledScores,
  macroF1,
  type Summary,
  scoreLabels,
  summarize,
  type UnknownLabel,
} from './metrics.js';
export {
  loadClassifierFolder,
  loadModelFolder,
  MODEL_FOLDER_FORMAT,
  type ModelFolderManifest,
  saveClassifierFolder,
  saveModelFolder,
} from './model-folder.js';
export { candidateHyperparameters, classifierFromJSON, createClassifier } from './models.js';
export {
  type CorrectedInterval,
  correctedResampledInterval,
  incompleteBeta,
  logGamma,
  PAIRED_LEVEL,
  PAIRED_METHOD,
  type PairedComparison,
  studentTCdf,
  studentTQuantile,
} from './paired.js';
export { learningWorkers } from './parallel.js';
export { Pca, type PcaOptions, type PcaState } from './pca.js';
export { PcaSvmClassifier } from './pca-svm.js';
export { ProjectionCache } from './projection-cache.js';
export { StandardScaler, type StandardScalerOptions, type StandardScalerState } from './scaler.js';
export {
  DEFAULT_LANDSCAPE_CANDIDATES,
  type LandscapeCandidate,
  type ModelFactory,
  type Selection,
  type SelectionOptions,
  selectHyperparameters,
} from './select.js';
export {
  FOLDS_FILE,
  formatFoldsCsv,
  formatStudyPredictionsCsv,
  PREDICTIONS_FILE,
} from './study-files.js';
export { type SvmKernel, SvmModel, type SvmOptions, type SvmState } from './svm.js';
