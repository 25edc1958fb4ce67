import { describe, expect, it } from 'vitest';
import { escapePlotText, plotSafe } from '../../src/app/plotText.ts';

describe('plot text from files is escaped for plotly', () => {
  it.each([
    ['<b>q</b>', '&lt;b&gt;q&lt;/b&gt;'],
    ['a & b', 'a &amp; b'],
    ['&lt;', '&amp;lt;'],
    ['(°C)²', '(°C)²'],
  ])('%s', (input, expected) => expect(escapePlotText(input)).toBe(expected));

  it('escapes titles, names and tick texts at any depth, and leaves hover templates, numbers and typed arrays alone', () => {
    const z = new Float64Array([1, 2]);
    const layout = { title: { text: '<i>t</i>' }, xaxis: { title: { text: 'x <u>' }, ticktext: ['<a>'] }, height: 3 };
    const trace = { name: '<b>n</b>', z, hovertemplate: 'x %{x}<br>y<extra></extra>' };
    expect(plotSafe(layout)).toEqual({
      title: { text: '&lt;i&gt;t&lt;/i&gt;' },
      xaxis: { title: { text: 'x &lt;u&gt;' }, ticktext: ['&lt;a&gt;'] },
      height: 3,
    });
    const safe = plotSafe([trace])[0];
    expect(safe.name).toBe('&lt;b&gt;n&lt;/b&gt;');
    expect(safe.hovertemplate).toBe(trace.hovertemplate);
    expect(safe.z).toBe(z);
    expect(layout.title.text).toBe('<i>t</i>'); // the input is not mutated
  });
});
