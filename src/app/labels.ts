/**
 * Words for labels: prior parameters ("term 1 length along the first axis", not
 * "terms[0].lengths[0]"), grid axes (the problem's own names, `grid.axes`), and titles with a unit
 * in brackets only when there is a unit (never an empty "()").
 * Pure functions; unit-tested in test/app/labels.test.ts.
 */
import { type Geometry, gridDimension, type Grid } from '../core/grid/grid.ts';

/**
 * A hyperparameter name of src/core/tuning/typeII.ts (`terms[k].variance`, `.length`,
 * `.lengths[0]`, `.lengths[1]`, `.angle`, `.nu`, `nugget`) in words. The two lengths of an
 * anisotropic term are along and across its first (rotated) axis, as on the Prior panel.
 * Names it does not know are returned unchanged.
 */
export function parameterLabel(name: string): string {
  if (name === 'nugget') return 'nugget';
  const m = /^terms\[(\d+)\]\.(variance|length|lengths\[([01])\]|angle|nu)$/.exec(name);
  if (!m) return name;
  const term = `term ${Number(m[1]) + 1}`;
  switch (m[2]) {
    case 'variance':
      return `${term} variance`;
    case 'length':
      return `${term} length`;
    case 'angle':
      return `${term} angle`;
    case 'nu':
      return `${term} smoothness ν`;
    default:
      return m[3] === '0' ? `${term} length along the first axis` : `${term} length across the first axis`;
  }
}

/** The grid's axis names (`grid.axes`), else x (and y on a 2-D grid). */
export function axisNames(grid: Geometry): readonly string[] {
  const dim = gridDimension(grid);
  if (grid.axes && grid.axes.length === dim) return grid.axes;
  return ['x', 'y', 'z'].slice(0, dim);
}

/** "name (unit)", or just "name" when the unit is empty. */
export function withUnit(name: string, unit: string | undefined): string {
  return unit ? `${name} (${unit})` : name;
}

/** Axis k's label: its name and the grid's length unit. */
export function axisLabel(grid: Grid, k = 0): string {
  return withUnit(axisNames(grid)[k] ?? `axis ${k + 1}`, grid.unit);
}

/** Offset along axis k ("Δx (m)", "Δdepth (m)"). */
export function offsetLabel(grid: Grid, k: number): string {
  return withUnit(`Δ${axisNames(grid)[k] ?? `axis ${k + 1}`}`, grid.unit);
}

/**
 * The orientation all 2-D plots share, stated on them: the first axis to the right, the second
 * increasing downwards (as depth in a section); angles turn from the first axis towards the second.
 */
export function orientationNote(grid: Grid): string {
  const [a, b] = axisNames(grid);
  return `${a} to the right, ${b} increasing downwards`;
}

/** The second axis' title on a map, with its direction: "depth (m) ↓" (the axis increases downwards). */
export function downAxisLabel(grid: Grid, offset = false): string {
  return `${offset ? offsetLabel(grid, 1) : axisLabel(grid, 1)} ↓`;
}

/** A short orientation tag for titles of maps without axis titles: "(x →, depth ↓)". */
export function orientationTag(grid: Grid): string {
  const [a, b] = axisNames(grid);
  return `(${a} →, ${b} ↓)`;
}
