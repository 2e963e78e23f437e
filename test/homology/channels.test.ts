import { describe, expect, it } from 'vitest';
import {
  channelName,
  channelsOf,
  type DiagramSet,
  diagramOfChannel,
  makeDiagram,
} from '../../src/core/diagram.js';

function tagged(degree: number, filtration: string | undefined, pairs: Array<[number, number]>) {
  const d = makeDiagram(degree, pairs);
  return filtration === undefined ? d : { ...d, filtration };
}

describe('channels: (filtration, degree) slots of diagram sets', () => {
  it('untagged sets give one channel per wanted degree, ascending', () => {
    const sets: DiagramSet[] = [
      { sample: 'a', label: 'x', diagrams: [tagged(0, undefined, [[0, 1]]), tagged(1, undefined, [])] },
    ];
    expect(channelsOf(sets, [1, 0, 1])).toEqual([{ degree: 0 }, { degree: 1 }]);
    expect(channelsOf([], [0])).toEqual([{ degree: 0 }]);
  });

  it('tagged sets give filtration-major channels in first-met order, and look-ups by tag', () => {
    const sets: DiagramSet[] = [
      {
        sample: 'a',
        label: 'x',
        diagrams: [tagged(0, 'height:1:0', [[0, 2]]), tagged(0, 'radial:3:3', [[1, 4]])],
      },
      { sample: 'b', label: 'y', diagrams: [tagged(1, 'erosion', [[0, 1]])] },
    ];
    const channels = channelsOf(sets, [0, 1]);
    expect(channels.map(channelName)).toEqual([
      'height:1:0/H0',
      'height:1:0/H1',
      'radial:3:3/H0',
      'radial:3:3/H1',
      'erosion/H0',
      'erosion/H1',
    ]);
    expect(Array.from(diagramOfChannel(sets[0], channels[2]).deaths)).toEqual([4]);
    const missing = diagramOfChannel(sets[1], channels[0]);
    expect(missing.births.length).toBe(0);
    expect(missing.filtration).toBe('height:1:0');
    expect(channelName({ degree: 2 })).toBe('H2');
  });
});
