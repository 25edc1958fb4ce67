/**
 * Test helpers for the linear-algebra suites: a tiny seeded generator and random test matrices.
 * The generator is a Weyl sequence through the MurmurHash3 32-bit finaliser (common practice, no
 * source); it only needs to give "generic" matrices, not statistics.
 */
import { matrix, type Matrix } from '../../../src/core/linalg/matrix.ts';

/** Uniform numbers in [−1, 1) from a 32-bit seed. */
export function seededUniform(seed: number): () => number {
  let s = seed >>> 0;
  return () => {
    s = (s + 0x9e3779b9) >>> 0;
    let z = s;
    z = Math.imul(z ^ (z >>> 16), 0x85ebca6b) >>> 0;
    z = Math.imul(z ^ (z >>> 13), 0xc2b2ae35) >>> 0;
    z = (z ^ (z >>> 16)) >>> 0;
    return z / 2 ** 31 - 1;
  };
}

export function randomMatrix(rows: number, cols: number, seed: number): Matrix {
  const u = seededUniform(seed);
  const m = matrix(rows, cols);
  for (let i = 0; i < m.data.length; i++) m.data[i] = u();
  return m;
}

/** Random symmetric (generally indefinite) n × n matrix, both triangles filled. */
export function randomSymmetric(n: number, seed: number): Matrix {
  const u = seededUniform(seed);
  const m = matrix(n, n);
  for (let i = 0; i < n; i++) {
    for (let j = 0; j <= i; j++) {
      const v = u();
      m.data[i * n + j] = v;
      m.data[j * n + i] = v;
    }
  }
  return m;
}

/** Random SPD matrix B Bᵀ / n + I (eigenvalues in [1, ~n/3 + 1]), both triangles filled. */
export function randomSpd(n: number, seed: number): Matrix {
  const b = randomMatrix(n, n, seed);
  const a = matrix(n, n);
  for (let i = 0; i < n; i++) {
    for (let j = 0; j <= i; j++) {
      let s = 0;
      for (let k = 0; k < n; k++) s += b.data[i * n + k] * b.data[j * n + k];
      s /= n;
      if (i === j) s += 1;
      a.data[i * n + j] = s;
      a.data[j * n + i] = s;
    }
  }
  return a;
}

/** Copy of `a` whose strict upper triangle is filled with NaN (to prove a routine reads only the lower one). */
export function poisonUpper(a: Matrix): Matrix {
  const n = a.cols;
  const out = matrix(a.rows, a.cols, a.data.slice());
  for (let i = 0; i < a.rows; i++) for (let j = i + 1; j < n; j++) out.data[i * n + j] = Number.NaN;
  return out;
}

/** Max |x − y| / max(1, max |y|) over all elements: relative to the reference's scale. */
export function relError(x: ArrayLike<number>, y: ArrayLike<number>): number {
  if (x.length !== y.length) return Number.POSITIVE_INFINITY;
  let scale = 1;
  for (let i = 0; i < y.length; i++) scale = Math.max(scale, Math.abs(y[i]));
  let err = 0;
  for (let i = 0; i < x.length; i++) {
    const d = Math.abs(x[i] - y[i]);
    err = Math.max(err, Number.isNaN(d) ? Number.POSITIVE_INFINITY : d);
  }
  return err / scale;
}

export interface JsonMatrix {
  rows: number;
  cols: number;
  data: number[];
}

export function toJson(a: Matrix): JsonMatrix {
  return { rows: a.rows, cols: a.cols, data: Array.from(a.data) };
}
