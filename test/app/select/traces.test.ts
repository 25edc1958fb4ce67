/** Pure builders of the prior-selection screen: heat-map orientation, cell picking, bands, rows. */
import { describe, expect, it } from 'vitest';
import {
  candidateBandTraces,
  candidateDrawTraces,
  candidateLineLayout,
  candidateMapLayout,
  candidateMapTrace,
  candidateTruthTrace,
  evidenceMapTraces,
  logValues,
  mapCellAt,
  mapCursorTrace,
  rankTraces,
  withAlpha,
} from '../../../src/app/select/traces.ts';
import { bestRow, fmt, nextCandidateStyle, SCORE_COLUMNS, scoreRows, CANDIDATE_STYLES } from '../../../src/app/select/candidates.ts';
import type { EvidenceMap } from '../../../src/core/tuning/index.ts';
import type { CandidateScores } from '../../../src/worker/tuningProtocol.ts';

/** A 3 × 2 map with distinct values v(i, j) = 10 i + j, one NaN cell. */
function fakeMap(): EvidenceMap {
  const lengths = Float64Array.from([1, 10, 100]);
  const variances = Float64Array.from([0.1, 1]);
  const logEvidence = Float64Array.from({ length: 6 }, (_, k) => 10 * Math.floor(k / 2) + (k % 2));
  logEvidence[1] = Number.NaN;
  return {
    term: 0,
    lengths,
    variances,
    logEvidence,
    method: 'cholesky',
    methodByLength: ['cholesky', 'cholesky', 'cholesky'],
    best: { length: 100, variance: 1, logEvidence: 21, index: 5 },
    cancelled: false,
  };
}

describe('evidence map traces', () => {
  it('puts variances on rows and lengths on columns, NaN as gaps, maximum and current prior marked', () => {
    const t = evidenceMapTraces(fakeMap(), { length: 10, variance: 0.1 });
    const heat = t[0];
    expect(heat.x).toEqual([0, 1, 2]);
    expect((heat.y as number[])[0]).toBeCloseTo(-1, 15);
    const z = heat.z as (number | null)[][];
    expect(z).toHaveLength(2);
    expect(z[0]).toEqual([0, 10, 20]);
    expect(z[1]).toEqual([null, 11, 21]);
    expect(t[1].name).toBe('maximum');
    expect(t[1].x).toEqual([2]);
    expect(t[1].y).toEqual([0]);
    expect(t[2].name).toBe('current prior');
    expect(heat.zmax).toBe(21);
  });

  it('maps a clicked point to the nearest cell and refuses points off the map', () => {
    const m = fakeMap();
    expect(mapCellAt(m, 1.1, -0.9)).toBe(1 * 2 + 0);
    expect(mapCellAt(m, 2.4, 0.2)).toBe(2 * 2 + 1);
    expect(mapCellAt(m, 3.6, 0)).toBeNull();
    expect(mapCellAt(m, 0, 1.6)).toBeNull();
  });

  it('puts the keyboard cursor on the cell it names, at the heat map’s coordinates', () => {
    const m = fakeMap();
    // cell 3 = length index 1 (10), variance index 1 (1): log₁₀ coordinates (1, 0); mapCellAt maps them back
    const t = mapCursorTrace(m, 3);
    expect(t.x).toEqual([1]);
    expect(t.y).toEqual([0]);
    expect(mapCellAt(m, (t.x as number[])[0], (t.y as number[])[0])).toBe(3);
  });

  it('log-spaced values hit both ends and have a constant ratio', () => {
    const v = logValues(1e-4, 1, 5);
    expect(v[0]).toBe(1e-4);
    expect(v[4]).toBeCloseTo(1, 14);
    for (let k = 1; k < 5; k++) expect(v[k] / v[k - 1]).toBeCloseTo(10, 12);
  });
});

describe('candidate pictures', () => {
  it('a band is mean ± 1.96 σ drawn as one closed polygon per candidate', () => {
    const t = candidateBandTraces([0, 1], [{ name: 'A', colour: '#102030', mean: [1, 2], std: [0.5, 1] }]);
    expect(t).toHaveLength(2);
    expect(t[0].x).toEqual([0, 1, 1, 0]);
    const y = t[0].y as number[];
    expect(y[0]).toBeCloseTo(1 + 1.959963984540054 * 0.5, 14);
    expect(y[2]).toBeCloseTo(2 - 1.959963984540054, 14);
    expect(t[0].fillcolor).toBe('rgba(16, 32, 48, 0.14)');
    expect(() => withAlpha('teal', 1)).toThrow(/#rrggbb/);
  });

  it('draws each candidate’s realisations in its colour with one legend entry per candidate', () => {
    const draws = { rows: 2, cols: 3, data: Float64Array.from([1, 2, 3, 4, 5, 6]) };
    const t = candidateDrawTraces(Float64Array.from([0, 1, 2]), [
      { id: 'a', name: 'A', colour: '#102030', draws },
      { id: 'b', name: 'B', colour: '#405060', draws: { rows: 1, cols: 3, data: Float64Array.from([7, 8, 9]) } },
    ]);
    expect(t.map((x) => [x.name, x.showlegend, x.legendgroup])).toEqual([
      ['A draw 1', true, 'a'],
      ['A draw 2', false, 'a'],
      ['B draw 1', true, 'b'],
    ]);
    expect(t[1].x).toEqual([0, 1, 2]);
    expect(t[1].y).toEqual([4, 5, 6]);
    expect(t[2].line).toMatchObject({ color: '#405060' });
    expect(candidateTruthTrace([0, 1], Float64Array.from([3, 4]))).toMatchObject({ name: 'truth', x: [0, 1], y: [3, 4] });
    expect(candidateLineLayout('T', 'x (m)', 'T (K)')).toMatchObject({
      xaxis: { title: { text: 'x (m)' } },
      yaxis: { title: { text: 'T (K)' } },
    });
  });

  it('maps a candidate on the shared range, rows along the second axis drawn downwards', () => {
    const grid = { shape: [2, 2], spacing: [1, 3], origin: [0, 1], unit: 'm', axes: ['x', 'depth'] };
    const scale: [number, string][] = [
      [0, '#000000'],
      [1, '#ffffff'],
    ];
    const t = candidateMapTrace(grid, [1, 2, 3, 4], 'mean', scale, [-5, 5]);
    expect(t).toMatchObject({
      type: 'heatmap',
      x: [0, 1],
      y: [1, 4],
      z: [
        [1, 2],
        [3, 4],
      ],
      zmin: -5,
      zmax: 5,
      colorscale: scale,
    });
    const l = candidateMapLayout(grid, 'A: posterior mean');
    expect(l.yaxis).toMatchObject({ autorange: 'reversed', scaleanchor: 'x', title: { text: 'depth (m) ↓' } });
    expect(l.xaxis).toMatchObject({ title: { text: 'x (m)' } });
  });

  it('rank histogram has the flat reference at total / bins', () => {
    const t = rankTraces([2, 4, 6]);
    expect(t[1].y).toEqual([4, 4]);
  });
});

describe('scores table rows', () => {
  const ok = (logEvidence: number, chi2: number): CandidateScores => ({
    ok: true,
    logEvidence,
    looLogScore: logEvidence - 1,
    chi2OverExpected: chi2,
    chi2Interval95OverExpected: [0.25, 2.5],
    chi2UpperTail: 0.5,
    predictiveReduced: 1,
    predictiveP: 0.5,
    conditionNumber: 10 * logEvidence,
    mean: new Float64Array(1),
    std: new Float64Array(1),
    draws: { rows: 0, cols: 1, data: new Float64Array(0) },
  });
  const cands = [
    { id: 'a', name: 'A', colour: '#000000' },
    { id: 'b', name: 'B', colour: '#111111' },
    { id: 'c', name: 'C', colour: '#222222' },
  ];

  it('one row per candidate with full-precision values; errors and missing scores shown as dashes', () => {
    const rows = scoreRows(cands, [ok(3, 1.4), ok(5, 0.9), { ok: false, error: 'terms[0].variance must be > 0' }], null);
    expect(rows).toHaveLength(3);
    expect(rows[0].cells.map((c) => c.column)).toEqual(SCORE_COLUMNS.map((c) => c.id));
    expect(rows[1].cells.find((c) => c.column === 'logEvidence')!.value).toBe(5);
    expect(rows[2].error).toMatch(/variance/);
    expect(rows[2].cells.every((c) => c.text === '—')).toBe(true);
    // The data-fit cell carries its reference: the 95% interval on the same scale.
    expect(rows[0].cells.find((c) => c.column === 'chi2')!.text).toBe('1.4 (95%: 0.25–2.5)');
    const col = (id: string) => SCORE_COLUMNS.find((c) => c.id === id)!;
    expect(bestRow(rows, col('logEvidence'))).toBe(1);
    expect(bestRow(rows, col('chi2'))).toBe(1); // |0.9 − 1| < |1.4 − 1|
    expect(bestRow(rows, col('condition'))).toBe(0);
    expect(bestRow(rows, col('ppp'))).toBeNull();
  });

  it('coverage comes from the diagonal of the cross-table of the same candidates', () => {
    const cross = { size: 2, coverage68: [0.7, 0.1, 0.2, 0.6], coverage95: [0.95, 0.3, 0.4, 0.9] };
    const rows = scoreRows(cands.slice(0, 2), [ok(1, 1), ok(2, 1)], cross);
    expect(rows[0].cells.find((c) => c.column === 'coverage')!.value).toBe(0.7);
    expect(rows[1].cells.find((c) => c.column === 'coverage')!.text).toBe('0.6 / 0.9');
    // A table for a different candidate list is not used.
    expect(scoreRows(cands, null, cross)[0].cells.find((c) => c.column === 'coverage')!.value).toBeNull();
  });

  it('styles are handed out in order, skipping colours already taken; numbers format readably', () => {
    expect(nextCandidateStyle([]).name).toBe(CANDIDATE_STYLES[0].name);
    expect(nextCandidateStyle([CANDIDATE_STYLES[0].colour]).name).toBe(CANDIDATE_STYLES[1].name);
    expect(fmt(123456)).toBe('1.235e+5');
    expect(fmt(0.5)).toBe('0.5');
    expect(fmt(Number.POSITIVE_INFINITY)).toBe('∞');
    expect(fmt(null)).toBe('—');
  });
});
