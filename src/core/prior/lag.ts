/**
 * Lag tables: on a regular grid the kernel part of the prior covariance depends only on the index
 * offset (Δix, Δiy) between two cells, so it is evaluated once per distinct offset and the dense
 * matrix is filled from the table.
 *
 * Scaled distance of one term (see ../kernels/spec.ts):
 *   isotropic    h = r / length,                    r = √(Δx² + Δy²)
 *   anisotropic  u =  cos θ Δx + sin θ Δy,  v = −sin θ Δx + cos θ Δy   (rotation by −θ)
 *                h = √((u/l1)² + (v/l2)²),          θ = angle in degrees, CCW from +x to axis 1
 *
 * Table layout: 1-D is treated as a 2-D grid with ny = 1. Entry
 *   T[(Δiy + ny − 1)·(2nx − 1) + (Δix + nx − 1)] = Σ_t variance_t ρ_t(h_t(Δix·dx, Δiy·dy))
 * for Δix ∈ [−(nx−1), nx−1], Δiy ∈ [−(ny−1), ny−1]: (2nx−1)(2ny−1) values in all.
 * Only half the offsets are evaluated; the other half is mirrored, so T(−d) = T(d) holds exactly and
 * the assembled matrix is exactly symmetric.
 */
import { correlationFunction } from '../kernels/correlation.ts';
import type { Term } from '../kernels/spec.ts';
import type { Grid } from '../grid/grid.ts';

export interface LagTable {
  readonly nx: number;
  readonly ny: number;
  /** (2nx−1)(2ny−1) covariance values; index with {@link lagIndex}. */
  readonly values: Float64Array;
}

/** Position of offset (Δix, Δiy) in a lag table. */
export function lagIndex(t: { nx: number; ny: number }, dix: number, diy: number): number {
  return (diy + t.ny - 1) * (2 * t.nx - 1) + (dix + t.nx - 1);
}

/**
 * h(Δx, Δy) for one term as a function of the physical offset. Assumes a validated term: in 1-D
 * (Δy ≡ 0) only `length` is allowed; `angle` only matters with `lengths`.
 */
export function scaledDistance(term: Term): (ox: number, oy: number) => number {
  if (term.lengths !== undefined) {
    const [l1, l2] = term.lengths;
    const theta = ((term.angle ?? 0) * Math.PI) / 180;
    const c = Math.cos(theta);
    const s = Math.sin(theta);
    return (ox, oy) => {
      const u = (c * ox + s * oy) / l1;
      const v = (-s * ox + c * oy) / l2;
      return Math.sqrt(u * u + v * v);
    };
  }
  const l = term.length;
  return (ox, oy) => Math.sqrt(ox * ox + oy * oy) / l;
}

/** Kernel-part covariance Σ_t variance_t ρ_t(h_t) for every distinct grid offset. */
export function lagTable(grid: Grid, terms: readonly Term[]): LagTable {
  const nx = grid.shape[0];
  const ny = grid.shape[1] ?? 1;
  const dx = grid.spacing[0];
  const dy = grid.spacing[1] ?? 0;
  const w = 2 * nx - 1;
  const values = new Float64Array(w * (2 * ny - 1));
  const table = { nx, ny, values };
  for (const term of terms) {
    const rho = correlationFunction(term.kernel, term.nu);
    const h = scaledDistance(term);
    const v = term.variance;
    // Offsets with Δiy > 0, or Δiy = 0 and Δix ≥ 0: one representative of each ± pair.
    for (let diy = 0; diy < ny; diy++) {
      const start = diy === 0 ? 0 : -(nx - 1);
      const oy = diy * dy;
      const row = lagIndex(table, 0, diy);
      for (let dix = start; dix < nx; dix++) values[row + dix] += v * rho(h(dix * dx, oy));
    }
  }
  // Mirror: T(−Δix, −Δiy) = T(Δix, Δiy).
  const centre = lagIndex(table, 0, 0);
  for (let k = 1; k <= centre; k++) values[centre - k] = values[centre + k];
  return table;
}

/**
 * Σ_{i,j} T(offset(i, j)) / N: the mean row sum of the kernel-part matrix, computed from the table
 * with the multiplicity (nx − |Δix|)(ny − |Δiy|) of each offset. It is 1ᵀC1/N, a lower bound on λmax
 * (Rayleigh quotient of the all-ones vector).
 */
export function meanRowSum(t: LagTable): number {
  let s = 0;
  for (let diy = -(t.ny - 1); diy < t.ny; diy++) {
    const my = t.ny - Math.abs(diy);
    for (let dix = -(t.nx - 1); dix < t.nx; dix++) {
      s += (t.nx - Math.abs(dix)) * my * t.values[lagIndex(t, dix, diy)];
    }
  }
  return s / (t.nx * t.ny);
}
