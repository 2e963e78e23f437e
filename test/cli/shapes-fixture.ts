import { writeFileSync } from 'node:fs';
import { Random } from '../../src/core/random.js';

/**
 * A small seeded points CSV for the command tests: filled discs against noisy circles (invented demo-style
 * data that exercises the commands' plumbing; the accuracy checks against outside sources live in test/learn).
 */
export function writeShapes(
  file: string,
  perClass: number,
  points: number,
  seed = 4,
  labels = ['disc', 'loop'],
): void {
  const r = new Random(seed);
  const lines = ['sample,label,x,y'];
  for (const label of labels) {
    for (let s = 0; s < perClass; s++) {
      for (let i = 0; i < points; i++) {
        const a = r.uniform(0, 2 * Math.PI);
        const rad = label === 'disc' ? Math.sqrt(r.next()) : 1;
        lines.push(
          `${label}-${s},${label},${(rad * Math.cos(a) + r.normal(0, 0.03)).toFixed(5)},${(rad * Math.sin(a) + r.normal(0, 0.03)).toFixed(5)}`,
        );
      }
    }
  }
  writeFileSync(file, lines.join('\n') + '\n');
}
