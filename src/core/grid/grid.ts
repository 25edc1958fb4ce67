/**
 * Regular 1-D, 2-D and 3-D grids. Cell (ix, iy, iz) sits at (x0 + dx·ix, y0 + dy·iy, z0 + dz·iz) and has
 * the flat index i = ix + nx·(iy + ny·iz) (x fastest).
 */
import { InputError } from '../errors.ts';

export interface Grid {
  /** [nx], [nx, ny] or [nx, ny, nz], positive integers. */
  readonly shape: readonly number[];
  /** [dx], [dx, dy] or [dx, dy, dz], > 0. */
  readonly spacing: readonly number[];
  /** Coordinates of cell 0; zeros when omitted. */
  readonly origin?: readonly number[];
  /** Unit of length, e.g. "m". */
  readonly unit?: string;
  /** Names of the axes for labels, one per dimension (e.g. ["x", "depth"]); "x" and "depth" when absent. */
  readonly axes?: readonly string[];
}

/**
 * The user's own mesh: N cells given by their centres (no regular spacing, so no lag table or FFT). Cell i is
 * at (x[i], y[i], z[i]); y is all zeros below 2-D and z all zeros below 3-D. `volumes` (optional, > 0) are
 * carried for reporting and exports only: the prior is a point covariance between centres, not weighted by
 * volume (see DEVELOPERS.md, "Cell lists").
 */
export interface CellList {
  readonly kind: 'cells';
  readonly dim: 1 | 2 | 3;
  readonly x: Float64Array;
  readonly y: Float64Array;
  readonly z: Float64Array;
  readonly volumes?: Float64Array;
  readonly unit?: string;
  readonly axes?: readonly string[];
}

/** A regular grid or a cell list: the one place the route decision branches on ({@link isCellList}). */
export type Geometry = Grid | CellList;

export function isCellList(g: Geometry): g is CellList {
  return (g as CellList).kind === 'cells';
}

export function gridDimension(g: Geometry): 1 | 2 | 3 {
  if (isCellList(g)) return g.dim;
  return g.shape.length === 3 ? 3 : g.shape.length === 2 ? 2 : 1;
}

export function cellCount(g: Geometry): number {
  if (isCellList(g)) return g.x.length;
  return g.shape.reduce((a, b) => a * b, 1);
}

/** Coordinates of every cell (y is all zeros in 1-D, z all zeros below 3-D). */
export function cellCoordinates(g: Geometry): { x: Float64Array; y: Float64Array; z: Float64Array } {
  if (isCellList(g)) return { x: g.x, y: g.y, z: g.z };
  const n = cellCount(g);
  const x = new Float64Array(n);
  const y = new Float64Array(n);
  const z = new Float64Array(n);
  const nx = g.shape[0];
  const ny = g.shape[1] ?? 1;
  const [x0 = 0, y0 = 0, z0 = 0] = g.origin ?? [];
  const dx = g.spacing[0];
  const dy = g.spacing[1] ?? 0;
  const dz = g.spacing[2] ?? 0;
  for (let i = 0; i < n; i++) {
    const row = Math.floor(i / nx);
    x[i] = x0 + dx * (i % nx);
    y[i] = y0 + dy * (row % ny);
    z[i] = z0 + dz * Math.floor(row / ny);
  }
  return { x, y, z };
}

/** Throws InputError unless the grid is a valid 1-D, 2-D or 3-D regular grid. */
export function validateGrid(g: Geometry, field = 'grid'): void {
  if (isCellList(g)) {
    validateCellList(g);
    return;
  }
  if (!Array.isArray(g.shape) || g.shape.length < 1 || g.shape.length > 3) {
    throw new InputError(`${field}.shape`, '[nx], [nx, ny] or [nx, ny, nz]', g.shape);
  }
  g.shape.forEach((s, k) => {
    if (!Number.isInteger(s) || s < 1) throw new InputError(`${field}.shape[${k}]`, 'a positive integer', s);
  });
  if (!Array.isArray(g.spacing) || g.spacing.length !== g.shape.length) {
    throw new InputError(`${field}.spacing`, `an array of ${g.shape.length} numbers`, g.spacing);
  }
  g.spacing.forEach((s, k) => {
    if (typeof s !== 'number' || !Number.isFinite(s) || s <= 0) {
      throw new InputError(`${field}.spacing[${k}]`, 'a finite number > 0', s);
    }
  });
  if (g.origin !== undefined) {
    if (!Array.isArray(g.origin) || g.origin.length !== g.shape.length) {
      throw new InputError(`${field}.origin`, `an array of ${g.shape.length} numbers`, g.origin);
    }
    g.origin.forEach((s, k) => {
      if (typeof s !== 'number' || !Number.isFinite(s)) throw new InputError(`${field}.origin[${k}]`, 'a finite number', s);
    });
  }
}

/** Throws InputError unless every centre coordinate is finite, the axes agree in length and volumes are > 0. */
export function validateCellList(g: CellList, field = 'cells'): void {
  const n = g.x.length;
  if (n < 1) throw new InputError(`${field}.centres`, 'at least one cell centre', n);
  if (g.y.length !== n || g.z.length !== n) throw new InputError(`${field}.centres`, `${n} rows of equal length`, g.y.length);
  const names = ['x', 'y', 'z'] as const;
  for (let i = 0; i < n; i++) {
    for (let k = 0; k < 3; k++) {
      const v = g[names[k]][i];
      if (!Number.isFinite(v)) throw new InputError(`${field}.centres[${i}][${k}]`, 'a finite number', v);
      if (k >= g.dim && v !== 0) throw new InputError(`${field}.centres[${i}]`, `${g.dim} coordinate(s)`, v);
    }
  }
  if (g.volumes !== undefined) {
    if (g.volumes.length !== n) throw new InputError(`${field}.volumes`, `${n} numbers (one per cell centre)`, g.volumes.length);
    g.volumes.forEach((v, i) => {
      if (!(Number.isFinite(v) && v > 0)) throw new InputError(`${field}.volumes[${i}]`, 'a finite number > 0', v);
    });
  }
}
