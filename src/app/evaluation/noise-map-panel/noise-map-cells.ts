/** From noise-map points to the cells of our grid drawing: rows top (+range) to bottom, colour per character. */
import type { NoiseMap } from '../../../../shared/eval/noise-map';

export interface MapCell { key: number; char: string | null; prob: number; colour: string; ink: string; unsure: boolean; title: string }
export interface MapLegendEntry { char: string | null; label: string; colour: string; ink: string; cells: number }

/**
 * The eight colours of Okabe and Ito, "Color Universal Design (CUD): how to make figures and presentations that are
 * friendly to colorblind people" (2008; also in B. Wong, "Points of view: Color blindness", Nature Methods 8, 441,
 * 2011): told apart with each common kind of colour blindness. Black is kept for the end of the word.
 */
export const OKABE_ITO = {
  orange: '#E69F00', skyBlue: '#56B4E9', bluishGreen: '#009E73', yellow: '#F0E442',
  blue: '#0072B2', vermillion: '#D55E00', reddishPurple: '#CC79A7', black: '#000000',
} as const;

/** Colours for characters, most frequent on the map first; every further character is grey and told by its label. */
const CHAR_COLOURS = [OKABE_ITO.orange, OKABE_ITO.skyBlue, OKABE_ITO.bluishGreen, OKABE_ITO.yellow, OKABE_ITO.blue, OKABE_ITO.vermillion, OKABE_ITO.reddishPurple];
const OTHER_COLOUR = '#BDB7AB';
const EOW_COLOUR = OKABE_ITO.black;
/** Label ink with enough contrast on each colour: white on the dark ones, near-black on the light ones. */
const LIGHT_INK = '#FFFFFF';
const DARK_INK = '#1B1A17';
const DARK_FILLS: ReadonlySet<string> = new Set([OKABE_ITO.blue, OKABE_ITO.vermillion, OKABE_ITO.black, OKABE_ITO.bluishGreen]);
/** Below this probability a cell is hatched: the next character there is not clear. */
export const UNSURE_BELOW = 0.5;

/** Colours for the characters of one map: by the number of cells each takes, ties in alphabet order. */
export function charColours(counts: ReadonlyMap<string | null, number>, alphabet: readonly string[]): Map<string | null, string> {
  const order = [...counts.keys()].filter((c) => c !== null).sort((x, y) =>
    (counts.get(y) ?? 0) - (counts.get(x) ?? 0) || alphabet.indexOf(x as string) - alphabet.indexOf(y as string));
  const colours = new Map<string | null, string>(order.map((c, i) => [c, CHAR_COLOURS[i] ?? OTHER_COLOUR]));
  if (counts.has(null)) colours.set(null, EOW_COLOUR);
  return colours;
}

export function inkOn(colour: string): string {
  return DARK_FILLS.has(colour) ? LIGHT_INK : DARK_INK;
}

export function mapCells(map: NoiseMap, alphabet: readonly string[]): { steps: number; cells: MapCell[]; legend: MapLegendEntry[] } {
  const steps = Math.round(Math.sqrt(map.points.length));
  const counts = new Map<string | null, number>();
  for (const p of map.points) counts.set(p.char, (counts.get(p.char) ?? 0) + 1);
  const colours = charColours(counts, alphabet);
  const colourOf = (char: string | null) => colours.get(char) ?? OTHER_COLOUR;
  const cells: MapCell[] = [];
  // Point a·steps + b has noise dimension dims[0] from a and dims[1] from b (shared/eval/noise-map.ts).
  for (let b = steps - 1; b >= 0; b--) {
    for (let a = 0; a < steps; a++) {
      const p = map.points[a * steps + b];
      if (!p) continue;
      const name = p.char === null ? 'end of word' : `“${p.char}”`;
      const colour = colourOf(p.char);
      cells.push({
        key: a * steps + b, char: p.char, prob: p.prob, colour, ink: inkOn(colour), unsure: p.prob < UNSURE_BELOW,
        title: `noise (${p.noise[0].toFixed(2)}, ${p.noise[1].toFixed(2)}) → state (${p.state[0].toFixed(2)}, ${p.state[1].toFixed(2)}): ${name}, p = ${p.prob.toFixed(2)}`,
      });
    }
  }
  const legend = [...counts].sort((x, y) => y[1] - x[1]).map(([char, n]) => ({
    char, label: char === null ? 'end' : char, colour: colourOf(char), ink: inkOn(colourOf(char)), cells: n,
  }));
  return { steps, cells, legend };
}
