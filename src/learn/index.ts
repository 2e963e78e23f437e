export * from './classifier.js';
export { DenseClassifier, DenseNetwork, type DenseOptions, type DenseState } from './dense.js';
export * from './matrix.js';
export { candidateHyperparameters, classifierFromJSON, createClassifier } from './models.js';
export { Pca, type PcaOptions, type PcaState } from './pca.js';
export { PcaSvmClassifier } from './pca-svm.js';
export { StandardScaler, type StandardScalerOptions, type StandardScalerState } from './scaler.js';
export { type SvmKernel, SvmModel, type SvmOptions, type SvmState } from './svm.js';
