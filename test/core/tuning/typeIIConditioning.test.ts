/**
 * Best by evidence stays where priors are usable. Reproduction: the borehole demo with
 * its truth prior's linear-trend mean and a Gaussian kernel with a free nugget: the unbounded search
 * drove the nugget to about 1e-13 and a condition number of 5e12 (above the workbench's 1e10). The
 * optimum must now pass the workbench's own check (diagnosePrior: Cholesky + all eigenvalues,
 * itself checked against numpy in test/reference/prior_diagnostics.test.ts) with κ ≤ 1e10, or say why not.
 * The nugget floor B/(1e10 − 1) rests on B ≥ λmax of the kernel part (Gershgorin), checked here
 * against the exact eigenvalues of the dense matrices.
 */
import { describe, expect, it } from 'vitest';
import { symmetricEigenvalues } from '../../../src/core/linalg/eigen.ts';
import { covarianceMatrix } from '../../../src/core/prior/covariance.ts';
import { diagnosePrior, NEAR_SINGULAR_CONDITION } from '../../../src/core/prior/diagnostics.ts';
import type { PriorSpec } from '../../../src/core/prior/spec.ts';
import { demoById } from '../../../src/core/problems/demos.ts';
import type { Problem } from '../../../src/core/problems/spec.ts';
import type { Grid } from '../../../src/core/grid/grid.ts';
import { Random } from '../../../src/core/sampling/random.ts';
import { diagnosePriorAuto } from '../../../src/core/prior/structuredDiagnostics.ts';
import { pointOperator } from './helpers.ts';
import { conditioningNuggetFloor, kernelEigenvalueBound, maximiseEvidence, NU_MAX, NU_MIN } from '../../../src/core/tuning/typeII.ts';

const { problem, truthPrior, startPrior } = demoById('borehole-log').build();
const gaussian: PriorSpec = { ...truthPrior, terms: [{ kernel: 'gaussian', variance: 0.04, length: 5 }], nugget: 1e-6 };

describe('best by evidence with a free nugget on a Gaussian prior', () => {
  const r = maximiseEvidence(problem, gaussian);
  it('the optimum passes the workbench check: Cm factors and κ ≤ 1e10 (it was 5e12 with a nugget of 1e-13)', () => {
    const d = diagnosePrior(problem.grid, r.prior);
    expect(d.positiveDefinite).toBe(true);
    expect(d.conditionNumber).toBeLessThanOrEqual(NEAR_SINGULAR_CONDITION);
    expect(r.conditioning.usable).toBe(true);
    expect(Math.abs(r.conditioning.conditionNumber / d.conditionNumber - 1)).toBeLessThan(1e-6);
  });
  it('it stops on the nugget floor, says so, and gives the other parameters standard errors', () => {
    expect(r.converged).toBe(true);
    expect(r.conditioning.nuggetAtFloor).toBe(true);
    const floor = conditioningNuggetFloor(problem.grid, r.prior);
    expect(r.prior.nugget!).toBeGreaterThanOrEqual(floor);
    expect(r.prior.nugget!).toBeLessThanOrEqual(floor * (1 + 1e-6));
    expect(r.note).toMatch(/evidence keeps rising as the nugget falls.*within 1e10/);
    const se = Object.fromEntries(r.parameters.map((p) => [p.name, p.standardError]));
    expect(Number.isNaN(se.nugget)).toBe(true);
    expect(se['terms[0].variance']).toBeGreaterThan(0);
    expect(se['terms[0].length']).toBeGreaterThan(0);
    // Along the floor the evidence is stationary in the free coordinates.
    r.parameters.forEach((p, k) => {
      if (p.name !== 'nugget') expect(Math.abs(r.gradient[k])).toBeLessThan(1e-3);
    });
  });
  it('holding a tiny nugget fixed leaves nothing to bound the search: the result says it is not usable and why', () => {
    const held = maximiseEvidence(problem, { ...gaussian, nugget: 1e-13 }, { fixed: ['nugget'] });
    expect(held.conditioning.usable).toBe(false);
    expect(held.note).toMatch(/nearly singular|does not factor/);
    expect(held.note).toMatch(/free the nugget/);
  });
  it('an optimum away from the floor is unchanged in kind (constant mean: nugget 6.9e-4): not on the floor, nugget with a standard error', () => {
    const inner = maximiseEvidence(problem, { ...startPrior, terms: [{ kernel: 'gaussian', variance: 0.25, length: 10 }] });
    expect(inner.conditioning.nuggetAtFloor).toBe(false);
    expect(inner.conditioning.usable).toBe(true);
    expect(inner.note).toBeUndefined();
    expect(inner.prior.nugget!).toBeGreaterThan(1e3 * conditioningNuggetFloor(problem.grid, inner.prior));
    expect(inner.parameters.find((p) => p.name === 'nugget')!.standardError).toBeGreaterThan(0);
  });
});

describe('the nugget floor B/(1e10 − 1)', () => {
  const grid1 = problem.grid;
  const grid2 = { shape: [12, 9] as [number, number], spacing: [1, 2] as [number, number] };
  const cases: [string, typeof grid1, PriorSpec][] = [
    ['1-D Gaussian', grid1, { mean: { constant: 0 }, terms: [{ kernel: 'gaussian', variance: 2, length: 4 }] }],
    [
      '1-D exponential + Gaussian',
      grid1,
      {
        mean: { constant: 0 },
        terms: [
          { kernel: 'exponential', variance: 1, length: 30 },
          { kernel: 'gaussian', variance: 0.5, length: 2 },
        ],
      },
    ],
    [
      '2-D anisotropic Gaussian with a std profile',
      grid2,
      {
        mean: { constant: 0 },
        terms: [{ kernel: 'gaussian', variance: 1, lengths: [6, 3], angle: 25 }],
        stdProfile: Array.from({ length: 108 }, (_, i) => 0.5 + (i % 7) / 4),
      },
    ],
  ];
  it.each(cases)('%s: B bounds λmax of the kernel part, and with the floor nugget κ ≤ 1e10', (_, grid, prior) => {
    const ev = symmetricEigenvalues(covarianceMatrix(grid, prior));
    const lmax = ev[ev.length - 1];
    expect(kernelEigenvalueBound(grid, prior)).toBeGreaterThanOrEqual(lmax * (1 - 1e-12));
    const floor = conditioningNuggetFloor(grid, prior);
    const d = diagnosePrior(grid, { ...prior, nugget: floor });
    expect(d.positiveDefinite).toBe(true);
    expect(d.conditionNumber).toBeLessThanOrEqual(NEAR_SINGULAR_CONDITION);
  });
});

/** 50 seeded point data on a 40 × 30 grid (above the dense tuning limit: the FFT / lag-table route), Matérn 3/2 start with a nugget. */
function pointSurvey(): { grid: Grid; problem: Problem; start: PriorSpec } {
  const rng = new Random(3);
  const grid: Grid = { shape: [40, 30], spacing: [1, 1] };
  const idx = Array.from({ length: 50 }, () => Math.floor(rng.nextDouble() * 1200));
  const problem: Problem = {
    grid,
    operator: pointOperator(idx, 1200),
    data: { values: Float64Array.from(idx, (_, i) => Math.cos(i / 4) + 0.2 * rng.nextNormal()), sigma: new Float64Array(50).fill(0.3) },
  };
  const start: PriorSpec = { mean: { constant: 0 }, terms: [{ kernel: 'matern', nu: 1.5, variance: 1, length: 4 }], nugget: 0.01 };
  return { grid, problem, start };
}

describe('the conditioning check of an FFT-route optimum', () => {
  it('settled by the certified bracket alone, it equals the full diagnosis (verdict, decided by the bracket, κ bound)', () => {
    const { grid, problem, start } = pointSurvey();
    const fit = maximiseEvidence(problem, start, { fixed: ['terms[0].nu'] });
    const full = diagnosePriorAuto(grid, fit.prior);
    expect(full.decidedBy).toBe('fft-bracket');
    expect(fit.conditioning.verdict).toBe(full.verdict);
    expect(fit.conditioning.conditionNumber).toBe(full.conditionUpperBound);
    expect(fit.conditioning.usable).toBe(true);
  });
});

describe('a free Matérn ν stays in its default range', () => {
  it('on data that keep favouring smoother fields, ν stops at NU_MAX, says so, and the fit ends promptly', () => {
    const { problem, start } = pointSurvey();
    const fit = maximiseEvidence(problem, start);
    const nu = fit.parameters.find((p) => p.name === 'terms[0].nu')!;
    expect(nu.value).toBeLessThanOrEqual(NU_MAX * (1 + 1e-12));
    expect(nu.value).toBeGreaterThanOrEqual(NU_MIN);
    // Before the bound ν ran past 19 in 50 steps and the fit did not finish within minutes.
    expect(nu.atBound).toBe('high');
  });
});
