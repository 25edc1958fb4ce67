/**
 * cliPosterior's thread choice (src/cli/commands.ts): without --threads the one-shot CLI starts a
 * pool only for a std solve of at least CLI_MIN_SPLIT_FLOPS (measured break-even, see its TSDoc);
 * an explicit --threads splits the products and the std whatever the size, with the same bits as
 * one thread (the dense-route reference checks of the split live in test/core/parallel).
 */
import { describe, expect, it } from 'vitest';
import { CLI_MIN_SPLIT_FLOPS, cliPosterior } from '../../src/cli/commands.ts';
import type { SparseMatrix } from '../../src/core/linalg/sparse.ts';
import { varianceFlops } from '../../src/core/parallel/blocks.ts';
import type { PriorSpec } from '../../src/core/prior/spec.ts';
import type { Problem } from '../../src/core/problems/spec.ts';
import { benchProblem } from '../bench/cases/fft.ts';

function small(): Problem {
  const p = benchProblem(24, 37);
  const g = p.operator.matrix as SparseMatrix;
  return {
    ...p,
    grid: { shape: [24, 20], spacing: [1, 1] },
    operator: { kind: 'sparse', matrix: { ...g, cols: 480, colIdx: g.colIdx.map((c) => c % 480) } },
  };
}
const prior: PriorSpec = { mean: { constant: 0 }, terms: [{ kernel: 'matern', nu: 1.5, variance: 1, length: 3 }], nugget: 0.001 };

describe('cliPosterior threads', () => {
  it('a small problem stays on one thread unless --threads forces the split; forced, the bits are the same', async () => {
    const one = await cliPosterior(small(), prior, 'fft', 1);
    const auto = await cliPosterior(small(), prior, 'fft', 2, false);
    const forced = await cliPosterior(small(), prior, 'fft', 2, true);
    expect([one.threadsUsed, auto.threadsUsed, forced.threadsUsed]).toEqual([1, 1, 2]);
    for (const key of ['mean', 'std'] as const) {
      const a = one.summary[key];
      const b = forced.summary[key];
      expect(b.length).toBe(a.length);
      expect(Array.from(a).filter((v, i) => !Object.is(v, b[i])).length).toBe(0);
    }
  }, 60_000);

  it('the default split starts between the measured break-even (128², M = 800) and the measured gain (M = 1600)', () => {
    expect(varianceFlops(800, 128 * 128)).toBeLessThan(CLI_MIN_SPLIT_FLOPS);
    expect(varianceFlops(1600, 128 * 128)).toBeGreaterThanOrEqual(CLI_MIN_SPLIT_FLOPS);
  });
});
