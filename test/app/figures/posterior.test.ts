/** Figures of the Posterior screen: which bands are drawn when, the maps, the averaging kernel. */
import { describe, expect, it } from 'vitest';
import { kernelTraces, posteriorBandTraces, posteriorLayouts, posteriorMapTraces } from '../../../src/app/figures/posterior.ts';
import { Z68, Z95 } from '../../../src/app/traces.ts';
import { grid1, grid2, shown } from './fixtures.ts';

describe('posterior figures', () => {
  it('draws only the prior band and the mean while the bands are computed', () => {
    const t = posteriorBandTraces(grid1, shown([1, 2, 3]), null);
    expect(t.map((x) => x.name)).toEqual(['prior 95%', 'posterior mean']);
    expect(Array.from(t[1].y as Float64Array)).toEqual([1, 2, 3]);
  });

  it('adds the 95% and 68% bands m ± z·σ and the truth once they exist', () => {
    const t = posteriorBandTraces(grid1, shown([1, 2, 3], [0.5, 1, 2]), [0, 0, 0]);
    expect(t.map((x) => x.name)).toEqual(['prior 95%', 'posterior 95%', 'posterior 68%', 'truth', 'posterior mean']);
    // band polygon: upper edge forward, then lower edge back (src/app/traces.ts bandTrace)
    const y95 = Array.from(t[1].y as Float64Array);
    expect(y95[0]).toBeCloseTo(1 + Z95 * 0.5, 12);
    expect(y95[5]).toBeCloseTo(1 - Z95 * 0.5, 12);
    const y68 = Array.from(t[2].y as Float64Array);
    expect(y68[2]).toBeCloseTo(3 + Z68 * 2, 12);
    // the prior band: m0 = 0, σ = 1
    expect((t[0].y as Float64Array)[0]).toBeCloseTo(Z95, 12);
  });

  it('maps the mean at once and the standard deviation and variance reduction with the bands', () => {
    const partial = posteriorMapTraces(grid2, shown([1, 2, 3, 4, 5, 6]));
    expect(partial.mean[0].z).toEqual([
      [1, 2, 3],
      [4, 5, 6],
    ]);
    expect(partial.std).toBeNull();
    expect(partial.vr).toBeNull();
    const full = posteriorMapTraces(grid2, shown([1, 2, 3, 4, 5, 6], [0, 0.5, 1, 0, 0.5, 1]));
    expect(full.std![0].z).toEqual([
      [0, 0.5, 1],
      [0, 0.5, 1],
    ]);
    expect(full.vr![0].z).toEqual([
      [1, 0.75, 0],
      [1, 0.75, 0],
    ]);
    expect(full.vr![0]).toMatchObject({ zmin: 0, zmax: 1 });
  });

  it('draws the averaging kernel symmetric about zero with the cell marked at its centre', () => {
    const [heat, mark] = kernelTraces(grid2, { cell: 4, row: Float64Array.from([0, -0.2, 0, 0.1, 0.8, 0]) });
    expect(heat).toMatchObject({ zmin: -0.8, zmax: 0.8 });
    // cell 4 = ix 1, iy 1 → centre (3, 7.5)
    expect(mark!.x).toEqual([3]);
    expect(mark!.y).toEqual([7.5]);
    const [, zero] = kernelTraces(grid2, { cell: 0, row: new Float64Array(6) });
    expect(zero).toMatchObject({ x: [1], y: [2.5] });
    expect(kernelTraces(grid2, { cell: 0, row: new Float64Array(6) })[0]).toMatchObject({ zmin: -1, zmax: 1 });
    const [lineTrace, point] = kernelTraces(grid1, { cell: 2, row: Float64Array.from([0.1, 0.2, 0.7]) });
    expect(lineTrace!.type).toBe('scatter');
    expect(point).toMatchObject({ x: [14], y: [0.7] });
  });

  it('titles the maps with the quantity’s unit and draws the 1-D kernel as a line plot', () => {
    const l = posteriorLayouts(grid2, 'K');
    expect((l.std.title as { text: string }).text).toBe('Posterior standard deviation (K)');
    expect((l.kernel.yaxis as Record<string, unknown>).autorange).toBe('reversed');
    const l1 = posteriorLayouts(grid1, '');
    expect((l1.mean.title as { text: string }).text).toBe('Posterior mean');
    expect(((l1.kernel.yaxis as Record<string, unknown>).title as { text: string }).text).toBe('R row');
  });
});
