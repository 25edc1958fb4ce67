/**
 * Analytic derivatives for the type-II gradient (src/core/tuning/termDerivative.ts):
 * - dρ/dh of every kernel against central differences of ρ, and the Matérn derivative at general ν against
 *   scipy.special.kv (test/reference/kernel_derivative.py, DLMF 10.29.4);
 * - the evidence gradient in lengths and angle against central differences of the log evidence itself on the
 *   dense, lag-table and FFT routes (the derivative projected by each; they agree to 1e-10).
 */
import { describe, expect, it } from 'vitest';
import { correlationDerivative, correlationFunction } from '../../../src/core/kernels/correlation.ts';
import { KERNEL_NAMES, type KernelName } from '../../../src/core/kernels/table.ts';
import type { Grid } from '../../../src/core/grid/grid.ts';
import type { PriorSpec } from '../../../src/core/prior/spec.ts';
import type { Problem } from '../../../src/core/problems/spec.ts';
import { Random } from '../../../src/core/sampling/random.ts';
import { prepareDataSide, type RouteOptions, sideOffsetProjection } from '../../../src/core/tuning/dataSpace.ts';
import { termDerivative } from '../../../src/core/tuning/termDerivative.ts';
import {
  applyHyperParameters,
  evidenceGradient,
  hyperParameters,
  hyperParameterVector,
  logEvidence,
} from '../../../src/core/tuning/typeII.ts';
import { runPython } from '../../reference/python.ts';
import { pointOperator } from './helpers.ts';
import { rayOperator } from '../../../src/core/problems/rays.ts';

const NUS = [0.3, 0.5, 0.8, 1, 1.2, 1.5, 2.5, 2.7, 7.3];
const HS = [1e-3, 0.05, 0.3, 0.7, 1, 1.6, 3, 6];

describe('dρ/dh from the kernel table', () => {
  const cases: [KernelName, number | undefined][] = KERNEL_NAMES.flatMap((k): [KernelName, number | undefined][] =>
    k === 'matern' ? NUS.map((nu) => [k, nu]) : [[k, undefined]],
  );
  it.each(cases)('%s (ν %s) equals a central difference of ρ', (kernel, nu) => {
    const rho = correlationFunction(kernel, nu);
    const d = correlationDerivative(kernel, nu);
    for (const h of HS) {
      if (kernel === 'spherical' && Math.abs(h - 1) < 1e-3) continue; // kink of ρ' at 1 (ρ' itself is continuous)
      const e = 1e-6 * Math.max(h, 1e-2);
      const fd = (rho(h + e) - rho(h - e)) / (2 * e);
      expect(Math.abs(d(h) - fd)).toBeLessThanOrEqual(1e-6 * Math.max(1, Math.abs(fd)));
    }
  });

  it('Matérn at general ν equals −√(2ν) 2^{1−ν}/Γ(ν) z^ν K_{ν−1}(z) from scipy.special.kv', () => {
    const ref = runPython<{ values: number[][] }>('kernel_derivative.py', { nus: NUS, hs: HS });
    NUS.forEach((nu, i) => {
      const d = correlationDerivative('matern', nu);
      HS.forEach((h, j) => {
        const want = ref.values[i]![j]!;
        expect(Math.abs(d(h) - want)).toBeLessThanOrEqual(1e-11 * Math.max(1e-300, Math.abs(want)) + 1e-300);
      });
    });
  });

  it('the term derivative vanishes at offset 0, and along the angle when the two lengths are equal', () => {
    const t = { kernel: 'matern' as const, nu: 0.3, variance: 2, lengths: [3, 3] as [number, number], angle: 40 };
    expect(termDerivative(t, 'lengths0')(0, 0, 0)).toBe(0);
    expect(termDerivative(t, 'angle')(1.3, -0.4, 0)).toBeCloseTo(0, 14);
    expect(termDerivative({ kernel: 'exponential', variance: 1, length: 2 }, 'length')(0, 0, 0)).toBe(0);
    // log l1 + log l2 derivatives add up to the isotropic log-length derivative when l1 = l2.
    const iso = termDerivative({ kernel: 'matern', nu: 0.3, variance: 2, length: 3 }, 'length')(1.3, -0.4, 0);
    const sum = termDerivative(t, 'lengths0')(1.3, -0.4, 0) + termDerivative(t, 'lengths1')(1.3, -0.4, 0);
    expect(sum).toBeCloseTo(iso, 13);
  });
});

/**
 * Gradient against central differences of log p(d): step 1e-5, error ≈ 1e-9 (common practice, no source). The
 * spherical kernel's ρ' has a kink at h = 1, so along a spherical term's length the central difference converges
 * only like O(step) (1.5e-6 at step 1e-5 here, shrinking tenfold per tenfold step): there step 1e-7, tolerance 1e-5.
 */
function checkGradient(problem: Problem, prior: PriorSpec, options: RouteOptions = {}): void {
  const params = hyperParameters(prior);
  const theta = hyperParameterVector(prior, params);
  const { gradient } = evidenceGradient(problem, prior, params, prepareDataSide(problem, options));
  params.forEach((p, j) => {
    const kinked = p.term !== null && prior.terms[p.term]!.kernel === 'spherical' && p.field !== 'variance';
    const h = kinked ? 1e-7 : 1e-5;
    const tp = Float64Array.from(theta);
    const tm = Float64Array.from(theta);
    tp[j]! += h;
    tm[j]! -= h;
    const at = (t: Float64Array) => logEvidence(problem, applyHyperParameters(prior, params, t), options);
    const fd = (at(tp) - at(tm)) / (2 * h);
    expect(Math.abs(gradient[j]! - fd), p.name).toBeLessThanOrEqual((kinked ? 1e-5 : 1e-6) * Math.max(1, Math.abs(fd)));
  });
}

describe('evidence gradient in lengths and angle', () => {
  const grid: Grid = { shape: [40, 30], spacing: [1, 1.5] };
  const n = 1200;
  const rng = new Random(11);
  const idx = Array.from({ length: 60 }, () => Math.floor(rng.nextDouble() * n));
  const values = Float64Array.from(idx, (_, i) => Math.sin(i / 3) + 0.3 * rng.nextNormal());
  const sigma = new Float64Array(60).fill(0.4);
  const points: Problem = { grid, operator: pointOperator(idx, n), data: { values, sigma } };
  const priors: [string, PriorSpec][] = [
    ['isotropic Matérn 3/2', { mean: { constant: 0 }, terms: [{ kernel: 'matern', nu: 1.5, variance: 1.2, length: 5 }], nugget: 0.01 }],
    [
      'rotated anisotropic Matérn ν = 0.8 plus a spherical term',
      {
        mean: { constant: 0.1 },
        terms: [
          { kernel: 'matern', nu: 0.8, variance: 0.9, lengths: [7, 2.5], angle: 35 },
          { kernel: 'spherical', variance: 0.3, length: 12 },
        ],
      },
    ],
    [
      'rotated anisotropic Gaussian',
      { mean: { constant: 0 }, terms: [{ kernel: 'gaussian', variance: 1, lengths: [4, 9], angle: -20 }], nugget: 0.05 },
    ],
  ];
  it.each(priors)('point data on the lag-table route, %s: analytic gradient equals central differences of log p(d)', (_n, prior) => {
    checkGradient(points, prior);
  });

  it('path data: the derivative projection is the same on the dense, lag-table and FFT routes, and the gradient equals central differences on each', () => {
    const operator = rayOperator(
      grid,
      Array.from({ length: 12 }, (_, i) => ({ from: [0, 2 + 3.5 * i] as const, to: [39, 42 - 3.5 * i] as const })),
    );
    const d = Float64Array.from({ length: 12 }, (_, i) => 3 + Math.cos(i));
    const rays: Problem = { grid, operator, data: { values: d, sigma: new Float64Array(12).fill(0.5) } };
    const prior = priors[1]![1];
    // Under `auto` these few short paths take the lag table; the FFT route is asked for by name. Both are analytic:
    // the derivative table by the dense/lag routes, circulant products of the derivative's embedding on the FFT one.
    const f = termDerivative(prior.terms[0]!, 'angle');
    const viaLag = sideOffsetProjection(prepareDataSide(rays), prior, f);
    const viaFft = sideOffsetProjection(prepareDataSide(rays, { route: 'fft' }), prior, f);
    const viaDense = sideOffsetProjection(prepareDataSide(rays, { route: 'dense' }), prior, f);
    for (let k = 0; k < viaDense.data.length; k++) {
      const tol = 1e-10 * Math.max(...viaDense.data.map(Math.abs));
      expect(Math.abs(viaLag.data[k]! - viaDense.data[k]!)).toBeLessThan(tol);
      expect(Math.abs(viaFft.data[k]! - viaDense.data[k]!)).toBeLessThan(tol);
    }
    checkGradient(rays, prior);
    checkGradient(rays, prior, { route: 'fft' });
    checkGradient(rays, prior, { route: 'dense' });
  });
});
