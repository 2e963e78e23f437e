export * from './matrix.js';
export * from './classifier.js';
