/** The number of realisations one request may ask for: as many as the export wants, up to 2²⁴ numbers in all. */
import { describe, expect, it } from 'vitest';
import { Engine, MAX_DRAW_NUMBERS } from '../../src/worker/engine.ts';
import { priorRealisations } from '../../src/core/sampling/realisations.ts';
import { PRIOR, profileProblem, sameBits } from './problems.ts';

describe('Engine: realisations for the export', () => {
  it('returns 200 prior draws (draws × cells), the same numbers as the core for that seed', async () => {
    const engine = new Engine();
    const problem = profileProblem(100, 'diagonal');
    await engine.handle({ id: 1, kind: 'setProblem', version: 1, problem });
    const d = await engine.handle({ id: 2, kind: 'priorDraws', problemVersion: 1, prior: PRIOR, count: 200, seed: 5 }, () => {});
    expect([d.rows, d.cols]).toEqual([200, 100]);
    expect(sameBits(d.data, priorRealisations(problem.grid, PRIOR, 200, 5).data)).toBe(true);
  });

  it('refuses more than 2²⁴ numbers, naming the most this grid allows and the command line for more', async () => {
    const engine = new Engine();
    await engine.handle({ id: 1, kind: 'setProblem', version: 1, problem: profileProblem(160, 'diagonal') });
    const most = Math.floor(MAX_DRAW_NUMBERS / 160);
    await expect(
      engine.handle({ id: 2, kind: 'priorDraws', problemVersion: 1, prior: PRIOR, count: 10_001, seed: 5 }, () => {}),
    ).rejects.toThrow(`an integer from 1 to ${Math.min(10_000, most)} on this grid of 160 cells`);
    await expect(
      engine.handle({ id: 3, kind: 'posteriorDraws', problemVersion: 1, prior: PRIOR, count: 0, seed: 5 }, () => {}),
    ).rejects.toThrow('priorscope sample');
  });
});

describe('Engine: the dense Cm and its Cholesky factor for export', () => {
  it('exports up to the export limit (beyond the view limit); the factor is the core Cholesky of Cm', async () => {
    const { covarianceMatrix } = await import('../../src/core/prior/covariance.ts');
    const { cholesky } = await import('../../src/core/linalg/cholesky.ts');
    const { COVARIANCE_VIEW_LIMIT } = await import('../../src/worker/engine.ts');
    const engine = new Engine();
    const problem = profileProblem(500, 'diagonal');
    expect(500).toBeGreaterThan(COVARIANCE_VIEW_LIMIT);
    await engine.handle({ id: 1, kind: 'setProblem', version: 1, problem });
    await expect(engine.handle({ id: 2, kind: 'covariance', problemVersion: 1, prior: PRIOR }, () => {})).rejects.toThrow(
      'covariance view',
    );
    const prior = { ...PRIOR, nugget: 1e-6 };
    const cm = await engine.handle({ id: 3, kind: 'covariance', problemVersion: 1, prior, form: 'covariance' }, () => {});
    expect(sameBits(cm.data, covarianceMatrix(problem.grid, prior).data)).toBe(true);
    const L = await engine.handle({ id: 4, kind: 'covariance', problemVersion: 1, prior, form: 'cholesky' }, () => {});
    const f = cholesky(covarianceMatrix(problem.grid, prior));
    expect(f.ok && sameBits(L.data, f.factor.data)).toBe(true);
  });

  it('a prior that is not positive definite has no factor to export, and says so', async () => {
    const engine = new Engine();
    await engine.handle({ id: 1, kind: 'setProblem', version: 1, problem: profileProblem(120, 'diagonal') });
    // A Gaussian kernel 40 cells long without nugget on 120 cells: numerically singular (DEVELOPERS: the verdict).
    const prior = { mean: { constant: 0 }, terms: [{ kernel: 'gaussian' as const, variance: 1, length: 40 }], nugget: 0 };
    await expect(engine.handle({ id: 2, kind: 'covariance', problemVersion: 1, prior, form: 'cholesky' }, () => {})).rejects.toThrow(
      'Cm is not positive definite',
    );
  });
});
