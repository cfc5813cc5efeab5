/**
 * Aligns several (step, value) series on one shared, increasing list of steps, as a chart with one x array
 * needs: the first row is the union of the steps, each further row holds that series' value at each step or
 * null where it has none. Every input series must be sorted by step (the live curves keep them so).
 * Linear in the total number of points (a k-way merge).
 */
export function alignSeries(series: readonly (readonly (readonly [number, number])[])[]): [number[], ...(number | null)[][]] {
  const steps: number[] = [];
  const rows: (number | null)[][] = series.map(() => []);
  const at = series.map(() => 0);
  for (;;) {
    let next = Number.POSITIVE_INFINITY;
    for (let s = 0; s < series.length; s++) {
      const point = series[s]?.[at[s] as number];
      if (point && point[0] < next) next = point[0];
    }
    if (next === Number.POSITIVE_INFINITY) break;
    steps.push(next);
    for (let s = 0; s < series.length; s++) {
      const point = series[s]?.[at[s] as number];
      if (point && point[0] === next) {
        (rows[s] as (number | null)[]).push(point[1]);
        at[s] = (at[s] as number) + 1;
      } else {
        (rows[s] as (number | null)[]).push(null);
      }
    }
  }
  return [steps, ...rows];
}
