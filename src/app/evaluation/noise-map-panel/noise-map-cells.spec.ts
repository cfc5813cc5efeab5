import type { NoiseMap } from '../../../../shared/eval/noise-map';
import { charColour, mapCells } from './noise-map-cells';

/** A 2 × 2 grid as shared/eval/noise-map.ts lays it out: point a·steps + b has dims[0] from a and dims[1] from b. */
function grid(): NoiseMap {
  const at = (a: number, b: number, char: string | null, prob: number) =>
    ({ noise: [a === 0 ? -3 : 3, b === 0 ? -3 : 3] as [number, number], state: [0, 0] as [number, number], char, prob });
  return { dims: [0, 1], from: [0, 0], points: [at(0, 0, 'a', 0.9), at(0, 1, 'b', 0.5), at(1, 0, 'a', 0.6), at(1, 1, null, 0.4)] };
}

describe('noise map cells', () => {
  it('draws rows from the top (+range) down and columns from the left (−range) across', () => {
    const { steps, cells } = mapCells(grid(), ['a', 'b']);
    expect(steps).toBe(2);
    // Top-left cell: first dimension −3, second +3 (closed form from the layout above).
    expect(cells.map((c) => c.char)).toEqual(['b', null, 'a', 'a']);
    expect(cells[0]!.title).toContain('noise (-3.00, 3.00)');
  });

  it('lists each character once in the legend, the most cells first, with the end symbol named', () => {
    const { legend } = mapCells(grid(), ['a', 'b']);
    expect(legend.map((l) => [l.label, l.cells])).toEqual([['a', 2], ['b', 1], ['end', 1]]);
  });

  it('gives different characters different colours and the same character the same colour', () => {
    expect(charColour('a', ['a', 'b'])).not.toBe(charColour('b', ['a', 'b']));
    expect(charColour('a', ['a', 'b'])).toBe(charColour('a', ['a', 'b']));
    expect(charColour(null, ['a', 'b'])).not.toBe(charColour('a', ['a', 'b']));
  });
});
