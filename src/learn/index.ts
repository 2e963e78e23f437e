export * from './matrix.js';
export * from './classifier.js';
export { StandardScaler, type StandardScalerOptions, type StandardScalerState } from './scaler.js';
export { Pca, type PcaOptions, type PcaState } from './pca.js';
export { SvmModel, type SvmKernel, type SvmOptions, type SvmState } from './svm.js';
export { PcaSvmClassifier } from './pca-svm.js';
export { candidateHyperparameters, classifierFromJSON, createClassifier } from './models.js';
