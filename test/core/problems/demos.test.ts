import { describe, expect, it } from 'vitest';
import { cellCount } from '../../../src/core/grid/grid.ts';
import { chiSquareQuantile } from '../../../src/core/inverse/chisquare.ts';
import { cholesky, solveLower } from '../../../src/core/linalg/cholesky.ts';
import { applyOperator } from '../../../src/core/linalg/operator.ts';
import { DEMOS, DEMO_IDS, demoById } from '../../../src/core/problems/demos.ts';
import { covarianceMatrix, meanVector } from '../../../src/core/prior/covariance.ts';

const built = new Map(DEMOS.map((d) => [d.id, d.build()]));

describe('demo problems', () => {
  it('has the four stable ids', () => {
    expect(DEMO_IDS).toEqual(['borehole-log', 'crosshole-tomography', 'potential-field', 'three-boreholes']);
  });
  it('demoById returns the demo and names the known ids otherwise', () => {
    expect(demoById('potential-field').id).toBe('potential-field');
    expect(() => demoById('nope')).toThrow(
      'demo must be one of "borehole-log", "crosshole-tomography", "potential-field", "three-boreholes", got "nope"',
    );
  });
  it.each(DEMOS.map((d) => [d.id, d] as const))('%s is deterministic and consistent in size', (id, demo) => {
    const a = built.get(id)!;
    const b = demo.build();
    expect(Array.from(b.problem.data.values)).toEqual(Array.from(a.problem.data.values));
    expect(Array.from(b.problem.truth!)).toEqual(Array.from(a.problem.truth!));
    const { problem } = a;
    const n = cellCount(problem.grid);
    expect(problem.operator.matrix.cols).toBe(n);
    expect(problem.truth!.length).toBe(n);
    expect(problem.data.values.length).toBe(problem.operator.matrix.rows);
    expect(problem.data.sigma!.length).toBe(problem.operator.matrix.rows);
    expect(a.startPrior).not.toEqual(a.truthPrior);
  });
  it('sizes are the advertised ones', () => {
    const size = (id: string) => [cellCount(built.get(id)!.problem.grid), built.get(id)!.problem.data.values.length];
    expect(size('borehole-log')).toEqual([200, 50]);
    expect(size('crosshole-tomography')).toEqual([1024, 256]);
    expect(size('potential-field')).toEqual([800, 40]);
  });

  // The synthetic truth is a draw from truthPrior and the data noise is N(0, σ²): the whitened
  // quantities are standard normal, so their sums of squares are χ² with N (resp. M) degrees of
  // freedom. Two-sided 99.9% limits from our χ² quantile (itself checked against NIST and scipy).
  it.each(DEMOS.map((d) => [d.id] as const))('%s: whitened truth and noise pass a χ² test', (id) => {
    const { problem, truthPrior } = built.get(id)!;
    const C = covarianceMatrix(problem.grid, truthPrior);
    const f = cholesky(C);
    expect(f.ok).toBe(true);
    if (!f.ok) return;
    const m0 = meanVector(problem.grid, truthPrior);
    const z = solveLower(
      f.factor,
      problem.truth!.map((v, i) => v - m0[i]),
    );
    const n = z.length;
    const sz = z.reduce((s, v) => s + v * v, 0);
    expect(sz).toBeGreaterThan(chiSquareQuantile(0.0005, n));
    expect(sz).toBeLessThan(chiSquareQuantile(0.9995, n));
    const pred = applyOperator(problem.operator, problem.truth!);
    const m = pred.length;
    let se = 0;
    for (let k = 0; k < m; k++) se += ((problem.data.values[k] - pred[k]) / problem.data.sigma![k]) ** 2;
    expect(se).toBeGreaterThan(chiSquareQuantile(0.0005, m));
    expect(se).toBeLessThan(chiSquareQuantile(0.9995, m));
  });
  it('borehole sensor windows are normalised averages', () => {
    const { problem } = built.get('borehole-log')!;
    const ones = new Float64Array(200).fill(1);
    applyOperator(problem.operator, ones).forEach((v) => expect(v).toBeCloseTo(1, 14));
  });
});
