import { describe, expect, it } from 'vitest';
import { GRAVITATIONAL_CONSTANT, gravityOperator, lineMassGz, prismGz } from '../../../src/core/problems/potential.ts';

/**
 * Midpoint-rule quadrature of the line-mass kernel g_z = 2Gλz/(x²+z²) (Blakely 1995, memory) over
 * the prism: independent of the closed-form primitive under test. Its relative error is O(h²);
 * with 400 × 400 points it is below 1e-5 for the prisms used here (checked by comparing 200 and 400).
 */
function quadrature(rho: number, x1: number, x2: number, z1: number, z2: number, n: number): number {
  const hx = (x2 - x1) / n;
  const hz = (z2 - z1) / n;
  let s = 0;
  for (let i = 0; i < n; i++) {
    const x = x1 + (i + 0.5) * hx;
    for (let j = 0; j < n; j++) s += lineMassGz(rho * hx * hz, x, z1 + (j + 0.5) * hz);
  }
  return s;
}

describe('prismGz', () => {
  it.each([
    [300, -25, 25, 10, 35],
    [-150, 100, 180, 40, 60],
    [2000, -500, -300, 5, 400],
  ])('density %f, x ∈ [%f, %f], z ∈ [%f, %f] agrees with quadrature of the line-mass kernel', (rho, x1, x2, z1, z2) => {
    const closed = prismGz(rho, x1, x2, z1, z2);
    const q200 = quadrature(rho, x1, x2, z1, z2, 200);
    const q400 = quadrature(rho, x1, x2, z1, z2, 400);
    // Richardson: the O(h²) midpoint error of q400 is about (q200 − q400)/3.
    const err = Math.abs(q200 - q400) / 3;
    expect(Math.abs(closed - q400)).toBeLessThan(2 * err + 1e-12 * Math.abs(closed));
    expect(Math.abs(closed - (4 * q400 - q200) / 3)).toBeLessThan(1e-6 * Math.abs(closed));
  });
  it('far away equals a line mass at the centre', () => {
    // Far-field limit of a compact 2-D body (common practice, no source): mass per length ρ·w·t.
    const g = prismGz(100, 5000, 5010, 2000, 2010);
    expect(g / lineMassGz(100 * 100, 5005, 2005)).toBeCloseTo(1, 5);
  });
  it('an infinite slab tends to the Bouguer value 2πGρt', () => {
    // Bouguer slab g = 2πGρt (Blakely 1995 / any gravity text; memory).
    const g = prismGz(1000, -1e7, 1e7, 10, 30);
    expect(g / (2 * Math.PI * GRAVITATIONAL_CONSTANT * 1000 * 20)).toBeCloseTo(1, 5);
  });
  it('rejects a prism above the station', () => {
    expect(() => prismGz(1, 0, 1, -1, 2)).toThrow('prismGz: depths must be 0 < z1 < z2');
  });
});

describe('gravityOperator', () => {
  it('decays with depth below a station and rejects stations inside the grid', () => {
    const grid = { shape: [3, 4], spacing: [10, 5], origin: [5, 2.5] };
    const G = gravityOperator(grid, [[15, -1]]);
    if (G.kind !== 'dense') throw new Error('expected a dense operator');
    const g = G.matrix;
    const col = [1, 4, 7, 10].map((j) => g.data[j]);
    for (let k = 1; k < col.length; k++) expect(col[k]).toBeLessThan(col[k - 1]);
    expect(() => gravityOperator(grid, [[15, 3]])).toThrow('stations[0].z must be a depth above the grid top 0, got 3');
  });
});
