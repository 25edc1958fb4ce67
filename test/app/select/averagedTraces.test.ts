import { describe, expect, it } from 'vitest';
import { averagedChange, averagedMaps, averagedTraces1D } from '../../../src/app/select/averagedTraces.ts';
import { DIVERGING, SEQUENTIAL } from '../../../src/app/colourScales.ts';
import { demoById } from '../../../src/core/problems/demos.ts';
import { averagedPosterior } from '../../../src/core/tuning/averaged.ts';
import { evidenceMap, termLength } from '../../../src/core/tuning/index.ts';
import { runTuning } from '../../../src/worker/tuning.ts';

describe('averaged posterior beside the chosen prior', () => {
  const chosen = { mean: [1, 2, 3], std: [0.5, 0.5, 1] };
  const averaged = { mean: [1.5, 2, 2], std: [0.6, 0.7, 2] };

  it('1-D: both 95% bands and both means', () => {
    const t = averagedTraces1D([0, 1, 2], chosen, averaged);
    expect(t.map((x) => x.name)).toEqual(['averaged 95%', 'this prior 95%', 'averaged mean', 'this prior: mean']);
    expect(t[2].y).toEqual([1.5, 2, 2]);
  });

  it('2-D: the two means on one diverging range about the prior mean, the two stds on one sequential range', () => {
    const grid = { shape: [3, 1], spacing: [1, 1] };
    const m = averagedMaps(grid, 'K', [2, 2, 2], chosen, averaged);
    expect(m.range).toEqual([1, 3]);
    expect(m.srange).toEqual([0, 2]);
    expect(m.chosenMean[0].colorscale).toBe(DIVERGING);
    expect([m.averagedMean[0].zmin, m.averagedMean[0].zmax]).toEqual([1, 3]);
    expect(m.averagedStd[0].colorscale).toBe(SEQUENTIAL);
  });

  it('says how far the mean moved and how the largest std changed', () => {
    expect(averagedChange(chosen, averaged)).toEqual({ maxMeanChange: 1, stdRatio: 2 });
  });

  it('the worker request gives the core result for the same map', async () => {
    const { problem, startPrior } = demoById('borehole-log').build();
    const t0 = startPrior.terms[0];
    const map = evidenceMap(problem, startPrior, {
      term: 0,
      lengths: { min: termLength(t0) / 3, max: 3 * termLength(t0), count: 4 },
      variances: { min: t0.variance / 5, max: 5 * t0.variance, count: 3 },
    });
    const viaWorker = await runTuning(
      problem,
      { id: 1, kind: 'averaged', problemVersion: 1, prior: startPrior, map, hyperPrior: 'log-uniform' },
      () => {},
      { aborted: false },
    );
    const direct = averagedPosterior(problem, startPrior, map);
    expect(Array.from(viaWorker.mean)).toEqual(Array.from(direct.mean));
    expect(Array.from(viaWorker.std)).toEqual(Array.from(direct.std));
  });
});
