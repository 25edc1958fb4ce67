/**
 * Every product of src/core/linalg/operator.ts, for a sparse G and the same G stored densely, against
 * the dense computation in Debian's numpy (test/reference/linalg_reference.py, op "operator": G built
 * from the same coordinates by numpy.add.at, then numpy's matmul). Sizes straddle the four-row sweep
 * of the symmetric sparse product (M not a multiple of 4) and the NT kernel's depth block (KC = 256).
 */
import { describe, expect, it } from 'vitest';
import { fromRows, matrix } from '../../../src/core/linalg/matrix.ts';
import {
  addOperatorRow,
  applyOperator,
  applyOperatorTranspose,
  operatorRowSubset,
  denseTimesOperatorTranspose,
  matchOperator,
  operatorAsDense,
  operatorColumnAbsSums,
  operatorEntries,
  operatorGram,
  operatorRow,
  operatorRowExtents,
  operatorShape,
  operatorTimesDense,
  operatorTimesSymmetric,
  operatorTimesTransposed,
  operatorTimesTransposedSymmetric,
  operatorToDense,
  projectCovariance,
  type Operator,
} from '../../../src/core/linalg/operator.ts';
import { denseToSparse, sparseFromCoordinates } from '../../../src/core/linalg/sparse.ts';
import { runPython } from '../../reference/python.ts';
import { randomMatrix, randomSpd, relError, seededUniform, toJson, type JsonMatrix } from './helpers.ts';

interface Reference {
  dense: JsonMatrix;
  gv: number[];
  gtu: number[];
  gx: JsonMatrix;
  gc: JsonMatrix;
  agt: JsonMatrix;
  gbt: JsonMatrix;
  gcgt: JsonMatrix;
  ggt: JsonMatrix;
  abscolsums: number[];
}

/** Seeded coordinates with about `density` of the entries set, row `emptyRow` left empty and one duplicate. */
function coordinates(m: number, n: number, density: number, emptyRow: number, seed: number) {
  const u = seededUniform(seed);
  const ri: number[] = [];
  const ci: number[] = [];
  const v: number[] = [];
  for (let i = 0; i < m; i++) {
    if (i === emptyRow) continue;
    for (let j = 0; j < n; j++) {
      if (u() > 2 * density - 1) continue;
      ri.push(i);
      ci.push(j);
      v.push(u());
    }
  }
  // A duplicate (row 0, last column), summed by both the CSR builder and numpy.add.at.
  ri.push(0, 0);
  ci.push(n - 1, n - 1);
  v.push(0.25, -1.5);
  return { ri, ci, v };
}

const isSymmetric = (a: { rows: number; data: Float64Array }) => {
  const n = a.rows;
  for (let i = 0; i < n; i++) for (let j = 0; j < i; j++) if (a.data[i * n + j] !== a.data[j * n + i]) return false;
  return true;
};

describe.each([
  { m: 7, n: 5, density: 0.5, seed: 11 },
  { m: 37, n: 300, density: 0.1, seed: 12 },
])('operator products vs numpy, M = $m, N = $n', ({ m, n, density, seed }) => {
  const { ri, ci, v } = coordinates(m, n, density, 2, seed);
  const sparse: Operator = { kind: 'sparse', matrix: sparseFromCoordinates(m, n, ri, ci, v) };
  const dense: Operator = { kind: 'dense', matrix: operatorToDense(sparse) };
  const vec = randomMatrix(1, n, seed + 1).data;
  const uvec = randomMatrix(1, m, seed + 2).data;
  const x = randomMatrix(n, 6, seed + 3);
  const c = randomSpd(n, seed + 4);
  const a = randomMatrix(5, n, seed + 5);
  const k = 9;
  const bRect = randomMatrix(k, n, seed + 6);
  const ref = runPython<{ results: Reference[] }>('linalg_reference.py', {
    cases: [
      {
        op: 'operator',
        g: { rows: m, cols: n, ri, ci, v },
        v: Array.from(vec),
        u: Array.from(uvec),
        x: toJson(x),
        c: toJson(c),
        a: toJson(a),
        // G Bᵀ for a rectangular B here; the symmetric product is checked against G C Gᵀ below.
        b: toJson(bRect),
      },
    ],
  }).results[0];
  const TOL = 1e-12;

  for (const g of [sparse, dense]) {
    describe(`${g.kind} storage`, () => {
      it('G itself, its rows and its stored entries', () => {
        expect(Array.from(operatorToDense(g).data)).toEqual(ref.dense.data);
        expect(Array.from(operatorAsDense(g).data)).toEqual(ref.dense.data);
        for (const i of [0, 2, m - 1]) expect(Array.from(operatorRow(g, i))).toEqual(ref.dense.data.slice(i * n, (i + 1) * n));
        const stored = operatorEntries(g);
        expect(stored.length).toBe(g.kind === 'dense' ? m * n : sparse.matrix.values.length);
        expect(matchOperator(g, { dense: () => 'dense', sparse: () => 'sparse' })).toBe(g.kind);
      });
      it('G v, Gᵀ u and Σ_i |G_ij|', () => {
        expect(relError(applyOperator(g, vec), ref.gv)).toBeLessThan(TOL);
        expect(relError(applyOperatorTranspose(g, uvec), ref.gtu)).toBeLessThan(TOL);
        expect(relError(operatorColumnAbsSums(g), ref.abscolsums)).toBeLessThan(TOL);
      });
      it('G X, G C (C symmetric) and A Gᵀ', () => {
        expect(relError(operatorTimesDense(g, x).data, ref.gx.data)).toBeLessThan(TOL);
        expect(relError(operatorTimesSymmetric(g, c).data, ref.gc.data)).toBeLessThan(TOL);
        expect(relError(denseTimesOperatorTranspose(a, g).data, ref.agt.data)).toBeLessThan(TOL);
      });
      it('G Bᵀ, and G (G C)ᵀ = G C Gᵀ exactly symmetric', () => {
        const gbt = operatorTimesTransposed(g, bRect);
        expect([gbt.rows, gbt.cols]).toEqual([m, k]);
        expect(relError(gbt.data, ref.gbt.data)).toBeLessThan(TOL);
        const bt = matrix(m, n, Float64Array.from(ref.gc.data));
        const K = operatorTimesTransposedSymmetric(g, bt);
        expect(relError(K.data, ref.gcgt.data)).toBeLessThan(TOL);
        expect(isSymmetric(K)).toBe(true);
        // The same rows of B chosen out of a larger B (shuffled among decoys): the same bits.
        const big = matrix(2 * m + 1, n);
        const pick = Array.from({ length: m }, (_, r) => 2 * (m - 1 - r) + 1);
        pick.forEach((row, r) => big.data.set(bt.data.subarray(r * n, (r + 1) * n), row * n));
        for (const row of [0, 2, 2 * m]) big.data.fill(1e6, row * n, (row + 1) * n);
        expect(Array.from(operatorTimesTransposedSymmetric(g, big, pick).data)).toEqual(Array.from(K.data));
        expect(() => operatorTimesTransposedSymmetric(g, big, [...pick.slice(1), 2 * m + 1])).toThrow(/row 9|row \d+ of a B/);
      });
      it('G C Gᵀ (projectCovariance) and G Gᵀ, exactly symmetric', () => {
        const p = projectCovariance(g, c);
        expect(relError(p.data, ref.gcgt.data)).toBeLessThan(TOL);
        expect(isSymmetric(p)).toBe(true);
        const gram = operatorGram(g);
        expect(relError(gram.data, ref.ggt.data)).toBeLessThan(TOL);
        expect(isSymmetric(gram)).toBe(true);
      });
      it('adds a scaled row at an offset', () => {
        const out = new Float64Array(n + 3).fill(1);
        addOperatorRow(g, 1, -2, out, 3);
        const want = [1, 1, 1, ...ref.dense.data.slice(n, 2 * n).map((gij) => 1 - 2 * gij)];
        expect(relError(out, want)).toBeLessThan(TOL);
      });
    });
  }

  it('row extents: the first and last stored column of each sparse row, every column for a dense row', () => {
    const s = operatorRowExtents(sparse);
    for (let i = 0; i < m; i++) {
      const cols = ref.dense.data.slice(i * n, (i + 1) * n).flatMap((gij, j) => (gij !== 0 ? [j] : []));
      // Row 0's duplicate may cancel to a stored zero; the extents follow the stored entries.
      const storedCols = ri.flatMap((r, q) => (r === i ? [ci[q]] : []));
      if (i === 2) expect([s.first[i], s.last[i]]).toEqual([0, -1]);
      else expect([s.first[i], s.last[i]]).toEqual([Math.min(...storedCols), Math.max(...storedCols)]);
      if (cols.length > 0) expect(s.first[i]).toBeLessThanOrEqual(cols[0]);
    }
    const d = operatorRowExtents(dense);
    expect(Array.from(d.first)).toEqual(new Array(m).fill(0));
    expect(Array.from(d.last)).toEqual(new Array(m).fill(n - 1));
  });

  it('shares a dense operator’s storage and copies a sparse one', () => {
    expect(operatorAsDense(dense)).toBe(dense.matrix);
    expect(operatorAsDense(sparse)).not.toBe(operatorAsDense(sparse));
  });
});

describe('operatorRowSubset', () => {
  it('keeps the chosen rows in their order, dense and sparse alike', () => {
    const a = fromRows([
      [1, 0, 2, 0],
      [0, 3, 0, 0],
      [4, 0, 0, 5],
      [0, 0, 6, 0],
    ]);
    for (const g of [
      { kind: 'dense' as const, matrix: a },
      { kind: 'sparse' as const, matrix: denseToSparse(a) },
    ]) {
      const sub = operatorRowSubset(g, [3, 0, 2]);
      expect(sub.kind).toBe(g.kind);
      expect(operatorShape(sub)).toEqual({ rows: 3, cols: 4 });
      expect([0, 1, 2].map((k) => Array.from(operatorRow(sub, k)))).toEqual([3, 0, 2].map((i) => Array.from(operatorRow(g, i))));
    }
  });
});
