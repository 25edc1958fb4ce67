/**
 * computePosterior (src/core/inverse/compute.ts), the posterior entry of the engine and the command
 * line: its thread rule, its hooks and its agreement with the serial form. The routes' numbers are
 * checked against outside references elsewhere (test/reference/, test/core/inverse/auto.test.ts).
 */
import { describe, expect, it } from 'vitest';
import { computePosterior, computePosteriorSerial, stdSplits, type PosteriorPool } from '../../../src/core/inverse/compute.ts';
import type { BlockPool } from '../../../src/core/parallel/blocks.ts';
import { demoById } from '../../../src/core/problems/demos.ts';

const noPool = (threads: number, extra: Partial<PosteriorPool> = {}): PosteriorPool => ({
  get: (): BlockPool => {
    throw new Error('the pool must not be asked for');
  },
  threads,
  ...extra,
});

describe('stdSplits', () => {
  it('default rule (a running pool): no at 64² with M = 400 (measured no gain), yes at 128², never on one thread', () => {
    expect(stdSplits(noPool(2), 400, 64 * 64)).toBe(false);
    expect(stdSplits(noPool(2), 400, 128 * 128)).toBe(true);
    expect(stdSplits(noPool(1), 400, 128 * 128)).toBe(false);
    expect(stdSplits(undefined, 400, 128 * 128)).toBe(false);
  });
  it('a caller break-even and force', () => {
    expect(stdSplits(noPool(2, { minSplitFlops: 1e10 }), 400, 128 * 128)).toBe(false);
    expect(stdSplits(noPool(2, { minSplitFlops: 1e10, force: true }), 4, 16)).toBe(true);
    expect(stdSplits(noPool(1, { force: true }), 400, 128 * 128)).toBe(false);
  });
});

describe('computePosterior', () => {
  it('FFT route: same bits as the serial form; onPartial once, with the mean of the result; a pool below the break-even is not touched', async () => {
    const { problem, startPrior } = demoById('borehole-log').build();
    const partials: Float64Array[] = [];
    const r = await computePosterior(problem, startPrior, { pool: noPool(2), onPartial: (st) => partials.push(st.mean.slice()) });
    const s = computePosteriorSerial(problem, startPrior);
    expect(r.decision.path).toBe('fft');
    expect(r.threadsUsed).toBe(1);
    expect(partials).toHaveLength(1);
    expect(Array.from(partials[0])).toEqual(Array.from(r.summary.mean));
    for (const k of ['mean', 'std', 'predicted'] as const) expect(Array.from(r.summary[k])).toEqual(Array.from(s.summary[k]));
    expect(r.summary.logEvidence).toBe(s.summary.logEvidence);
  });
  it('dense route on request: no partial, the given dense state is used', async () => {
    const { problem, startPrior } = demoById('borehole-log').build();
    let denseCalls = 0;
    let partialCalls = 0;
    const serial = computePosteriorSerial(problem, startPrior, 'dense');
    const { preparePosterior } = await import('../../../src/core/inverse/posterior.ts');
    const r = await computePosterior(problem, startPrior, {
      path: 'dense',
      dense: () => {
        denseCalls++;
        return preparePosterior(problem, startPrior);
      },
      onPartial: () => partialCalls++,
    });
    expect([r.decision.path, r.summary.path, denseCalls, partialCalls]).toEqual(['dense', 'dense', 1, 0]);
    expect(Array.from(r.summary.std)).toEqual(Array.from(serial.summary.std));
  });
  it("an impossible 'fft' request names the field it came from", async () => {
    const { problem, startPrior } = demoById('borehole-log').build();
    const grid = { shape: [2, 2, 5, 10], spacing: [1, 1, 1, 1] };
    await expect(computePosterior({ ...problem, grid }, startPrior, { path: 'fft', field: '--path' })).rejects.toThrow(
      /^--path must be "dense" or "auto"/,
    );
  });
});
