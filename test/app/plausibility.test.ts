/**
 * The plausibility warning of the Prior panel (src/app/PriorPanel.tsx plausibilityText): its words,
 * and by seeded simulation that the check it rests on (q = rᵀK⁻¹r against the central 95 % interval
 * of χ²_M) warns about 1 time in 20 when the prior and the errors are right, and always when the
 * prior is a hundred times too narrow.
 */
import { describe, expect, it } from 'vitest';
import { plausibilityText } from '../../src/app/PriorPanel.tsx';
import { posteriorSummary, preparePosterior } from '../../src/core/inverse/posterior.ts';
import { fromRows } from '../../src/core/linalg/matrix.ts';
import { applyOperator } from '../../src/core/linalg/operator.ts';
import type { PriorSpec } from '../../src/core/prior/spec.ts';
import type { Problem } from '../../src/core/problems/spec.ts';
import { Random } from '../../src/core/sampling/random.ts';
import { priorRealisations } from '../../src/core/sampling/realisations.ts';

describe('plausibility warning text', () => {
  it('is silent inside the interval and says which way and what it rests on outside', () => {
    expect(plausibilityText(20, [0.6, 1.4], 20)).toBeNull();
    expect(plausibilityText(undefined, [0.6, 1.4], 20)).toBeNull();
    const high = plausibilityText(2000, [0.6, 1.4], 20)!;
    expect(high).toContain('q/M = 100');
    expect(high).toContain('vary more than the prior');
    expect(high).toContain('follows χ²_M when the Gaussian prior and the stated data errors are right');
    const low = plausibilityText(1e-5, [0.6, 1.4], 20)!;
    expect(low).toContain('q/M = 5e-7'); // the exponent is kept
    expect(low).toContain('vary less than the prior');
  });
});

describe('the check it rests on, by simulation', () => {
  // An invented problem: 15 random averages over a 30-cell line, σ = 0.1.
  const n = 30;
  const m = 15;
  const rng = new Random(4);
  const rows = Array.from({ length: m }, () => Array.from({ length: n }, () => (rng.nextDouble() < 0.25 ? rng.nextDouble() : 0)));
  const sigma = new Float64Array(m).fill(0.1);
  const grid = { shape: [n], spacing: [1] };
  const truth: PriorSpec = { mean: { constant: 1 }, terms: [{ kernel: 'exponential', variance: 0.5, length: 4 }], nugget: 0 };
  const reps = 200;
  const draws = priorRealisations(grid, truth, reps, 77);
  const noise = new Random(8);
  const problems: Problem[] = Array.from({ length: reps }, (_, k) => {
    const base: Problem = { grid, operator: { kind: 'dense', matrix: fromRows(rows) }, data: { values: new Float64Array(m), sigma } };
    const gm = applyOperator(base.operator, draws.data.subarray(k * n, (k + 1) * n));
    return { ...base, data: { values: Float64Array.from(gm, (v) => v + 0.1 * noise.nextNormal()), sigma } };
  });
  const warnings = (prior: PriorSpec) =>
    problems.filter((p) => {
      const s = posteriorSummary(preparePosterior(p, prior));
      return plausibilityText(s.dataMisfit, s.reducedMisfitInterval95, s.dataCount) !== null;
    }).length;

  it('warns in about 5 % of datasets under the true prior (binomial 200 × 0.05: 1 to 22, ±4 sd)', () => {
    const k = warnings(truth);
    expect(k).toBeGreaterThanOrEqual(1);
    expect(k).toBeLessThanOrEqual(22);
  });

  it('warns on nearly every dataset when the prior variance is 100 times too small', () => {
    const k = warnings({ ...truth, terms: [{ ...truth.terms[0], variance: 0.005 }] });
    expect(k).toBeGreaterThanOrEqual(190);
  });
});
