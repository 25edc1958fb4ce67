/** Figures of the Prior screen: where the curves end, the practical range, the map's reach, Cm's layout. */
import { describe, expect, it } from 'vitest';
import {
  correlationCurveTraces,
  correlationMapLayout,
  correlationMapTraces,
  covarianceLayout,
  covarianceTraces,
  gridExtent,
} from '../../../src/app/figures/prior.ts';
import type { PriorSpec } from '../../../src/core/prior/spec.ts';
import { grid2 } from './fixtures.ts';

const line = { shape: [100], spacing: [1] };
const exponential = (length: number, nugget = 0): PriorSpec => ({
  mean: { constant: 0 },
  terms: [{ kernel: 'exponential', variance: 1, length }],
  nugget,
});

describe('prior figures', () => {
  it('measures the grid as cells × spacing along its longest axis', () => {
    expect(gridExtent(line)).toBe(100);
    expect(gridExtent(grid2)).toBe(10);
  });

  it('runs the curves to four correlation lengths, or to the grid’s end when that is nearer', () => {
    const near = correlationCurveTraces(exponential(5), line);
    const r = near[0].x as number[];
    expect(r[0]).toBe(0);
    expect(r[r.length - 1]).toBeCloseTo(20, 12);
    const far = correlationCurveTraces(exponential(50), line);
    const rf = far[0].x as number[];
    expect(rf[rf.length - 1]).toBeCloseTo(100, 12);
  });

  it('draws the total, each term and the term’s practical range ρ = 0.05 at ℓ·ln 20 (exponential, closed form)', () => {
    const t = correlationCurveTraces(exponential(5, 1), line);
    expect(t.map((x) => x.name)).toEqual(['total (with nugget)', 'term 1: exponential', 'practical range 1']);
    // total = σ² e^(−r/ℓ) / (σ² + nugget) away from zero lag, 1 at zero lag
    const r = t[0].x as number[];
    const total = t[0].y as number[];
    expect(total[0]).toBe(1);
    expect(total[10]).toBeCloseTo(Math.exp(-r[10] / 5) / 2, 12);
    const range = t[2].x as number[];
    expect(range[0]).toBeCloseTo(5 * Math.log(20), 8);
    expect(range[1]).toBe(range[0]);
    expect((t[2].text as string[])[1]).toBe('ρ = 0.05 at 14.98');
  });

  it('maps correlation over offsets up to three correlation lengths with the ρ = 0.05 contour', () => {
    const [heat, contour] = correlationMapTraces(exponential(1), { shape: [50, 50], spacing: [1, 1] });
    const off = heat!.x as number[];
    expect(off[0]).toBeCloseTo(-3, 12);
    expect(off[off.length - 1]).toBeCloseTo(3, 12);
    const z = heat!.z as number[][];
    const mid = (off.length - 1) / 2;
    expect(z[mid][mid]).toBe(1);
    // offset (3, 0) at ℓ = 1: e^(−3)
    expect(z[mid][off.length - 1]).toBeCloseTo(Math.exp(-3), 12);
    expect(contour!.type).toBe('contour');
    expect((contour!.contours as { start: number }).start).toBe(0.05);
    expect((correlationMapLayout(grid2).yaxis as Record<string, unknown>).autorange).toBe('reversed');
  });

  it('draws Cm with row i down and column j across, titled in the squared unit', () => {
    const [t] = covarianceTraces({ rows: 2, cols: 2, data: Float64Array.from([4, 1, 1, 9]) });
    expect(t!.z).toEqual([
      [4, 1],
      [1, 9],
    ]);
    expect((covarianceLayout('m/s').title as { text: string }).text).toBe('Prior covariance Cm ((m/s)²)');
    expect((covarianceLayout('').title as { text: string }).text).toBe('Prior covariance Cm');
  });
});
