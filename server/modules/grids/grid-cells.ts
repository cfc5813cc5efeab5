/**
 * The runs of a grid: each cell's settings (the base settings with the cell's axis values applied),
 * checked with the runs' settings schema of the family, and a readable label per cell.
 */
import type { z } from 'zod';
import { gridCellLabel, gridCoordinates, type GridAxis, type GridAxisValue } from '../../../shared/api/grids';
import { gruRunSettingsSchema, ngramRunSettingsSchema, ssmRunSettingsSchema, type RunFamily, type RunSettings } from '../../../shared/api/runs';

const SCHEMAS: Record<RunFamily, z.ZodType> = { ssm: ssmRunSettingsSchema, gru: gruRunSettingsSchema, ngram: ngramRunSettingsSchema };

export interface PlannedCell {
  coords: number[];
  values: GridAxisValue[];
  label: string;
  settings: RunSettings;
}

/** A copy of `settings` with `value` at the dotted `path` (objects on the way are created). */
export function withValueAt(settings: Record<string, unknown>, path: string, value: unknown): Record<string, unknown> {
  const out = structuredClone(settings);
  const keys = path.split('.');
  let node: Record<string, unknown> = out;
  for (const k of keys.slice(0, -1)) {
    const next = node[k];
    if (next === null || typeof next !== 'object' || Array.isArray(next)) node[k] = {};
    node = node[k] as Record<string, unknown>;
  }
  node[keys[keys.length - 1]!] = structuredClone(value);
  return out;
}

export function cellLabel(axes: readonly GridAxis[], coords: readonly number[]): string {
  return gridCellLabel(axes, coords);
}

/**
 * Every cell of the grid with validated settings, or the field errors of the first cells that fail
 * (keyed `baseSettings.<path>`, the message naming the cell), so nothing is created when one cell is wrong.
 */
export function planGrid(family: RunFamily, base: Record<string, unknown>, axes: readonly GridAxis[], split: RunSettings['split']):
  { ok: true; cells: PlannedCell[] } | { ok: false; fields: Record<string, string> } {
  const schema = SCHEMAS[family];
  const cells: PlannedCell[] = [];
  const fields: Record<string, string> = {};
  for (const coords of gridCoordinates(axes)) {
    let settings: Record<string, unknown> = { ...base, split: base['split'] ?? split };
    const values = axes.map((a, i) => a.values[coords[i]!]!);
    axes.forEach((a, i) => { settings = withValueAt(settings, a.key, values[i]); });
    const label = cellLabel(axes, coords);
    const parsed = schema.safeParse(settings);
    if (!parsed.success) {
      for (const issue of parsed.error.issues) {
        const key = `baseSettings${issue.path.length ? '.' : ''}${issue.path.map(String).join('.')}`;
        if (!(key in fields)) fields[key] = `In the cell ${label}: ${issue.message}`;
      }
      continue;
    }
    cells.push({ coords, values, label, settings: parsed.data as RunSettings });
  }
  return Object.keys(fields).length > 0 ? { ok: false, fields } : { ok: true, cells };
}
