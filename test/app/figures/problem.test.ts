/** Figures of the Problem screen. */
import { describe, expect, it } from 'vitest';
import { coverageLayout, coverageTraces, dataLayout, observedTrace } from '../../../src/app/figures/problem.ts';
import { grid1, grid2 } from './fixtures.ts';

const axisTitle = (l: Record<string, unknown>, k: 'xaxis' | 'yaxis') => ((l[k] as Record<string, unknown>).title as { text: string }).text;

describe('problem figures', () => {
  it('plots each datum at its number with its σ as the error bar', () => {
    const t = observedTrace([4, 5, 6], [0.1, 0.2, 0.3]);
    expect(t.x).toEqual([1, 2, 3]);
    expect(t.y).toEqual([4, 5, 6]);
    expect((t.error_y as { array: number[] }).array).toEqual([0.1, 0.2, 0.3]);
    expect(axisTitle(dataLayout('ms'), 'yaxis')).toBe('d (ms)');
    expect(axisTitle(dataLayout(''), 'yaxis')).toBe('d');
  });

  it('draws the sensitivity as a line over the cell centres in 1-D and as a map in 2-D', () => {
    const line = coverageTraces(grid1, [1, 2, 3]);
    expect(line).toHaveLength(1);
    expect(line[0].type).toBe('scatter');
    expect(Array.from(line[0].x as Float64Array)).toEqual([10, 12, 14]);
    const map = coverageTraces(grid2, [1, 2, 3, 4, 5, 6]);
    expect(map[0].type).toBe('heatmap');
    expect(map[0].z).toEqual([
      [1, 2, 3],
      [4, 5, 6],
    ]);
  });

  it('gives the sensitivity a unit only when both the data and the quantity have one', () => {
    expect(axisTitle(coverageLayout(grid1, 'mGal', 'kg/m³'), 'yaxis')).toBe('Σ|G| (mGal per kg/m³)');
    expect(axisTitle(coverageLayout(grid1, '', 'kg/m³'), 'yaxis')).toBe('Σ|G|');
    expect((coverageLayout(grid2, 'mGal', 'kg/m³').yaxis as Record<string, unknown>).autorange).toBe('reversed');
  });
});
