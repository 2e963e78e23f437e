import { UserError } from '../core/errors.js';
import type { Diagram, DiagramSet } from '../homology/diagram.js';
import { writeFileAtomic } from './atomic.js';
import { csvField, csvNumber, parseCsv, parseNumberField, readTextFile, shown } from './csv.js';

/** The diagram CSV layout, a contract other tools read: one persistence pair per row. */
export const DIAGRAM_CSV_HEADER = ['sample', 'label', 'degree', 'birth', 'death'] as const;

/** Highest homology degree a diagram file may hold. */
export const MAX_DIAGRAM_DEGREE = 8;

/** Turns diagram sets into diagram CSV text (samples in order, degrees ascending, pairs in stored order). */
export function formatDiagramCsv(sets: readonly DiagramSet[]): string {
  const lines: string[] = [DIAGRAM_CSV_HEADER.join(',')];
  for (const set of sets) {
    const sample = csvField(set.sample);
    const label = csvField(set.label);
    const diagrams = [...set.diagrams].sort((a, b) => a.degree - b.degree);
    for (const d of diagrams) {
      for (let i = 0; i < d.births.length; i++) {
        lines.push(`${sample},${label},${d.degree},${csvNumber(d.births[i])},${csvNumber(d.deaths[i])}`);
      }
    }
  }
  return lines.join('\n') + '\n';
}

export function writeDiagramCsv(file: string, sets: readonly DiagramSet[]): void {
  writeFileAtomic(file, formatDiagramCsv(sets));
}

/**
 * Parses diagram CSV text. Samples keep the order of their first row; each sample gets one diagram per degree
 * that appears anywhere in the file (empty where it has no pairs), so all samples share the same degrees.
 */
export function parseDiagramCsv(text: string, file: string): DiagramSet[] {
  const rows = parseCsv(text, file);
  if (rows.length === 0)
    throw new UserError('empty file; expected the header sample,label,degree,birth,death', { file });
  const header = rows[0].fields.map((f) => f.trim().toLowerCase());
  const index = new Map<string, number>();
  header.forEach((name, i) => {
    index.set(name, i);
  });
  for (const name of DIAGRAM_CSV_HEADER) {
    if (!index.has(name)) {
      throw new UserError(
        `missing column '${shown(name)}'; the header must be sample,label,degree,birth,death`,
        {
          file,
          line: rows[0].line,
        },
      );
    }
  }
  if (rows.length === 1)
    throw new UserError('header only, no pairs; a diagram file needs at least one row', { file });
  const iSample = index.get('sample')!;
  const iLabel = index.get('label')!;
  const iDegree = index.get('degree')!;
  const iBirth = index.get('birth')!;
  const iDeath = index.get('death')!;

  interface Builder {
    sample: string;
    label: string;
    byDegree: Map<number, { births: number[]; deaths: number[] }>;
  }
  const builders = new Map<string, Builder>();
  const degrees = new Set<number>();
  for (let r = 1; r < rows.length; r++) {
    const { line, fields } = rows[r];
    if (fields.length !== header.length) {
      throw new UserError(`has ${fields.length} fields, the header has ${header.length}; fix the row`, {
        file,
        line,
      });
    }
    const sample = fields[iSample];
    if (sample === '') throw new UserError('empty sample id; every row needs one', { file, line });
    const label = fields[iLabel];
    const degreeText = fields[iDegree];
    const degree = Number(degreeText);
    if (!/^\d+$/.test(degreeText) || degree > MAX_DIAGRAM_DEGREE) {
      throw new UserError(
        `unknown degree '${shown(degreeText)}'; degrees are whole numbers 0 to ${MAX_DIAGRAM_DEGREE}`,
        {
          file,
          line,
        },
      );
    }
    const birth = parseNumberField(fields[iBirth], { file, line, column: 'birth' });
    const death = parseNumberField(fields[iDeath], { file, line, column: 'death' }, { infinite: true });
    if (death < birth)
      throw new UserError(`death ${fields[iDeath]} is before birth ${fields[iBirth]}`, { file, line });
    let b = builders.get(sample);
    if (b === undefined) {
      b = { sample, label, byDegree: new Map() };
      builders.set(sample, b);
    } else if (b.label !== label) {
      throw new UserError(
        `sample '${shown(sample)}' has label '${shown(label)}' here but '${shown(b.label)}' earlier`,
        { file, line },
      );
    }
    let d = b.byDegree.get(degree);
    if (d === undefined) {
      d = { births: [], deaths: [] };
      b.byDegree.set(degree, d);
    }
    d.births.push(birth);
    d.deaths.push(death);
    degrees.add(degree);
  }
  const sortedDegrees = [...degrees].sort((a, b) => a - b);
  return [...builders.values()].map((b) => ({
    sample: b.sample,
    label: b.label,
    diagrams: sortedDegrees.map((degree): Diagram => {
      const d = b.byDegree.get(degree);
      return {
        degree,
        births: Float64Array.from(d?.births ?? []),
        deaths: Float64Array.from(d?.deaths ?? []),
      };
    }),
  }));
}

export function readDiagramCsv(file: string): DiagramSet[] {
  return parseDiagramCsv(readTextFile(file), file);
}
