/**
 * The engine's diagnostics, posterior draws and resolution rows on large grids: the FFT routes
 * (no N × N matrix) are chosen by the same rules as the core (src/core/inverse/auto.ts for the
 * posterior, src/core/prior/structuredDiagnostics.ts for the diagnostics) and give the core's
 * numbers; on small problems the dense routes are kept.
 */
import { describe, expect, it } from 'vitest';
import { Engine } from '../../src/worker/engine.ts';
import { prepareStructuredPosterior } from '../../src/core/inverse/structured.ts';
import { structuredPosteriorDraws } from '../../src/core/inverse/structuredDraws.ts';
import { posteriorRealisations, preparePosterior, resolutionRow } from '../../src/core/inverse/posterior.ts';
import { STRUCTURED_DIAGNOSTICS_MIN_CELLS } from '../../src/core/prior/structuredDiagnostics.ts';
import type { Diagnostics } from '../../src/core/prior/diagnostics.ts';
import type { Matrix } from '../../src/core/linalg/matrix.ts';
import type { Problem } from '../../src/core/problems/spec.ts';
import { relErr } from '../core/fft/cases.ts';
import { computePosteriorSerial } from '../../src/core/inverse/compute.ts';
import type { PosteriorSummary } from '../../src/core/inverse/types.ts';
import type { ProblemView } from '../../src/worker/protocol.ts';
import type { BlockPool } from '../../src/core/parallel/blocks.ts';
import { sparseFromCoordinates } from '../../src/core/linalg/sparse.ts';
import { startPriorRule } from '../../src/core/tuning/startPrior.ts';
import { PRIOR, profileProblem, sameBits } from './problems.ts';

async function engineWith(problem: Problem): Promise<Engine> {
  const engine = new Engine();
  await engine.handle({ id: 1, kind: 'setProblem', version: 1, problem });
  return engine;
}

describe('Engine: FFT routes for draws, resolution and diagnostics', () => {
  it('160 cells (FFT posterior path): draws equal the core FFT draws bit for bit; resolution rows equal the dense ones', async () => {
    const problem = profileProblem(160, 'full');
    const engine = await engineWith(problem);
    const draws = (await engine.handle({ id: 2, kind: 'posteriorDraws', problemVersion: 1, prior: PRIOR, count: 4, seed: 9 })) as Matrix;
    const want = structuredPosteriorDraws(prepareStructuredPosterior(problem, PRIOR), 4, 9).realisations;
    expect(sameBits(draws.data, want.data)).toBe(true);
    // Not the dense path's stream (so the test tells the routes apart).
    expect(sameBits(draws.data, posteriorRealisations(preparePosterior(problem, PRIOR), 4, 9).data)).toBe(false);
    const dense = preparePosterior(problem, PRIOR);
    for (const cell of [0, 37, 159]) {
      const r = (await engine.handle({ id: 3, kind: 'resolution', problemVersion: 1, prior: PRIOR, cell })) as {
        cell: number;
        row: Float64Array;
      };
      expect(r.cell).toBe(cell);
      expect(relErr(r.row, resolutionRow(dense, cell))).toBeLessThan(1e-10);
    }
    await expect(engine.handle({ id: 4, kind: 'resolution', problemVersion: 1, prior: PRIOR, cell: 160 })).rejects.toThrow(
      'cell must be an integer cell index from 0 to 159, got 160',
    );
  });

  it('the starting rule’s products serve the first posterior of the starting prior: the same bits as the core', async () => {
    const problem = profileProblem(160, 'diagonal');
    const engine = new Engine();
    const view = (await engine.handle({ id: 1, kind: 'setProblem', version: 1, problem })) as ProblemView;
    expect(view.startPrior).not.toBeNull();
    expect(engine.holdsStartProducts).toBe(true);
    const start = view.startPrior!;
    const got = (await engine.handle({ id: 2, kind: 'posterior', problemVersion: 1, prior: start })) as { summary: PosteriorSummary };
    expect(engine.holdsStartProducts).toBe(false);
    const want = computePosteriorSerial(problem, start).summary;
    expect(got.summary.path).toBe('fft');
    expect(sameBits(got.summary.mean, want.mean)).toBe(true);
    expect(sameBits(got.summary.std, want.std)).toBe(true);
    // Another shape first: the kept products are dropped, not used.
    const other = new Engine();
    await other.handle({ id: 1, kind: 'setProblem', version: 1, problem });
    await other.handle({ id: 2, kind: 'posterior', problemVersion: 1, prior: PRIOR });
    expect(other.holdsStartProducts).toBe(false);
    // Without the starting rule nothing is computed ahead.
    const secondary = new Engine();
    const bare = (await secondary.handle({ id: 1, kind: 'setProblem', version: 1, problem, startPrior: false })) as ProblemView;
    expect(bare.startPrior).toBeNull();
    expect(secondary.holdsStartProducts).toBe(false);
  });

  it('when the products for the starting rule fail (a pool thread fails), the rule still runs on its own projection', async () => {
    // 64 × 64 cells and 700 point data: enough work for the products to go to the pool (productsWorthSplitting).
    const n = 64 * 64;
    const m = 700;
    const cols = Array.from({ length: m }, (_, k) => (k * 2654435761) % n);
    const problem: Problem = {
      grid: { shape: [64, 64], spacing: [1, 1] },
      operator: {
        kind: 'sparse',
        matrix: sparseFromCoordinates(
          m,
          n,
          Array.from(cols, (_, k) => k),
          cols,
          new Array(m).fill(1),
        ),
      },
      data: { values: Float64Array.from(cols, (c) => 1 + Math.sin(c / 300)), sigma: new Float64Array(m).fill(0.1) },
    };
    let asked = 0;
    const failing: BlockPool = {
      size: 2,
      run: () => Promise.reject(new Error('thread gone')),
      runProducts: () => {
        asked++;
        return Promise.reject(new Error('thread gone'));
      },
      close: () => Promise.resolve(),
      started: () => Promise.resolve(),
    };
    const engine = new Engine({ pool: { get: () => failing, threads: 2 } });
    const view = (await engine.handle({ id: 1, kind: 'setProblem', version: 1, problem })) as ProblemView;
    expect(asked).toBeGreaterThan(0);
    expect(engine.holdsStartProducts).toBe(false);
    expect(view.startPrior).toEqual(startPriorRule(problem).prior);
  });

  it('100 cells (dense posterior path): draws are the dense ones', async () => {
    const problem = profileProblem(100, 'diagonal');
    const engine = await engineWith(problem);
    const draws = (await engine.handle({ id: 2, kind: 'posteriorDraws', problemVersion: 1, prior: PRIOR, count: 3, seed: 9 })) as Matrix;
    expect(sameBits(draws.data, posteriorRealisations(preparePosterior(problem, PRIOR), 3, 9).data)).toBe(true);
  });

  it(`diagnostics: exact below ${STRUCTURED_DIAGNOSTICS_MIN_CELLS} cells, FFT bounds from there`, async () => {
    const small = (await (
      await engineWith(profileProblem(160, 'diagonal'))
    ).handle({ id: 2, kind: 'diagnostics', problemVersion: 1, prior: PRIOR })) as Diagnostics;
    expect(small.eigenvalueMethod).toBe('exact');
    const big = (await (
      await engineWith(profileProblem(2048, 'diagonal'))
    ).handle({ id: 2, kind: 'diagnostics', problemVersion: 1, prior: PRIOR })) as Diagnostics;
    expect(big.eigenvalueMethod).toBe('fft-bounds');
    expect(big.positiveDefinite).toBe(true);
    expect(big.eigenvalueBounds!.lower).toBeGreaterThan(0);
  });
});
