export * from './diagram.js';
