/**
 * `priorscope --help formats`: the file formats in full. The same content, as Markdown, is the
 * README's "File formats" section; test/cli/formats.test.ts checks that every field the readers
 * know is named here and that the downloadable templates (public/templates) read without a warning.
 */
import { KERNEL_NAMES, kernelsTaking } from '../core/kernels/table.ts';

export const FORMATS_HELP = `priorscope file formats

PROBLEM FILE (JSON)  d = G m + e, e ~ N(0, Cd), m on a regular grid or on the cells of your own mesh
  {"kind": "priorscope.problem", "version": 1,
   "title": "…",                                   optional
   "grid": {...} or "cells": {...}, "operator": {...}, "data": {...},
   "truth": [N numbers],                           optional: a known model (invented tests)
   "quantity": {"name": "density contrast", "unit": "kg/m³"}}   optional: what m is, for labels

  grid
    "shape": [nx] or [nx, ny]      number of cells along x (first axis) and y (second axis), in that order;
                                   or [nx, ny, nz] (3-D; index ix + nx·(iy + ny·iz); posterior on the FFT route,
                                   realisations and the dense route ≤ 16384 cells)
    "spacing": [dx] or [dx, dy]    cell size along each axis (> 0), in grid.unit
    "origin": [x0] or [x0, y0]     optional (default zeros): the CENTRE of the first cell, not its corner;
                                   cell (ix, iy) is centred at (x0 + ix·dx, y0 + iy·dy) and the grid covers
                                   x0 − dx/2 … x0 + (nx − 1/2)·dx (likewise along y)
    "unit": "m"                    optional: unit of lengths (spacing, origin, geometry, correlation lengths)
    "axes": ["x", "depth"]         optional: names of the axes in every label (default x and y); the second
                                   axis is drawn increasing downwards
  N = nx·ny cells, numbered x fastest: cell (ix, iy) has index ix + nx·iy. Every array of N numbers
  (operator columns, truth, a prior's mean.values and stdProfile) follows this order: the first nx
  numbers are the first row (iy = 0) from x0 rightwards, then the next row, and so on.

  cells (instead of grid: the cells of your own mesh, e.g. a tetrahedral or refined mesh, by their centres)
    "centres": [[x], …], [[x, y], …] or [[x, y, z], …]   one row per cell (1 to 3 coordinates, the same in
                                   every row), or "centres.npy": a sibling NumPy file of shape (N, d); cell i is
                                   row i, and every array of N numbers (operator columns, truth, mean.values,
                                   stdProfile) follows this order
    "volumes": [N numbers > 0]     optional, carried to exports (the prior is a covariance between centres,
                                   not weighted by volume)
    "unit": "m", "axes": [...]     optional, as for grid
  A cell list takes the dense route (Cm of N² numbers; at most 8192 cells: coarsen the mesh or resample it
  onto a grid, which takes the FFT route, above that). On the command line, posterior, check and sample
  run on cell lists; fit, profile, score, calibrate, report and tune need a grid for now.

  operator (exactly one of)
    "dense": [[N numbers], … M rows]                        one row per datum
    "sparse": {"rows": [...], "cols": [...], "values": [...]}   zero-based datum and cell indices, duplicates summed
    "file": "G.csv" | "G.mtx" | "G.npy"                     an M × N matrix in a file next to the problem file
                                                            (CSV; Matrix Market coordinate or array; NumPy .npy
                                                            float64 or float32, C or Fortran order)

  data
    "values": [M numbers]          the data d (M ≥ 1)
    "sigma": [M numbers > 0]       standard deviation of each datum (Cd diagonal), or
    "covariance": [[M numbers], … M rows]   a full symmetric positive-definite Cd (not both)
    "unit": "ms"                   optional: unit of the data, for labels
    geometry, optional (for plots only; G alone is the forward model), in grid.unit along grid.axes,
    one row per datum in the order of data.values:
    "positions": [[x], …] (1-D), [[x, y], …] (2-D) or [[x, y, z], …] (3-D)   where each point datum was
                                   measured (a station, a sample); may lie outside the grid (stations above it)
    "sources": [[x, y], …] and "receivers": [[x, y], …]   the two ends of each path datum (2-D; [[x, y, z], …]
                                   in 3-D); a path that misses the grid (for a cell list, the box of its
                                   centres) entirely is warned about (a swapped shape or a wrong origin shows
                                   up this way)
    give either positions or sources and receivers, not both

  Units: the file does not convert units. Data, sigma and Cd are in data.unit; G maps the model's
  unit (quantity.unit) to data.unit; lengths are in grid.unit; a prior's variances are in
  quantity.unit squared. Numbers must be finite; data and G entries ≤ 1e50 in magnitude, sigma from
  1e-50 to 1e50. Unknown fields are ignored with a warning that suggests the likely meant field.

PRIOR FILE (JSON)
  {"kind": "priorscope.prior", "version": 1,
   "mean": {"constant": c} | {"values": [N numbers]} | {"trend": {"intercept": a, "slope": [b1], [b1, b2] or [b1, b2, b3]}},
   "terms": [{"kernel": ${KERNEL_NAMES.map((k) => `"${k}"`).join(' | ')}, "variance": > 0,
              "length": > 0  or, in 2-D, "lengths": [l1, l2] with optional "angle" (degrees, from the first
              axis towards the second), or, in 3-D, "lengths": [l1, l2, l3] with optional "angles":
              [a1, a2, a3] (degrees, axes = columns of Rz(a1)·Ry(a2)·Rx(a3)),
              "nu": > 0 (${kernelsTaking('nu').join(', ')} only)}, …],
   "nugget": ≥ 0,                  optional, in quantity.unit squared
   "stdProfile": [N numbers > 0]}  optional: Cm = S C S + nugget·I with S = diag(stdProfile)
  A trend is a + b1·x (+ b2·y) at the cell centres (absolute coordinates).

PIECES (the workbench's "From pieces…"; the same problem without a problem file)
  G          .csv, .mtx or .npy, M × N (cells in the order above)
  data       .csv with columns value,sigma (header optional; names value/values/data/d and
             sigma/std/stdev/error), or one column of values with a covariance file; or .npy (M,) / (M, 2)
  covariance optional M × M .csv, .mtx or .npy
  geometry   optional .csv with a header: x (1-D), x,y (2-D positions) or sx,sy,rx,ry (2-D paths),
             one row per datum
  grid, units, title and quantity typed in the form

CSV
  Numbers with a decimal point (1.25), cells separated by commas, tabs or semicolons, optional quotes,
  LF, CRLF or CR line ends, blank lines and lines starting with # skipped. The first row is read as
  column names only when none of its cells is a number. A decimal comma (1,25) is refused with a hint.

Templates: the workbench links problem.json (with G.mtx), data.csv and geometry.csv, a small
invented problem that loads as it is.
`;
