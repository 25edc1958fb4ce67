/**
 * Lag tables: on a regular grid the kernel part of the prior covariance depends only on the index
 * offset (Δix, Δiy, Δiz) between two cells, so it is evaluated once per distinct offset and the dense
 * matrix is filled from the table.
 *
 * Scaled distance of one term (see ../kernels/spec.ts):
 *   isotropic    h = r / length,                    r = √(Δx² + Δy²)
 *   anisotropic  u =  cos θ Δx + sin θ Δy,  v = −sin θ Δx + cos θ Δy   (rotation by −θ)
 *                h = √((u/l1)² + (v/l2)²),          θ = angle in degrees, CCW from +x to axis 1
 *   3-D          (u, v, w) = Rᵀ(Δx, Δy, Δz),  R = Rz(a1)·Ry(a2)·Rx(a3)  (angles [a1, a2, a3] in degrees)
 *                h = √((u/l1)² + (v/l2)² + (w/l3)²); the columns of R are the principal axes. With
 *                a2 = a3 = 0 and Δz = 0 this is the 2-D form with θ = a1.
 *
 * Table layout: 1-D and 2-D are treated as 3-D grids with ny = 1 and nz = 1. Entry
 *   T[((Δiz + nz − 1)·(2ny − 1) + (Δiy + ny − 1))·(2nx − 1) + (Δix + nx − 1)]
 *     = Σ_t variance_t ρ_t(h_t(Δix·dx, Δiy·dy, Δiz·dz))
 * for Δix ∈ [−(nx−1), nx−1], Δiy ∈ [−(ny−1), ny−1], Δiz ∈ [−(nz−1), nz−1]: (2nx−1)(2ny−1)(2nz−1) values.
 * Only half the offsets are evaluated; the other half is mirrored, so T(−d) = T(d) holds exactly and
 * the assembled matrix is exactly symmetric.
 */
import { correlationFunction } from '../kernels/correlation.ts';
import type { Term } from '../kernels/spec.ts';
import type { Grid } from '../grid/grid.ts';

export interface LagTable {
  readonly nx: number;
  readonly ny: number;
  /** 1 below 3-D. */
  readonly nz: number;
  /** (2nx−1)(2ny−1)(2nz−1) covariance values; index with {@link lagIndex}. */
  readonly values: Float64Array;
}

/** Position of offset (Δix, Δiy, Δiz) in a lag table. */
export function lagIndex(t: { nx: number; ny: number; nz?: number }, dix: number, diy: number, diz = 0): number {
  return ((diz + (t.nz ?? 1) - 1) * (2 * t.ny - 1) + (diy + t.ny - 1)) * (2 * t.nx - 1) + (dix + t.nx - 1);
}

/** R = Rz(a1)·Ry(a2)·Rx(a3) (degrees), row-major 3 × 3; its columns are the principal axes. */
export function rotation3(angles: readonly number[]): number[] {
  const [a, b, g] = angles.map((d) => (d * Math.PI) / 180);
  const [ca, sa, cb, sb, cg, sg] = [Math.cos(a), Math.sin(a), Math.cos(b), Math.sin(b), Math.cos(g), Math.sin(g)];
  const rz = [ca, -sa, 0, sa, ca, 0, 0, 0, 1];
  const ry = [cb, 0, sb, 0, 1, 0, -sb, 0, cb];
  const rx = [1, 0, 0, 0, cg, -sg, 0, sg, cg];
  const mul = (p: number[], q: number[]) =>
    Array.from(
      { length: 9 },
      (_, k) =>
        p[3 * Math.floor(k / 3)] * q[k % 3] + p[3 * Math.floor(k / 3) + 1] * q[3 + (k % 3)] + p[3 * Math.floor(k / 3) + 2] * q[6 + (k % 3)],
    );
  return mul(mul(rz, ry), rx);
}

/**
 * h(Δx, Δy) for one term as a function of the physical offset. Assumes a validated term: in 1-D
 * (Δy ≡ 0) only `length` is allowed; `angle` only matters with `lengths`.
 */
export function scaledDistance(term: Term): (ox: number, oy: number, oz?: number) => number {
  if (term.lengths !== undefined && term.lengths.length === 3) {
    const [l1, l2, l3] = term.lengths;
    const r = rotation3(term.angles ?? [0, 0, 0]);
    return (ox, oy, oz = 0) => {
      // (u, v, w) = Rᵀ(Δx, Δy, Δz): component k is column k of R dotted with the offset.
      const u = (r[0] * ox + r[3] * oy + r[6] * oz) / l1;
      const v = (r[1] * ox + r[4] * oy + r[7] * oz) / l2;
      const w = (r[2] * ox + r[5] * oy + r[8] * oz) / l3;
      return Math.sqrt(u * u + v * v + w * w);
    };
  }
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
  return (ox, oy, oz = 0) => Math.sqrt(ox * ox + oy * oy + oz * oz) / l;
}

/** Kernel-part covariance Σ_t variance_t ρ_t(h_t) for every distinct grid offset. */
export function lagTable(grid: Grid, terms: readonly Term[]): LagTable {
  const parts = terms.map((term) => ({ rho: correlationFunction(term.kernel, term.nu), h: scaledDistance(term), v: term.variance }));
  return offsetTable(grid, (ox, oy, oz) => {
    let s = 0;
    for (const p of parts) s += p.v * p.rho(p.h(ox, oy, oz));
    return s;
  });
}

/** An even function of the physical offset, f(−o) = f(o), as a covariance of the offset alone. */
export type OffsetFunction = (ox: number, oy: number, oz: number) => number;

/**
 * The table of an even function of the offset over every distinct grid offset (layout of {@link LagTable}):
 * evaluated on one representative of each ± pair and mirrored, so T(−d) = T(d) exactly. {@link lagTable} is
 * the prior's kernel part; ../tuning/termDerivative.ts tabulates derivatives of one term the same way.
 */
export function offsetTable(grid: Grid, f: OffsetFunction): LagTable {
  const nx = grid.shape[0];
  const ny = grid.shape[1] ?? 1;
  const nz = grid.shape[2] ?? 1;
  const dx = grid.spacing[0];
  const dy = grid.spacing[1] ?? 0;
  const dz = grid.spacing[2] ?? 0;
  const w = 2 * nx - 1;
  const values = new Float64Array(w * (2 * ny - 1) * (2 * nz - 1));
  const table = { nx, ny, nz, values };
  // Offsets with Δiz > 0, or Δiz = 0 and (Δiy > 0, or Δiy = 0 and Δix ≥ 0): one representative of each ± pair.
  for (let diz = 0; diz < nz; diz++) {
    const oz = diz * dz;
    for (let diy = diz === 0 ? 0 : -(ny - 1); diy < ny; diy++) {
      const start = diz === 0 && diy === 0 ? 0 : -(nx - 1);
      const oy = diy * dy;
      const row = lagIndex(table, 0, diy, diz);
      for (let dix = start; dix < nx; dix++) values[row + dix] = f(dix * dx, oy, oz);
    }
  }
  // Mirror: T(−Δix, −Δiy, −Δiz) = T(Δix, Δiy, Δiz).
  const centre = lagIndex(table, 0, 0, 0);
  for (let k = 1; k <= centre; k++) values[centre - k] = values[centre + k];
  return table;
}

/**
 * Σ_{i,j} T(offset(i, j)) / N: the mean row sum of the kernel-part matrix, computed from the table
 * with the multiplicity (nx − |Δix|)(ny − |Δiy|)(nz − |Δiz|) of each offset. It is 1ᵀC1/N, a lower bound on λmax
 * (Rayleigh quotient of the all-ones vector).
 */
export function meanRowSum(t: LagTable): number {
  let s = 0;
  for (let diz = -(t.nz - 1); diz < t.nz; diz++) {
    const mz = t.nz - Math.abs(diz);
    for (let diy = -(t.ny - 1); diy < t.ny; diy++) {
      const my = t.ny - Math.abs(diy);
      for (let dix = -(t.nx - 1); dix < t.nx; dix++) {
        s += (t.nx - Math.abs(dix)) * my * mz * t.values[lagIndex(t, dix, diy, diz)];
      }
    }
  }
  return s / (t.nx * t.ny * t.nz);
}
