/** From noise-map points to the cells of our grid drawing: rows top (+range) to bottom, colour per character. */
import type { NoiseMap } from '../../../../shared/eval/noise-map';

export interface MapCell { key: number; char: string | null; prob: number; colour: string; title: string }
export interface MapLegendEntry { char: string | null; label: string; colour: string; cells: number }

const EOW_COLOUR = '#2f2b24';

/** A stable colour per alphabet position: hues spread by the golden angle, calm saturation for the paper look. */
export function charColour(char: string | null, alphabet: readonly string[]): string {
  if (char === null) return EOW_COLOUR;
  const i = Math.max(0, alphabet.indexOf(char));
  const hue = (170 + i * 137.508) % 360;
  return `hsl(${hue.toFixed(0)} 55% ${i % 2 === 0 ? 38 : 50}%)`;
}

export function mapCells(map: NoiseMap, alphabet: readonly string[]): { steps: number; cells: MapCell[]; legend: MapLegendEntry[] } {
  const steps = Math.round(Math.sqrt(map.points.length));
  const cells: MapCell[] = [];
  const counts = new Map<string | null, number>();
  // Point a·steps + b has noise dimension dims[0] from a and dims[1] from b (shared/eval/noise-map.ts).
  for (let b = steps - 1; b >= 0; b--) {
    for (let a = 0; a < steps; a++) {
      const p = map.points[a * steps + b];
      if (!p) continue;
      const name = p.char === null ? 'end of word' : `“${p.char}”`;
      cells.push({
        key: a * steps + b, char: p.char, prob: p.prob, colour: charColour(p.char, alphabet),
        title: `noise (${p.noise[0].toFixed(2)}, ${p.noise[1].toFixed(2)}) → state (${p.state[0].toFixed(2)}, ${p.state[1].toFixed(2)}): ${name}, p = ${p.prob.toFixed(2)}`,
      });
      counts.set(p.char, (counts.get(p.char) ?? 0) + 1);
    }
  }
  const legend = [...counts].sort((x, y) => y[1] - x[1]).map(([char, n]) => ({
    char, label: char === null ? 'end' : char, colour: charColour(char, alphabet), cells: n,
  }));
  return { steps, cells, legend };
}
