import { describe, expect, it } from 'vitest';
import {
  fitTraces,
  mapLayout,
  overviewFit,
  overviewFitAxis,
  overviewMaps,
  posteriorTraces1D,
  priorTraces1D,
} from '../../../src/app/overview/traces.ts';
import { DIVERGING, SEQUENTIAL } from '../../../src/app/colourScales.ts';

const grid = { shape: [3, 2], spacing: [100, 25], origin: [50, 12.5], unit: 'm', axes: ['x', 'depth'] };

describe('overview traces', () => {
  it('1-D prior panel: the prior 95% band, the prior mean and three realisations (rows of the draws matrix)', () => {
    const draws = { data: Float64Array.from([1, 2, 3, 4, 5, 6, 7, 8]), rows: 4, cols: 2 };
    const t = priorTraces1D([0, 1], draws, [0, 0], [1, 2]);
    expect(t.map((x) => x.name)).toEqual(['prior 95%', 'prior mean', 'realisation 1', 'realisation 2', 'realisation 3']);
    expect(Array.from(t[3].y as Float64Array)).toEqual([3, 4]);
    // band upper edge = mean + 1.96 σ
    expect((t[0].y as Float64Array)[1]).toBeCloseTo(1.959963984540054 * 2, 12);
  });

  it('1-D posterior panel: bands only when the standard deviation is known; truth when given', () => {
    const post = { mean: [1, 2], priorMean: [0, 0], priorStd: [1, 1], std: null };
    expect(posteriorTraces1D([0, 1], post, null).map((x) => x.name)).toEqual(['prior 95%', 'posterior mean']);
    expect(posteriorTraces1D([0, 1], { ...post, std: [0.1, 0.2] }, [1, 1]).map((x) => x.name)).toEqual([
      'prior 95%',
      'posterior 95%',
      'posterior 68%',
      'truth',
      'posterior mean',
    ]);
  });

  it('data fit: observed with its σ as error bars and the prediction, against datum number from 1', () => {
    const t = fitTraces([5, 6], [0.5, 0.7], [5.1, 5.8]);
    expect(t[0].x).toEqual([1, 2]);
    expect((t[0].error_y as { array: number[] }).array).toEqual([0.5, 0.7]);
    expect(t[1].y).toEqual([5.1, 5.8]);
  });

  it('data fit of point data with positions: against position along the survey, sorted, datum numbers kept', () => {
    const positions = { rows: 3, cols: 2, data: Float64Array.from([250, 0, 50, 0, 150, 0]) };
    const p = { grid, values: [1, 2, 3], sigma: [0.1, 0.2, 0.3], dataUnit: 'mGal', geometry: { kind: 'points' as const, positions } };
    const t = overviewFit(p, { predicted: [1.5, 2.5, 3.5], residuals: [5, 5, 5] });
    expect(t[0].x).toEqual([50, 150, 250]);
    expect(t[0].y).toEqual([2, 3, 1]);
    expect(t[0].customdata).toEqual([2, 3, 1]);
    expect(t[1].y).toEqual([2.5, 3.5, 1.5]);
    expect(overviewFitAxis(p)).toMatch(/^x.*m.*where measured$/);
    // Without geometry: against datum number, as before.
    const none = { ...p, geometry: null };
    expect(overviewFit(none, { predicted: [1.5, 2.5, 3.5], residuals: [0, 0, 0] })[0].x).toEqual([1, 2, 3]);
    expect(overviewFitAxis(none)).toBe('datum number');
  });

  it('2-D maps: realisations and posterior mean share one diverging range centred on the constant prior mean', () => {
    const mean0 = new Float64Array(6).fill(10);
    const draws = { data: Float64Array.from([10, 11, 12, 9, 10, 10, 10, 10, 10, 10, 4, 10]), rows: 2, cols: 6 };
    const post = {
      mean: Float64Array.from([10, 10.5, 11, 10, 10, 10]),
      priorStd: new Float64Array(6).fill(3),
      std: new Float64Array(6).fill(1),
    };
    const m = overviewMaps(grid, 'kg/m³', mean0, draws, post, { half: null });
    // largest departure: 4 − 10 = −6 in realisation 2
    expect(m.signedRange).toEqual([4, 16]);
    for (const t of [...m.draws.flat(), ...m.mean!]) {
      expect([t.zmin, t.zmax]).toEqual([4, 16]);
      expect(t.colorscale).toBe(DIVERGING);
    }
    expect(m.std![0].colorscale).toBe(SEQUENTIAL);
    expect([m.std![0].zmin, m.std![0].zmax]).toEqual([0, 3]);
    expect(m.std![0].z).toEqual([
      [1, 1, 1],
      [1, 1, 1],
    ]);
    // limits by hand
    const fixed = overviewMaps(grid, 'kg/m³', mean0, draws, post, { half: 2 });
    expect([fixed.draws[0][0].zmin, fixed.draws[0][0].zmax]).toEqual([8, 12]);
    expect(fixed.perturbation).toBe(false);
  });

  it('2-D maps about a varying prior mean are drawn as departures from it, centred on 0', () => {
    const mean0 = Float64Array.from([0, 1, 2, 0, 1, 2]);
    const draws = { data: Float64Array.from([1, 1, 1, 1, 1, 1]), rows: 1, cols: 6 };
    const m = overviewMaps(grid, 'm/s', mean0, draws, null, { half: null });
    expect(m.perturbation).toBe(true);
    expect(m.draws[0][0].z).toEqual([
      [1, 0, -1],
      [1, 0, -1],
    ]);
    expect(m.signedRange).toEqual([-1, 1]);
    expect(m.mean).toBeNull();
  });

  it('map layout: y anchored to x at ratio 1 (true aspect), axis names with units, depth downwards', () => {
    const l = mapLayout(grid, 'T') as { xaxis: { title: { text: string } }; yaxis: Record<string, unknown> & { title: { text: string } } };
    expect(l.yaxis.scaleanchor).toBe('x');
    expect(l.yaxis.scaleratio).toBe(1);
    expect(l.yaxis.autorange).toBe('reversed');
    expect(l.xaxis.title.text).toBe('x (m)');
    expect(l.yaxis.title.text).toBe('depth (m) ↓');
  });
});

describe('prior band from the spec', () => {
  it('equals the mean vector and √diag Cm of the core assembly (profile and nugget included)', async () => {
    const { priorBand } = await import('../../../src/app/overview/traces.ts');
    const { covarianceMatrix } = await import('../../../src/core/prior/covariance.ts');
    const { meanVector } = await import('../../../src/core/prior/mean.ts');
    const g = { shape: [5], spacing: [1] };
    const prior = {
      mean: { trend: { intercept: 1, slope: [0.5] } },
      terms: [
        { kernel: 'exponential' as const, variance: 2, length: 3 },
        { kernel: 'gaussian' as const, variance: 0.5, length: 1 },
      ],
      nugget: 0.1,
      stdProfile: [1, 2, 0.5, 1, 3],
    };
    const b = priorBand(g, prior);
    const cm = covarianceMatrix(g, prior);
    for (let i = 0; i < 5; i++) expect(b.std[i]).toBeCloseTo(Math.sqrt(cm.data[i * 5 + i]!), 12);
    expect(Array.from(b.mean)).toEqual(Array.from(meanVector(g, prior)));
  });
});
