import { describe, expect, it } from 'vitest';
import { defenceHtml, type DefenceInput, geometryOverlay, sectionOfVolume } from '../../../src/core/report/defence.ts';
import { fromRows } from '../../../src/core/linalg/matrix.ts';
import { colourAt, esc, extent, gridExtent, heatSvg, ticks } from '../../../src/core/report/svg.ts';
import { DIVERGING } from '../../../src/core/report/colours.ts';

const grid = { shape: [4, 2], spacing: [500, 250], origin: [250, 125], unit: 'm', axes: ['x', 'depth'] };
const base: DefenceInput = {
  title: '<img src=x onerror=alert(1)>',
  source: 'test',
  created: '2026-12-04 22:00 UTC',
  caution: 'the caution',
  grid,
  quantity: { name: 'density', unit: 'kg/m³' },
  dataUnit: 'mGal',
  problemFacts: [['Grid', '4 × 2']],
  coverage: [1, 2, 3, 4, 5, 6, 7, 8],
  prior: { mean: { constant: 0 }, terms: [{ kernel: 'exponential', variance: 1, length: 300 }], nugget: 0 },
  priorWords: ['Mean: constant 0.'],
  pd: [['Positive definite', 'yes, proven']],
  priorMean: new Float64Array(8),
  priorStd: new Float64Array(8).fill(1),
  draws: { rows: 3, cols: 8, data: Float64Array.from({ length: 24 }, (_, i) => Math.sin(i)) },
  seed: 1,
  posterior: { mean: new Float64Array(8).fill(0.1), std: new Float64Array(8).fill(0.5), predicted: [1, 2] },
  fitRows: [['χ²', '1']],
  data: { values: [1, 2], sigma: [0.1, 0.1] },
  truth: null,
  evidence: null,
  candidates: null,
  criteria: null,
  averaged: null,
  missing: { evidence: 'no map here' },
};

describe('the defence document', () => {
  it('has its ten sections in order and the caution; text from files is escaped; missing parts say why', () => {
    const html = defenceHtml(base);
    expect([...html.matchAll(/<section id="([a-z]+)">/g)].map((m) => m[1])).toEqual([
      'problem',
      'prior',
      'pd',
      'realisations',
      'posterior',
      'fit',
      'evidence',
      'candidates',
      'criteria',
      'averaged',
    ]);
    expect(html).not.toContain('<img');
    expect(html).toContain('<h1>&lt;img src=x onerror=alert(1)&gt;</h1>');
    expect(html).toContain('no map here');
    expect(html).toContain('the caution');
    // maps: coverage, 3 realisations, mean, std, (fit is a line plot)
    expect((html.match(/<svg /g) ?? []).length).toBe(7);
    expect(html).not.toMatch(/<script/);
  });

  it('draws the survey geometry over the coverage map: one line per path, one dot per position, where they were measured', () => {
    const paths = defenceHtml({
      ...base,
      geometry: {
        kind: 'paths',
        sources: { rows: 2, cols: 2, data: Float64Array.from([0, 0, 0, 500]) },
        receivers: { rows: 2, cols: 2, data: Float64Array.from([2000, 500, 2000, 0]) },
      },
    });
    const group = paths.match(/<g class="geometry"[^>]*>(.*?)<\/g>/)?.[1] ?? '';
    expect((group.match(/<line /g) ?? []).length).toBe(2);
    expect(paths).toContain('with the 2 paths (lines)');
    // The coverage map is 300 px wide over 0…2000 m from x = 50 px, depth down from y = 22 px over 0…500 m.
    expect(group).toContain('<line x1="50.0" y1="22.0" x2="350.0" y2="97.0"/>');
    const points = defenceHtml({
      ...base,
      geometry: { kind: 'points', positions: { rows: 3, cols: 2, data: Float64Array.from([250, -1, 1000, -1, 1750, -1]) } },
    });
    expect(((points.match(/<g class="geometry"[^>]*>(.*?)<\/g>/)?.[1] ?? '').match(/<circle /g) ?? []).length).toBe(3);
    expect(points).toContain('with the 3 measurement positions (dots)');
    expect(defenceHtml(base)).not.toContain('class="geometry"');
  });

  it('draws a 2 km × 0.5 km section four times wider than high (true aspect)', () => {
    const svg = heatSvg({
      title: 't',
      field: new Float64Array(8),
      nx: 4,
      ny: 2,
      xRange: gridExtent(grid, 0),
      yRange: gridExtent(grid, 1),
      xLabel: 'x',
      yLabel: 'y',
      scale: DIVERGING,
      range: [-1, 1],
      unit: '',
      width: 200,
    });
    expect(gridExtent(grid, 0)).toEqual([0, 2000]);
    expect(gridExtent(grid, 1)).toEqual([0, 500]);
    expect(svg).toContain('<rect x="50" y="22" width="200" height="50"');
  });
});

describe('svg helpers', () => {
  it('interpolates colour stops linearly and clamps', () => {
    expect(
      colourAt(
        [
          [0, '#000000'],
          [1, '#ffffff'],
        ],
        0.5,
      ),
    ).toBe('#808080');
    expect(colourAt(DIVERGING, 0.5)).toBe('#f7f7f4');
    expect(colourAt(DIVERGING, 2)).toBe('#0c4f5c');
  });
  it('picks round ticks and finite extents', () => {
    expect(ticks(0, 2000, 4)).toEqual([0, 500, 1000, 1500, 2000]);
    expect(ticks(-0.13, 0.27, 4)).toEqual([-0.1, 0, 0.1, 0.2]);
    expect(extent([[3, Number.NaN, -1]])).toEqual([-1, 3]);
    expect(extent([[2, 2]])).toEqual([1, 3]);
    expect(esc(`a<b>&"'`)).toBe('a&lt;b&gt;&amp;&quot;&#39;');
  });
});

describe('a 3-D problem in the document', () => {
  // 4 × 3 × 5 cells: the maps show the middle x–y layer (iz = 2); every per-cell field is cut there.
  const g3 = { shape: [4, 3, 5], spacing: [2, 1, 0.5], origin: [1, 0.5, 0.25], unit: 'm', axes: ['east', 'north', 'depth'] };
  const n = 60;
  const field = (k: number) => Float64Array.from({ length: n }, (_, i) => i + 1000 * k);
  const vol: DefenceInput = {
    ...base,
    grid: g3,
    coverage: field(1),
    priorMean: field(2),
    priorStd: field(3),
    draws: { rows: 2, cols: n, data: Float64Array.from({ length: 2 * n }, (_, i) => i) },
    posterior: { mean: field(4), std: field(5), predicted: [1, 2] },
    truth: field(6),
    geometry: { kind: 'paths', sources: fromRows([[0, 0, 9]]), receivers: fromRows([[8, 3, 9]]) },
  };
  it('cuts every field at the middle layer, on that layer’s 2-D grid, and says so', () => {
    const s = sectionOfVolume(vol);
    const layer = (k: number) => Array.from({ length: 12 }, (_, i) => 24 + i + 1000 * k);
    expect(s.grid).toEqual({ shape: [4, 3], spacing: [2, 1], origin: [1, 0.5], unit: 'm', axes: ['east', 'north'] });
    expect(Array.from(s.coverage!)).toEqual(layer(1));
    expect(Array.from(s.priorMean)).toEqual(layer(2));
    expect(Array.from(s.posterior!.std)).toEqual(layer(5));
    expect(Array.from(s.truth!)).toEqual(layer(6));
    expect(Array.from(s.draws!.data.subarray(12, 24))).toEqual(Array.from({ length: 12 }, (_, i) => 60 + 24 + i));
    expect(s.problemFacts.at(-1)).toEqual(['Maps', expect.stringMatching(/east–north section at depth = 1\.25 m \(layer 3 of 5\)/)]);
    // 2-D inputs pass through untouched.
    expect(sectionOfVolume(base)).toBe(base);
  });
  it('draws 3-D path ends by their first two coordinates, and renders the whole document', () => {
    expect(geometryOverlay(vol.geometry)).toEqual({ segments: [[0, 0, 8, 3]] });
    const html = defenceHtml(vol);
    expect(html).toContain('east–north section at depth');
    expect((html.match(/<svg /g) ?? []).length).toBe(6);
  });
});
