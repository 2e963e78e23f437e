export {
  checkFeatureSet,
  FEATURE_SET_NAMES,
  type FeatureData,
  FeatureExtractor,
  type FeatureExtractorJSON,
  type FeatureExtractorOptions,
  type FeatureSetName,
  featureSetsFor,
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
  DEFAULT_RAW_FEATURES_OPTIONS,
  hasRawFeatures,
  RawFeatures,
  type RawFeaturesJSON,
  type RawFeaturesOptions,
  type RawFeaturesState,
} from './raw-features.js';
