import { describe, expect, it } from 'vitest';
import { makeDiagram } from '../../src/core/diagram.js';
import { UserError } from '../../src/core/errors.js';
import { formatDiagramCsv, parseDiagramCsv } from '../../src/io/diagram-csv.js';

describe('diagram CSV', () => {
  it('round-trips pairs, essential classes, empty labels and quoted ids', () => {
    const sets = [
      {
        sample: 'a,1',
        label: '',
        diagrams: [
          makeDiagram(0, [
            [0, Infinity],
            [0, 0.25],
          ]),
          makeDiagram(1, [[0.5, 1.125]]),
        ],
      },
      { sample: 'b', label: 'ring', diagrams: [makeDiagram(0, [[0, 0.1 + 0.2]]), makeDiagram(1, [])] },
    ];
    const text = formatDiagramCsv(sets);
    expect(text.split('\n')[0]).toBe('sample,label,degree,birth,death');
    expect(text).toContain('"a,1",,0,0,inf');
    const back = parseDiagramCsv(text, 'x.csv');
    expect(back.map((s) => s.sample)).toEqual(['a,1', 'b']);
    expect([...back[0].diagrams[0].deaths]).toEqual([Infinity, 0.25]);
    expect(back[1].diagrams[0].deaths[0]).toBe(0.1 + 0.2);
    expect(back[1].diagrams[1].births.length).toBe(0);
  });

  it.each([
    ['sample,label,degree,birth,death\ns,a,1,x,2\n', 2, /'x' is not a number in column birth/],
    ['sample,label,degree,birth,death\ns,a,1,0,1\ns,a,1,3,2\n', 3, /death 2 is before birth 3/],
    ['sample,label,degree,birth,death\ns,a,1,NaN,2\n', 2, /not a number/],
    ['sample,label,degree,birth\ns,a,1,0\n', 1, /missing column 'death'/],
    ['sample,label,degree,birth,death\ns,a,h1,0,1\n', 2, /unknown degree 'h1'/],
    ['sample,label,degree,birth,death\ns,a,1,0\n', 2, /has 4 fields/],
  ])('refuses bad input with file and line (%#)', (text, line, message) => {
    let caught: unknown;
    try {
      parseDiagramCsv(text, 'bad.csv');
    } catch (error) {
      caught = error;
    }
    expect(caught).toBeInstanceOf(UserError);
    expect((caught as UserError).line).toBe(line);
    expect((caught as UserError).describe()).toMatch(message);
    expect((caught as UserError).describe().startsWith(`bad.csv:${line}: `)).toBe(true);
  });
});

describe('diagram CSV with filtration tags', () => {
  const tagged = (degree: number, tag: string, pairs: Array<[number, number]>) => ({
    ...makeDiagram(degree, pairs),
    filtration: tag,
  });
  const sets = [
    {
      sample: 'a',
      label: 'x',
      diagrams: [
        tagged(0, 'height:1:0', [[0, Infinity]]),
        tagged(1, 'height:1:0', [[2, 5]]),
        tagged(0, 'radial:50%:50%', [
          [1, Infinity],
          [1.5, 2],
        ]),
        tagged(1, 'radial:50%:50%', []),
      ],
    },
    {
      sample: 'b',
      label: 'y',
      diagrams: [
        tagged(0, 'height:1:0', [[3, Infinity]]),
        tagged(1, 'height:1:0', []),
        tagged(0, 'radial:50%:50%', [[0.5, Infinity]]),
        tagged(1, 'radial:50%:50%', [[4, 6]]),
      ],
    },
  ];

  it('adds a filtration column after label, rows filtration-major, and reads the tags back', () => {
    const text = formatDiagramCsv(sets);
    expect(text.split('\n').slice(0, 5)).toEqual([
      'sample,label,filtration,degree,birth,death',
      'a,x,height:1:0,0,0,inf',
      'a,x,height:1:0,1,2,5',
      'a,x,radial:50%:50%,0,1,inf',
      'a,x,radial:50%:50%,0,1.5,2',
    ]);
    const back = parseDiagramCsv(text, 'd.csv');
    expect(back).toEqual(sets);
    expect(formatDiagramCsv(back)).toBe(text);
  });

  it('recovers the filtration order when the first sample has no pairs in the first filtration', () => {
    const gap = [
      { sample: 'a', label: 'x', diagrams: [tagged(1, 'erosion', []), tagged(1, 'grey', [[1, 2]])] },
      { sample: 'b', label: 'x', diagrams: [tagged(1, 'erosion', [[-2, 0]]), tagged(1, 'grey', [[0, 3]])] },
    ];
    const text = formatDiagramCsv(gap);
    const back = parseDiagramCsv(text, 'gap.csv');
    expect(back.map((set) => set.diagrams.map((d) => d.filtration))).toEqual([
      ['erosion', 'grey'],
      ['erosion', 'grey'],
    ]);
    expect(back).toEqual(gap);
    expect(formatDiagramCsv(back)).toBe(text);
  });

  it('keeps untagged files at five columns', () => {
    const plain = [{ sample: 'a', label: 'x', diagrams: [makeDiagram(0, [[0, 1]])] }];
    expect(formatDiagramCsv(plain).split('\n')[0]).toBe('sample,label,degree,birth,death');
    expect(parseDiagramCsv(formatDiagramCsv(plain), 'p.csv')[0].diagrams[0].filtration).toBeUndefined();
  });
});
