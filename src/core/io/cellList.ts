/**
 * The `cells` field of a problem file (the user's own mesh), the alternative to `grid`:
 *   "cells": {"centres": [[x], …] | [[x, y], …] | [[x, y, z], …] | "name.npy" (n × d), "volumes"?: [v, …] (> 0),
 *             "unit"?: "m", "axes"?: ["x", "depth"]}
 * Every row has the same number d ∈ {1, 2, 3} of coordinates, all finite; a file with both `grid` and `cells`
 * is refused. A sibling .npy is read by the caller and passed in as a Matrix (n × d).
 * PUBLIC API: readCellList.
 */
import { InputError } from '../errors.ts';
import { type CellList, validateCellList } from '../grid/grid.ts';
import type { Matrix } from '../linalg/matrix.ts';
import { MAX_CELL_LIST } from '../prior/cells.ts';

const CELL_FIELDS = ['centres', 'volumes', 'unit', 'axes'];

function isObject(v: unknown): v is Record<string, unknown> {
  return typeof v === 'object' && v !== null && !Array.isArray(v);
}

/**
 * A validated CellList from the parsed `cells` object; `npy` is the centres matrix when `centres` named a
 * sibling .npy file. Throws InputError naming the field and row (e.g. `cells.centres[4][1]`).
 */
export function readCellList(value: unknown, npy?: Matrix, field = 'cells'): CellList {
  if (!isObject(value)) throw new InputError(field, 'an object {"centres": [[x, y], …], "volumes"?: […]}', value);
  for (const key of Object.keys(value)) {
    if (!CELL_FIELDS.includes(key)) throw new InputError(`${field}.${key}`, `absent (known fields: ${CELL_FIELDS.join(', ')})`, value[key]);
  }
  const rows = npy ?? value.centres;
  let n: number;
  let dim: number;
  let at: (i: number, k: number) => unknown;
  if (npy !== undefined) {
    n = npy.rows;
    dim = npy.cols;
    at = (i, k) => npy.data[i * npy.cols + k];
  } else {
    if (!Array.isArray(rows)) {
      throw new InputError(
        `${field}.centres`,
        'an array of rows [x], [x, y] or [x, y, z], or the name of a sibling .npy file (n × d)',
        rows,
      );
    }
    n = rows.length;
    const first = rows[0];
    if (!Array.isArray(first)) throw new InputError(`${field}.centres[0]`, 'a row [x], [x, y] or [x, y, z]', first);
    dim = first.length;
    at = (i, k) => (rows[i] as unknown[])[k];
    rows.forEach((r, i) => {
      if (!Array.isArray(r) || r.length !== dim) {
        throw new InputError(`${field}.centres[${i}]`, `a row of ${dim} coordinate${dim === 1 ? '' : 's'} (like row 0)`, r);
      }
    });
  }
  if (n < 1) throw new InputError(`${field}.centres`, 'at least one cell centre', n);
  if (dim < 1 || dim > 3) throw new InputError(`${field}.centres[0]`, '1, 2 or 3 coordinates per row', `${dim} coordinates`);
  if (n > MAX_CELL_LIST) {
    throw new InputError(
      `${field}.centres`,
      `at most ${MAX_CELL_LIST} cell centres (cell lists take the dense route, N² numbers; coarsen the mesh or use a regular grid)`,
      `${n} rows`,
    );
  }
  const axis = [new Float64Array(n), new Float64Array(n), new Float64Array(n)];
  for (let i = 0; i < n; i++) {
    for (let k = 0; k < dim; k++) {
      const v = at(i, k);
      if (typeof v !== 'number' || !Number.isFinite(v)) throw new InputError(`${field}.centres[${i}][${k}]`, 'a finite number', v);
      axis[k][i] = v;
    }
  }
  let volumes: Float64Array | undefined;
  if (value.volumes !== undefined) {
    const v = value.volumes;
    if (!Array.isArray(v) || v.length !== n) throw new InputError(`${field}.volumes`, `an array of ${n} numbers (one per cell centre)`, v);
    v.forEach((x, i) => {
      if (typeof x !== 'number' || !(Number.isFinite(x) && x > 0)) throw new InputError(`${field}.volumes[${i}]`, 'a finite number > 0', x);
    });
    volumes = Float64Array.from(v as number[]);
  }
  const cells: { -readonly [K in keyof CellList]: CellList[K] } = {
    kind: 'cells',
    dim: dim as 1 | 2 | 3,
    x: axis[0],
    y: axis[1],
    z: axis[2],
  };
  if (volumes !== undefined) cells.volumes = volumes;
  if (value.unit !== undefined) {
    if (typeof value.unit !== 'string') throw new InputError(`${field}.unit`, 'a string such as "m"', value.unit);
    cells.unit = value.unit;
  }
  if (value.axes !== undefined) {
    const a = value.axes;
    if (!Array.isArray(a) || a.length !== dim || !a.every((s) => typeof s === 'string' && s.trim() !== '')) {
      throw new InputError(`${field}.axes`, `${dim} non-empty name${dim === 1 ? '' : 's'}`, a);
    }
    cells.axes = a.map((s: string) => s.trim());
  }
  validateCellList(cells, field);
  return cells;
}
