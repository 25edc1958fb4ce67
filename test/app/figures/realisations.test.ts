/** The realisation gallery: one panel per draw on its own axes, one shared scale. */
import { describe, expect, it } from 'vitest';
import { galleryLayout, galleryTraces } from '../../../src/app/figures/realisations.ts';
import { grid1, grid2 } from './fixtures.ts';

describe('realisation gallery', () => {
  it('puts draw k on axes x(k+1), y(k+1); 2-D draws share one colour axis', () => {
    const draws = { rows: 2, cols: 6, data: Float64Array.from({ length: 12 }, (_, i) => i) };
    const t = galleryTraces(grid2, draws);
    expect(t.map((x) => [x.xaxis, x.yaxis, x.name])).toEqual([
      ['x', 'y', 'draw 1'],
      ['x2', 'y2', 'draw 2'],
    ]);
    expect(t[1].z).toEqual([
      [6, 7, 8],
      [9, 10, 11],
    ]);
    expect(t.every((x) => x.coloraxis === 'coloraxis')).toBe(true);
  });

  it('draws 1-D realisations as lines over the cell centres', () => {
    const t = galleryTraces(grid1, { rows: 1, cols: 3, data: Float64Array.from([1, 2, 3]) });
    expect(t[0].type).toBe('scatter');
    expect(Array.from(t[0].x as Float64Array)).toEqual([10, 12, 14]);
    expect(Array.from(t[0].y as Float64Array)).toEqual([1, 2, 3]);
  });

  it('shares the range: the colour limits in 2-D (second axis down), the value axis in 1-D', () => {
    const l2 = galleryLayout(grid2, 'K', 2, [-3, 4], 'Prior realisations');
    expect((l2.title as { text: string }).text).toBe('Prior realisations (x →, depth ↓)');
    expect(l2.coloraxis).toMatchObject({ cmin: -3, cmax: 4, colorbar: { title: { text: 'K' } } });
    expect(l2.yaxis2).toMatchObject({ autorange: 'reversed' });
    expect(l2.yaxis3).toBeUndefined();
    const l1 = galleryLayout(grid1, 'K', 2, [-3, 4], 'Prior realisations');
    expect((l1.title as { text: string }).text).toBe('Prior realisations');
    expect(l1.coloraxis).toBeUndefined();
    expect(l1.yaxis).toEqual({ range: [-3, 4] });
    expect(l1.yaxis2).toEqual({ range: [-3, 4] });
  });
});
