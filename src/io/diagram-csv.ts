import type { Diagram, DiagramSet } from '../core/diagram.js';
import { UserError } from '../core/errors.js';
import { writeFileAtomic } from './atomic.js';
import { csvField, csvNumber, parseCsv, parseNumberField, readTextFile, shown } from './csv.js';

/**
 * The diagram CSV layout, a contract other tools read: one persistence pair per row. When a sample was
 * filtered several ways (its diagrams carry a `filtration` tag), a `filtration` column follows `label`
 * (`sample,label,filtration,degree,birth,death`); files of untagged diagrams keep the five columns.
 */
export const DIAGRAM_CSV_HEADER = ['sample', 'label', 'degree', 'birth', 'death'] as const;

/** The column that holds a diagram's filtration tag (present only when diagrams are tagged). */
export const FILTRATION_COLUMN = 'filtration';

/** Highest homology degree a diagram file may hold. */
export const MAX_DIAGRAM_DEGREE = 8;

/** True when any diagram of any set carries a filtration tag (then files get the filtration column). */
export function hasFiltrationTags(sets: readonly DiagramSet[]): boolean {
  for (const set of sets) for (const d of set.diagrams) if (d.filtration !== undefined) return true;
  return false;
}

/**
 * A set's diagrams in file order: per filtration tag in the order first met (untagged first), degrees
 * ascending inside — the order `computeDiagrams` returns (filtration-major).
 */
export function diagramsInFileOrder(set: DiagramSet): Diagram[] {
  const tags: Array<string | undefined> = [undefined];
  for (const d of set.diagrams) if (!tags.includes(d.filtration)) tags.push(d.filtration);
  return [...set.diagrams].sort(
    (a, b) => tags.indexOf(a.filtration) - tags.indexOf(b.filtration) || a.degree - b.degree,
  );
}

/**
 * Gathers pairs row by row into diagram sets: samples in the order of their first row; every sample gets one
 * diagram per (filtration tag, degree) seen anywhere in the file — tags in first-met order (untagged first),
 * all degrees ascending inside each — empty where it has no pairs, so all samples share the same channels.
 */
export class DiagramCollector {
  private readonly samples = new Map<
    string,
    { label: string; pairs: Map<string, { b: number[]; d: number[] }>; sequence: Array<string | undefined> }
  >();
  private readonly tags: Array<string | undefined> = [];
  private readonly degrees = new Set<number>();

  /** The label recorded for `sample`, or undefined for a new sample. */
  labelOf(sample: string): string | undefined {
    return this.samples.get(sample)?.label;
  }

  add(
    sample: string,
    label: string,
    tag: string | undefined,
    degree: number,
    birth: number,
    death: number,
  ): void {
    let entry = this.samples.get(sample);
    if (entry === undefined) {
      entry = { label, pairs: new Map(), sequence: [] };
      this.samples.set(sample, entry);
    }
    if (!this.tags.includes(tag)) this.tags.push(tag);
    if (entry.sequence[entry.sequence.length - 1] !== tag) entry.sequence.push(tag);
    this.degrees.add(degree);
    const key = channelKey(tag, degree);
    let pairs = entry.pairs.get(key);
    if (pairs === undefined) {
      pairs = { b: [], d: [] };
      entry.pairs.set(key, pairs);
    }
    pairs.b.push(birth);
    pairs.d.push(death);
  }

  /**
   * The tags in the order the rows imply: each sample's rows go filtration by filtration, so a tag met
   * after another in one sample comes after it (a sample without pairs in some filtration still orders the
   * rest); ties and contradictions fall back to first-met order. Untagged diagrams come first.
   */
  private tagOrder(): Array<string | undefined> {
    const index = new Map(this.tags.map((t, i) => [t, i]));
    const n = this.tags.length;
    const after: number[][] = Array.from({ length: n }, () => []);
    const incoming = new Int32Array(n);
    for (const entry of this.samples.values()) {
      for (let k = 1; k < entry.sequence.length; k++) {
        const from = index.get(entry.sequence[k - 1])!;
        const to = index.get(entry.sequence[k])!;
        if (!after[from].includes(to)) {
          after[from].push(to);
          incoming[to]++;
        }
      }
    }
    const order: number[] = [];
    const placed = new Uint8Array(n);
    // invariant: order holds the placed tags; each step places the first-met tag with nothing left before it
    while (order.length < n) {
      let next = -1;
      for (let i = 0; i < n && next < 0; i++) if (!placed[i] && incoming[i] === 0) next = i;
      if (next < 0) for (let i = 0; i < n && next < 0; i++) if (!placed[i]) next = i; // a contradiction
      placed[next] = 1;
      order.push(next);
      for (const to of after[next]) incoming[to]--;
    }
    const tags = order.map((i) => this.tags[i]);
    return tags.includes(undefined) ? [undefined, ...tags.filter((t) => t !== undefined)] : tags;
  }

  finish(): DiagramSet[] {
    const tags = this.tagOrder();
    const degrees = [...this.degrees].sort((a, b) => a - b);
    return [...this.samples.entries()].map(([sample, entry]) => {
      const diagrams: Diagram[] = [];
      for (const tag of tags) {
        for (const degree of degrees) {
          const pairs = entry.pairs.get(channelKey(tag, degree));
          const births = Float64Array.from(pairs?.b ?? []);
          const deaths = Float64Array.from(pairs?.d ?? []);
          diagrams.push(
            tag === undefined ? { degree, births, deaths } : { degree, births, deaths, filtration: tag },
          );
        }
      }
      return { sample, label: entry.label, diagrams };
    });
  }
}

function channelKey(tag: string | undefined, degree: number): string {
  return tag === undefined ? `\u0000${degree}` : `${tag}\u0000${degree}`;
}

/** Turns diagram sets into diagram CSV text (samples in order, then `diagramsInFileOrder`, pairs in stored order). */
export function formatDiagramCsv(sets: readonly DiagramSet[]): string {
  const tagged = hasFiltrationTags(sets);
  const header = tagged
    ? ['sample', 'label', FILTRATION_COLUMN, 'degree', 'birth', 'death']
    : [...DIAGRAM_CSV_HEADER];
  const lines: string[] = [header.join(',')];
  for (const set of sets) {
    const sample = csvField(set.sample);
    const label = csvField(set.label);
    for (const d of diagramsInFileOrder(set)) {
      const lead = tagged ? `${sample},${label},${csvField(d.filtration ?? '')}` : `${sample},${label}`;
      for (let i = 0; i < d.births.length; i++) {
        lines.push(`${lead},${d.degree},${csvNumber(d.births[i])},${csvNumber(d.deaths[i])}`);
      }
    }
  }
  return lines.join('\n') + '\n';
}

export function writeDiagramCsv(file: string, sets: readonly DiagramSet[]): void {
  writeFileAtomic(file, formatDiagramCsv(sets));
}

/**
 * Parses diagram CSV text (see `DiagramCollector` for the order and shape of the result). An optional
 * `filtration` column tags each row's diagram; an empty value there means untagged.
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
  const iFiltration = index.get(FILTRATION_COLUMN);

  const collector = new DiagramCollector();
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
    const known = collector.labelOf(sample);
    if (known !== undefined && known !== label) {
      throw new UserError(
        `sample '${shown(sample)}' has label '${shown(label)}' here but '${shown(known)}' earlier`,
        { file, line },
      );
    }
    const tag = iFiltration === undefined || fields[iFiltration] === '' ? undefined : fields[iFiltration];
    collector.add(sample, label, tag, degree, birth, death);
  }
  return collector.finish();
}

export function readDiagramCsv(file: string): DiagramSet[] {
  return parseDiagramCsv(readTextFile(file), file);
}
