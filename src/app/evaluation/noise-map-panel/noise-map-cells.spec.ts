import type { NoiseMap } from '../../../../shared/eval/noise-map';
import { OKABE_ITO, charColours, inkOn, mapCells } from './noise-map-cells';

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

  it('colours the characters by cells taken with the Okabe–Ito set, the end of word black, the same character alike', () => {
    const { cells, legend } = mapCells(grid(), ['a', 'b']);
    // 'a' takes 2 cells (first colour, orange), 'b' 1 (second, sky blue); values from Okabe & Ito (2008).
    expect(legend.map((l) => [l.label, l.colour])).toEqual([['a', '#E69F00'], ['b', '#56B4E9'], ['end', '#000000']]);
    const aCells = cells.filter((c) => c.char === 'a');
    expect(new Set(aCells.map((c) => c.colour))).toEqual(new Set(['#E69F00']));
    // Hatched where the next character is unclear (p < 0.5): the 'end' cell (0.4) only.
    expect(cells.filter((c) => c.unsure).map((c) => c.char)).toEqual([null]);
  });

  it('gives the seven most frequent characters seven different colours and greys the rest', () => {
    const alphabet = 'abcdefghij'.split('');
    const counts = new Map<string | null, number>(alphabet.map((c, i) => [c, 20 - i]));
    counts.set(null, 1);
    const colours = charColours(counts, alphabet);
    const top = alphabet.slice(0, 7).map((c) => colours.get(c));
    expect(new Set(top).size).toBe(7);
    expect(top).not.toContain(OKABE_ITO.black);
    expect(colours.get('h')).toBe(colours.get('j'));
    expect(top).not.toContain(colours.get('h'));
    expect(colours.get(null)).toBe(OKABE_ITO.black);
  });

  it('labels dark fills in white and light fills in near-black', () => {
    expect(inkOn(OKABE_ITO.blue)).toBe('#FFFFFF');
    expect(inkOn(OKABE_ITO.black)).toBe('#FFFFFF');
    expect(inkOn(OKABE_ITO.yellow)).not.toBe('#FFFFFF');
  });
});
