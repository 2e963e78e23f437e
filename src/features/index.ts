export {
  type BettiCurveJSON,
  type BettiCurveOptions,
  BettiCurveVectorizer,
  DEFAULT_BETTI_CURVE_OPTIONS,
} from './betti-curve.js';
export {
  checkFeatureSet,
  DIAGRAM_FEATURE_SETS,
  type DiagramVectorizer,
  FEATURE_SET_NAMES,
  type FeatureData,
  FeatureExtractor,
  type FeatureExtractorJSON,
  type FeatureExtractorOptions,
  type FeatureSetName,
  featureSetsFor,
  needsDiagrams,
  usesLandscape,
} from './combined.js';
export {
  DEFAULT_LANDSCAPE_VECTORIZER_OPTIONS,
  type FeatureLocation,
  LandscapeVectorizer,
  type LandscapeVectorizerJSON,
  type LandscapeVectorizerOptions,
  type LandscapeVectorizerState,
  learnGrid,
  parseLandscapeFeatureName,
} from './landscape-vectorizer.js';
export {
  DEFAULT_PERSISTENCE_IMAGE_OPTIONS,
  type ImageFrame,
  type PersistenceImageJSON,
  type PersistenceImageOptions,
  PersistenceImageVectorizer,
} from './persistence-image.js';
export {
  DEFAULT_PERSISTENCE_STATISTICS_OPTIONS,
  PersistenceStatistics,
  type PersistenceStatisticsJSON,
  type PersistenceStatisticsOptions,
  persistentEntropy,
  STATISTIC_NAMES,
} from './persistence-statistics.js';
export {
  DEFAULT_RAW_FEATURES_OPTIONS,
  hasRawFeatures,
  RawFeatures,
  type RawFeaturesJSON,
  type RawFeaturesOptions,
  type RawFeaturesState,
} from './raw-features.js';
