export {
  LandscapeVectorizer,
  DEFAULT_LANDSCAPE_VECTORIZER_OPTIONS,
  parseLandscapeFeatureName,
  learnGrid,
  type FeatureLocation,
  type LandscapeVectorizerOptions,
  type LandscapeVectorizerState,
  type LandscapeVectorizerJSON,
} from './landscape-vectorizer.js';
export {
  RawFeatures,
  DEFAULT_RAW_FEATURES_OPTIONS,
  hasRawFeatures,
  type RawFeaturesOptions,
  type RawFeaturesState,
  type RawFeaturesJSON,
} from './raw-features.js';
export {
  FeatureExtractor,
  FEATURE_SET_NAMES,
  featureSetsFor,
  checkFeatureSet,
  usesLandscape,
  type FeatureSetName,
  type FeatureData,
  type FeatureExtractorOptions,
  type FeatureExtractorJSON,
} from './combined.js';
