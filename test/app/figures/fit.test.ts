/** Figures of the Data fit screen. */
import { describe, expect, it } from 'vitest';
import { fitLayouts, fitTraces } from '../../../src/app/figures/fit.ts';

describe('data-fit figures', () => {
  it('plots observed and predicted data at the datum numbers and the residuals with guides at ±2', () => {
    const f = fitTraces({ values: [1, 2, 3], sigma: [0.1, 0.1, 0.2] }, { predicted: [1.1, 1.9, 3.4], residuals: [1, -1, 2] });
    expect(f.obs.map((t) => t.name)).toEqual(['observed ±1σ', 'predicted G m̃']);
    expect(f.obs[1].x).toEqual([1, 2, 3]);
    expect(f.obs[1].y).toEqual([1.1, 1.9, 3.4]);
    expect(f.res[0]).toMatchObject({ type: 'bar', x: [1, 2, 3], y: [1, -1, 2] });
    // guides span the whole datum range, half a datum beyond each end
    expect(f.res[1]).toMatchObject({ x: [0.5, 3.5], y: [2, 2], name: '±2' });
    expect(f.res[2]).toMatchObject({ x: [0.5, 3.5], y: [-2, -2], showlegend: false });
  });

  it('titles the data axis with the data unit only when there is one', () => {
    expect(((fitLayouts('ms').obs.yaxis as Record<string, unknown>).title as { text: string }).text).toBe('d (ms)');
    expect(((fitLayouts('').obs.yaxis as Record<string, unknown>).title as { text: string }).text).toBe('d');
  });
});
