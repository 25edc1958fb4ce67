import { describe, expect, it } from 'vitest';
import { bandTrace, cellAt, commonRange, correlationCurves, correlationMap, scaledDistance, toRows2D, Z95 } from '../../src/app/traces.ts';
import { fromSlider, toSlider } from '../../src/app/controls.tsx';
import { nextSeed } from '../../src/app/view/slice.ts';

const grid2 = { shape: [4, 3], spacing: [2, 5], origin: [1, 2.5] };

describe('trace builders', () => {
  it('lays a flat x-fastest field out as rows of y', () => {
    const f = Float64Array.from({ length: 12 }, (_, i) => i);
    expect(toRows2D(grid2, f)).toEqual([
      [0, 1, 2, 3],
      [4, 5, 6, 7],
      [8, 9, 10, 11],
    ]);
    expect(() => toRows2D(grid2, new Float64Array(11))).toThrow(/11 values, grid has 12 cells/);
  });

  it('maps a clicked coordinate back to the cell index i = ix + nx·iy', () => {
    expect(cellAt(grid2, 1, 2.5)).toBe(0);
    expect(cellAt(grid2, 5.2, 7.4)).toBe(2 + 4 * 1);
    expect(cellAt(grid2, 7, 12.5)).toBe(11);
    expect(cellAt(grid2, 9.5, 2.5)).toBeNull();
  });

  it('closes a band polygon: upper edge forward, lower edge back', () => {
    const t = bandTrace([0, 1, 2], [-1, -2, -3], [1, 2, 3], 'b', 'red');
    expect(Array.from(t.x as Float64Array)).toEqual([0, 1, 2, 2, 1, 0]);
    expect(Array.from(t.y as Float64Array)).toEqual([1, 2, 3, -3, -2, -1]);
  });

  it('uses the two-sided 95% normal quantile', () => {
    // Φ⁻¹(0.975) = 1.959963984540054 (Abramowitz & Stegun 26.2, Table 26.5; value from memory, checked by the
    // identity Φ(z) = ½ erfc(−z/√2) with erfc from the series below)
    const erfcSeries = (x: number) => {
      // erfc x = 1 − (2/√π) Σ (−1)ⁿ x^(2n+1) / (n! (2n+1))  (DLMF 7.6.1)
      let s = 0;
      let term = x;
      for (let n = 0; n < 60; n++) {
        s += term / (2 * n + 1);
        term *= (-x * x) / (n + 1);
      }
      return 1 - (2 / Math.sqrt(Math.PI)) * s;
    };
    expect(0.5 * erfcSeries(-Z95 / Math.SQRT2)).toBeCloseTo(0.975, 12);
  });

  it('marks the exponential practical range where ρ = 0.05, i.e. at ℓ·ln 20 (closed form of e^(−h) = 0.05)', () => {
    const c = correlationCurves({ mean: { constant: 0 }, terms: [{ kernel: 'exponential', variance: 2, length: 10 }] }, 50);
    expect(c.terms[0].practicalRange).toBeCloseTo(10 * Math.log(20), 8);
    expect(c.total[0]).toBe(1);
    // total correlation with a nugget: Σσ²ρ / (Σσ² + nugget) away from zero lag
    const n = correlationCurves({ mean: { constant: 0 }, terms: [{ kernel: 'exponential', variance: 3, length: 10 }], nugget: 1 }, 50, 11);
    expect(n.total[1]).toBeCloseTo((3 * Math.exp(-0.5)) / 4, 12);
  });

  it('rotates anisotropic offsets: along the first axis the first length applies', () => {
    const t = { kernel: 'gaussian' as const, variance: 1, lengths: [4, 1] as const, angle: 30 };
    const a = (30 * Math.PI) / 180;
    expect(scaledDistance(t, 4 * Math.cos(a), 4 * Math.sin(a))).toBeCloseTo(1, 12);
    expect(scaledDistance(t, -Math.sin(a), Math.cos(a))).toBeCloseTo(1, 12);
    const m = correlationMap({ mean: { constant: 0 }, terms: [t] }, 8, 5);
    expect(m.z[2][2]).toBeCloseTo(1, 12);
  });

  it('finds a common colour range over a gallery', () => {
    expect(commonRange([new Float64Array([1, 5]), new Float64Array([-2, 3])])).toEqual([-2, 5]);
    expect(commonRange([])).toEqual([0, 1]);
  });
});

describe('log slider mapping and seeds', () => {
  it('round-trips slider positions through values on a log scale', () => {
    for (const pos of [0, 1, 137, 200, 399, 400]) expect(toSlider(fromSlider(pos, 0.05, 1000), 0.05, 1000)).toBe(pos);
    // the midpoint of a log scale is the geometric mean
    expect(fromSlider(200, 0.01, 100)).toBeCloseTo(1, 10);
  });

  it('moves to a different seed each redraw', () => {
    const seen = new Set<number>();
    let s = 20240611;
    for (let k = 0; k < 50; k++) {
      s = nextSeed(s);
      seen.add(s);
      expect(Number.isInteger(s) && s >= 0).toBe(true);
    }
    expect(seen.size).toBe(50);
  });
});
