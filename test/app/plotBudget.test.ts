/**
 * The redraw-cost guards of the plot wrapper (src/app/Plot.tsx, src/app/traces.ts): tick-label
 * overflow checks are switched off on every axis and colour bar, but a figure's own choice wins.
 * Why it matters is a property of plotly (per-label getBoundingClientRect when the value is not
 * 'allow'; seen in a CPU profile), so these tests pin the data we hand to it.
 */
import { describe, expect, it } from 'vitest';
import { tameOverflow } from '../../src/app/traces.ts';

describe('tameOverflow', () => {
  it('sets ticklabeloverflow "allow" on every cartesian axis, including numbered ones and missing defaults', () => {
    const out = tameOverflow.layout({ xaxis: { title: 'x' }, yaxis3: { range: [0, 1] }, title: { text: 't' } });
    expect(out.xaxis).toEqual({ title: 'x', ticklabeloverflow: 'allow' });
    expect(out.yaxis3).toEqual({ range: [0, 1], ticklabeloverflow: 'allow' });
    expect(out.yaxis).toEqual({ ticklabeloverflow: 'allow' });
    expect(out.title).toEqual({ text: 't' });
  });

  it('keeps a value the figure chose and does not change its input', () => {
    const layout = { xaxis: { ticklabeloverflow: 'hide past domain' }, coloraxis: { cmin: 0, colorbar: { thickness: 10 } } };
    const copy = structuredClone(layout);
    const out = tameOverflow.layout(layout);
    expect(out.xaxis).toEqual({ ticklabeloverflow: 'hide past domain' });
    expect(out.coloraxis).toEqual({ cmin: 0, colorbar: { thickness: 10, ticklabeloverflow: 'allow' } });
    expect(layout).toEqual(copy);
  });

  it('adds the setting to the colour bars of heat maps and contours that show one, and leaves other traces alone', () => {
    const line = { type: 'scatter', y: [1, 2] };
    const [h, c, hidden, shared, l] = tameOverflow.traces([
      { type: 'heatmap', z: [[1]], colorbar: { thickness: 8 } },
      { type: 'contour', z: [[1]] },
      { type: 'heatmap', z: [[1]], showscale: false },
      { type: 'heatmap', z: [[1]], coloraxis: 'coloraxis' },
      line,
    ]);
    expect(h!.colorbar).toEqual({ thickness: 8, ticklabeloverflow: 'allow' });
    expect(c!.colorbar).toEqual({ ticklabeloverflow: 'allow' });
    expect(hidden!.colorbar).toBeUndefined();
    expect(shared!.colorbar).toBeUndefined();
    expect(l).toBe(line);
  });
});

describe('settle wait after a control movement', () => {
  it('counts down from the last movement and is ≤ 0 once settled', async () => {
    const { noteInteraction, settleWait } = await import('../../src/app/interaction.ts');
    noteInteraction(1000);
    expect(settleWait(250, 1000)).toBe(250);
    expect(settleWait(250, 1100)).toBe(150);
    expect(settleWait(250, 1300)).toBeLessThanOrEqual(0);
    noteInteraction(1290);
    expect(settleWait(250, 1300)).toBe(240);
  });
});
