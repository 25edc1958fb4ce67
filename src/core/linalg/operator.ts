/**
 * The forward operator G (M data × N cells): dense or sparse, behind one set of products.
 */
import { assertNever } from '../errors.ts';
import { matrix, type Matrix } from './matrix.ts';
import { denseTimesSparseTranspose, sparseTimesDense, type SparseMatrix } from './sparse.ts';
import { multiply, multiplyNT } from './products.ts';

export type Operator =
  | { readonly kind: 'dense'; readonly matrix: Matrix }
  | { readonly kind: 'sparse'; readonly matrix: SparseMatrix };

export function operatorShape(g: Operator): { rows: number; cols: number } {
  return { rows: g.matrix.rows, cols: g.matrix.cols };
}

/** y = G x. */
export function applyOperator(g: Operator, x: ArrayLike<number>): Float64Array {
  const out = new Float64Array(g.matrix.rows);
  switch (g.kind) {
    case 'dense': {
      const { rows, cols, data } = g.matrix;
      for (let i = 0; i < rows; i++) {
        let s = 0;
        const o = i * cols;
        for (let j = 0; j < cols; j++) s += data[o + j]! * x[j]!;
        out[i] = s;
      }
      return out;
    }
    case 'sparse': {
      const { rows, rowPtr, colIdx, values } = g.matrix;
      for (let i = 0; i < rows; i++) {
        let s = 0;
        for (let p = rowPtr[i]!; p < rowPtr[i + 1]!; p++) s += values[p]! * x[colIdx[p]!]!;
        out[i] = s;
      }
      return out;
    }
    default:
      return assertNever(g);
  }
}

/** y = Gᵀ x. */
export function applyOperatorTranspose(g: Operator, x: ArrayLike<number>): Float64Array {
  const out = new Float64Array(g.matrix.cols);
  switch (g.kind) {
    case 'dense': {
      const { rows, cols, data } = g.matrix;
      for (let i = 0; i < rows; i++) {
        const xi = x[i]!;
        const o = i * cols;
        for (let j = 0; j < cols; j++) out[j] += data[o + j]! * xi;
      }
      return out;
    }
    case 'sparse': {
      const { rows, rowPtr, colIdx, values } = g.matrix;
      for (let i = 0; i < rows; i++) {
        const xi = x[i]!;
        for (let p = rowPtr[i]!; p < rowPtr[i + 1]!; p++) out[colIdx[p]!] += values[p]! * xi;
      }
      return out;
    }
    default:
      return assertNever(g);
  }
}

/** Row i of G as a dense vector of length N. */
export function operatorRow(g: Operator, i: number): Float64Array {
  switch (g.kind) {
    case 'dense':
      return g.matrix.data.slice(i * g.matrix.cols, (i + 1) * g.matrix.cols);
    case 'sparse': {
      const out = new Float64Array(g.matrix.cols);
      const { rowPtr, colIdx, values } = g.matrix;
      for (let p = rowPtr[i]!; p < rowPtr[i + 1]!; p++) out[colIdx[p]!] += values[p]!;
      return out;
    }
    default:
      return assertNever(g);
  }
}

/** G as a dense M × N matrix (a copy). */
export function operatorToDense(g: Operator): Matrix {
  const { rows, cols } = g.matrix;
  const out = matrix(rows, cols);
  for (let i = 0; i < rows; i++) out.data.set(operatorRow(g, i), i * cols);
  return out;
}

/** G X for X dense N × k (M × k result). */
export function operatorTimesDense(g: Operator, x: Matrix): Matrix {
  switch (g.kind) {
    case 'dense':
      return multiply(g.matrix, x);
    case 'sparse':
      return sparseTimesDense(g.matrix, x);
    default:
      return assertNever(g);
  }
}

/** A Gᵀ for A dense r × N (r × M result), e.g. B = Cm Gᵀ. */
export function denseTimesOperatorTranspose(a: Matrix, g: Operator): Matrix {
  switch (g.kind) {
    case 'dense':
      return multiplyNT(a, g.matrix);
    case 'sparse':
      return denseTimesSparseTranspose(a, g.matrix);
    default:
      return assertNever(g);
  }
}
