/** Shared pieces of the screens' figures: the map layout's orientation and the field heat map. */
import { describe, expect, it } from 'vitest';
import { datumNumbers, heatTrace, hoverName, mapLayout } from '../../../src/app/figures/common.ts';
import { grid2 } from './fixtures.ts';

describe('figure pieces', () => {
  it('draws the second axis downwards at equal aspect, titled with its name, unit and arrow', () => {
    const l = mapLayout(grid2, 'Posterior mean (K)');
    expect((l.title as { text: string }).text).toBe('Posterior mean (K)');
    const x = l.xaxis as Record<string, unknown>;
    const y = l.yaxis as Record<string, unknown>;
    expect((x.title as { text: string }).text).toBe('x (m)');
    expect((y.title as { text: string }).text).toBe('depth (m) ↓');
    expect(y.autorange).toBe('reversed');
    expect(y.scaleanchor).toBe('x');
  });

  it('lays a flat field over the cell centres, rows along the second axis', () => {
    const t = heatTrace(grid2, [0, 1, 2, 3, 4, 5], 'mean', { zmin: 0 });
    expect(t.type).toBe('heatmap');
    expect(t.x).toEqual([1, 3, 5]);
    expect(t.y).toEqual([2.5, 7.5]);
    expect(t.z).toEqual([
      [0, 1, 2],
      [3, 4, 5],
    ]);
    expect(t.zmin).toBe(0);
    expect(t.hovertemplate).toBe('x %{x}<br>depth %{y}<br>mean %{z:.4g}<extra></extra>');
  });

  it('escapes names from files inside hover templates, placeholders included', () => {
    expect(hoverName('<b>50%{x}</b>')).toBe('&lt;b&gt;50%%{x}&lt;/b&gt;');
    const t = heatTrace({ ...grid2, axes: ['a<i>', 'b'] }, new Float64Array(6), '%{z}');
    expect(t.hovertemplate).toBe('a&lt;i&gt; %{x}<br>b %{y}<br>%%{z} %{z:.4g}<extra></extra>');
  });

  it('numbers the data from 1', () => {
    expect(datumNumbers(3)).toEqual([1, 2, 3]);
    expect(datumNumbers(0)).toEqual([]);
  });
});
