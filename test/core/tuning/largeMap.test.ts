/**
 * Evidence maps on the bench problem (test/bench/cases/fft.ts: straight rays, M = 400, Matérn 3/2
 * of length n/8): on 24 × 24, where both routes run, the FFT route's map equals the dense one with
 * the same best cell; on 64 × 64 (N = 4096, where the dense route would build 134 MB per length)
 * the map runs on the FFT route by itself and its best cell is the direct evidence of that prior.
 */
import { describe, expect, it } from 'vitest';
import { benchPrior, benchProblem } from '../../bench/cases/fft.ts';
import { tuningRoute } from '../../../src/core/tuning/dataSpace.ts';
import { evidenceMap, setTermLength } from '../../../src/core/tuning/evidenceMap.ts';
import { logEvidence } from '../../../src/core/tuning/typeII.ts';

const rel = (a: number, b: number): number => Math.abs(a - b) / Math.max(1, Math.abs(b));

describe('evidence map, 24 × 24 bench problem (M = 400) on both routes', () => {
  const problem = benchProblem(24);
  const prior = benchPrior(24);
  const axes = { term: 0, lengths: { min: 5, max: 400, count: 5 }, variances: { min: 1e-3, max: 0.1, count: 6 } };
  const fft = evidenceMap(problem, prior, { ...axes, route: 'fft' });
  const dense = evidenceMap(problem, prior, { ...axes, route: 'dense' });
  it('every cell agrees to 1e-9 and the best cell is the same', () => {
    dense.logEvidence.forEach((v, k) => expect(rel(fft.logEvidence[k], v)).toBeLessThan(1e-9));
    expect(fft.best).not.toBeNull();
    expect(fft.best!.index).toBe(dense.best!.index);
  });
  it('the best cell is inside the map, not on its edge (the comparison is not trivial)', () => {
    const i = Math.floor(fft.best!.index / 6);
    const j = fft.best!.index % 6;
    expect(i > 0 && i < 4 && j > 0 && j < 5).toBe(true);
  });
});

it('evidence map, 64 × 64 bench problem (M = 400): runs on the FFT route', () => {
  const problem = benchProblem(64);
  const prior = benchPrior(64);
  expect(tuningRoute(problem, prior)).toBe('fft');
  const t0 = performance.now();
  const map = evidenceMap(problem, prior, {
    term: 0,
    lengths: { min: 10, max: 160, count: 3 },
    variances: { min: 1e-3, max: 0.1, count: 4 },
  });
  const ms = performance.now() - t0;
  expect(map.cancelled).toBe(false);
  expect(map.logEvidence.every((v) => Number.isFinite(v))).toBe(true);
  const b = map.best!;
  const at = { ...prior, terms: [{ ...setTermLength(prior.terms[0], b.length), variance: b.variance }] };
  expect(rel(b.logEvidence, logEvidence(problem, at))).toBeLessThan(1e-9);
  // Timing for the record (no timed assertion: the machine is shared).
  console.log(`64 × 64, M = 400, 3 × 4 evidence map on the FFT route: ${ms.toFixed(0)} ms`);
}, 120_000);
