export * from './matrix.js';
