/**
 * The numbers behind a grid's heat map (pure functions): the chosen figure of every cell, averaged over the
 * axes that are not drawn (e.g. seeds), placed on a column axis and a row axis.
 */
import { meanStandardError } from '../../../../shared/eval/standard-error';
import { GRID_FIGURE_LABELS, gridValueLabel, type GridCellDto, type GridDto, type GridFigure } from '../../../../shared/api/grids';

export function cellFigure(cell: GridCellDto, figure: GridFigure): number | null {
  const v = figure === 'bestValidationBitsPerChar' ? cell.best
    : figure === 'lastBoundBitsPerChar' ? cell.final
      : figure === 'wordsPerSecond' ? cell.wordsPerSecond : cell.parameterCount;
  return v !== null && v !== undefined && Number.isFinite(v) ? v : null;
}

/** How good a value is, for the colour only (higher = better); bound figures are costs, so lower bits are better. */
export function goodness(value: number, figure: GridFigure): number {
  return GRID_FIGURE_LABELS[figure].higherIsBetter ? value : -value;
}

/** `se`: standard error of the mean over the averaged runs (s/√n, sample s); null for a single run. */
export interface HeatCell { x: number; y: number; value: number; goodness: number; runs: number; of: number; se: number | null }
export interface HeatmapData {
  columns: string[];
  rows: string[];
  columnTitle: string;
  rowTitle: string;
  cells: HeatCell[];
  /** Cells of the grid that have a figure so far, of all cells. */
  filled: number;
  total: number;
}

/**
 * `xAxis` / `yAxis` index the grid's axes (`yAxis` null: a single row). Each heat cell is the mean over the cells of
 * the grid that share its two coordinates and have a figure; `runs` / `of` say how many were averaged.
 */
export function heatmapData(grid: Pick<GridDto, 'axes' | 'cells'>, figure: GridFigure, xAxis: number, yAxis: number | null, axisLabel: (key: string) => string): HeatmapData {
  const xa = grid.axes[xAxis]!;
  const ya = yAxis === null ? null : grid.axes[yAxis]!;
  const sums = new Map<string, { of: number; values: number[] }>();
  let filled = 0;
  for (const cell of grid.cells) {
    const x = cell.coords[xAxis] ?? 0;
    const y = yAxis === null ? 0 : cell.coords[yAxis] ?? 0;
    const key = `${x},${y}`;
    const acc = sums.get(key) ?? { of: 0, values: [] };
    acc.of += 1;
    const v = cellFigure(cell, figure);
    if (v !== null) { acc.values.push(v); filled += 1; }
    sums.set(key, acc);
  }
  const cells: HeatCell[] = [];
  for (const [key, acc] of sums) {
    const n = acc.values.length;
    if (n === 0) continue;
    const [x, y] = key.split(',').map(Number) as [number, number];
    const value = acc.values.reduce((a, v) => a + v, 0) / n;
    cells.push({ x, y, value, goodness: goodness(value, figure), runs: n, of: acc.of, se: meanStandardError(acc.values) });
  }
  return {
    columns: xa.values.map(gridValueLabel),
    rows: ya ? ya.values.map(gridValueLabel) : [''],
    columnTitle: axisLabel(xa.key),
    rowTitle: ya ? axisLabel(ya.key) : '',
    cells, filled, total: grid.cells.length,
  };
}
