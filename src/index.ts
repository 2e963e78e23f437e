/**
 * landform's library: one module per stage, each with a small public surface.
 * samples (io) → diagrams (homology) → landscapes (landscape) → vectors (features) → models (learn) → report;
 * the demo (scenarios and their study) on top.
 */
export * from './core/index.js';
export * from './demo/index.js';
export * from './features/index.js';
export * from './homology/index.js';
export * from './io/index.js';
export * from './landscape/index.js';
export * from './learn/index.js';
export * from './report/index.js';
