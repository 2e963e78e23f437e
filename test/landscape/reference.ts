import fc from 'fast-check';
import { type Diagram, makeDiagram } from '../../src/core/diagram.js';

/**
 * Test helpers: the definition of a landscape layer, evaluated directly, and random diagrams. The
 * definition is λ_k(t) = k-th largest of max(0, min(t − b, d − t)) over the pairs (Chazal, Fasy,
 * Lecci, Rinaldo, Wasserman, "Stochastic convergence of persistence landscapes and silhouettes", 2014, section 2).
 */
export function definitionValue(diagram: Diagram, k: number, t: number): number {
  const values: number[] = [];
  for (let i = 0; i < diagram.births.length; i++) {
    values.push(Math.max(0, Math.min(t - diagram.births[i], diagram.deaths[i] - t)));
  }
  values.sort((a, b) => b - a);
  return values[k - 1] ?? 0;
}

/** Diagrams on a coarse lattice (many ties, duplicates and zero-length pairs) or with general floats. */
export const latticeDiagram = fc
  .array(fc.tuple(fc.integer({ min: 0, max: 12 }), fc.integer({ min: 0, max: 8 })), { maxLength: 14 })
  .map((pairs) =>
    makeDiagram(
      1,
      pairs.map(([b, len]) => [b / 2, (b + len) / 2] as [number, number]),
    ),
  );

export const floatDiagram = fc
  .array(fc.tuple(fc.double({ min: -3, max: 3, noNaN: true }), fc.double({ min: 0, max: 4, noNaN: true })), {
    maxLength: 14,
  })
  .map((pairs) =>
    makeDiagram(
      1,
      pairs.map(([b, len]) => [b, b + len] as [number, number]),
    ),
  );

export const anyDiagram = fc.oneof(latticeDiagram, floatDiagram);
