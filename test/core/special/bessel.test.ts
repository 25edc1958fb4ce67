import { describe, expect, it } from 'vitest';
import { besselK, besselKScaled } from '../../../src/core/special/bessel.ts';

const rel = (a: number, b: number): number => (a === b ? 0 : Math.abs(a - b) / Math.abs(b));

describe('besselK: published values', () => {
  // the shared reference notes (REFERENCES.md), "seen" in test-value tables citing A&S Table 9.8 and a computer-algebra system;
  // 16 significant digits, so rounding of the table itself is ≤ 5e-16 relative.
  it.each([
    [0, 0.1, 2.427069024702017],
    [0, 1, 0.4210244382407083],
    [0, 2, 0.1138938727495334],
    [0, 10, 1.778006231616765e-5],
    [1, 0.1, 9.853844780870606],
    [1, 1, 0.6019072301972346],
    [0.5, 0.2, 2.294489339798475],
    [0.5, 1, 0.4610685044478946],
    [0.5, 20, 5.776373974707445e-10],
    [1.5, 1, 0.9221370088957891],
    [1.5, 50, 3.486992497366216e-23],
    [2.5, 1, 3.227479531135262],
    [1.25, 1, 0.7311451879202114],
    [2.75, 1, 4.731184839919541],
  ])('K_%s(%s) = %s', (nu, x, value) => {
    expect(rel(besselK(nu, x), value)).toBeLessThan(2e-15);
  });
});

describe('besselK: half-integer orders against the closed form (DLMF 10.47.9, 10.49.1, 10.49.12)', () => {
  // K_{n+½}(x) = √(π/(2x)) e^{−x} Σ_{k=0}^{n} (n + k)!/(k!(n − k)!) (2x)^{−k}; all terms positive, so the
  // closed form itself is good to ~n ulp. Our value takes n recurrence steps, also ~n ulp: band 1e-14 for n ≤ 10.
  const closed = (n: number, x: number): number => {
    let sum = 0;
    let coef = 1; // (n + k)!/(k!(n − k)!) for k = 0
    for (let k = 0; k <= n; k++) {
      sum += coef * Math.pow(2 * x, -k);
      coef *= ((n + k + 1) * (n - k)) / (k + 1);
    }
    return Math.sqrt(Math.PI / (2 * x)) * Math.exp(-x) * sum;
  };
  const xs = [1e-3, 0.05, 0.7, 1.99, 2, 2.01, 5, 33, 300, 700];
  it.each([0, 1, 2, 3, 5, 10])('n = %s', (n) => {
    for (const x of xs) {
      expect(rel(besselK(n + 0.5, x), closed(n, x))).toBeLessThan(1e-14);
      expect(rel(besselKScaled(n + 0.5, x), closed(n, x) * Math.exp(x))).toBeLessThan(1e-14);
    }
  });
});

describe('besselK: structure', () => {
  it('is even in the order: K_{−ν} = K_ν (DLMF 10.27.3)', () => {
    for (const nu of [0.3, 1, 2.75, 7.5]) for (const x of [0.01, 1, 3, 40]) expect(besselK(-nu, x)).toBe(besselK(nu, x));
  });
  it('is smooth across the series / continued-fraction switch at x = 2: K′ = −(K_{ν−1} + K_{ν+1})/2 (DLMF 10.29.2)', () => {
    // Central difference with step δ: truncation ≈ δ²/6 |K‴/K′| ≲ 1e-10, rounding ≈ ε/δ ≈ 2e-11, so 1e-9.
    // A jump J (relative) between the two methods at x = 2 would show up as ≈ J/(2δ) and fail for J ≳ 2e-14.
    const d = 1e-5;
    for (const nu of [0.3, 0.8, 1.25, 2.75, 7.5]) {
      const fd = (besselK(nu, 2 + d) - besselK(nu, 2 - d)) / (2 * d);
      const exact = -(besselK(nu - 1, 2) + besselK(nu + 1, 2)) / 2;
      expect(rel(fd, exact)).toBeLessThan(1e-9);
    }
  });
  it('follows the large-x expansion e^x K_ν(x) ~ √(π/(2x)) Σ a_k(ν)/x^k (DLMF 10.40.2) at x = 1e3 … 1e6', () => {
    // a_k(ν) = Π_{j=1}^{k} (4ν² − (2j − 1)²) / (k! 8^k); with 8 terms the omitted one is < 1e-25 relative at x ≥ 1e3.
    const asym = (nu: number, x: number): number => {
      let term = 1;
      let sum = 1;
      for (let k = 1; k <= 8; k++) {
        term *= (4 * nu * nu - (2 * k - 1) ** 2) / (k * 8 * x);
        sum += term;
      }
      return Math.sqrt(Math.PI / (2 * x)) * sum;
    };
    for (const nu of [0, 0.3, 1, 2.75, 7.5])
      for (const x of [1e3, 1e4, 1e6]) expect(rel(besselKScaled(nu, x), asym(nu, x))).toBeLessThan(1e-14);
  });
  it('underflows to 0 for large x while the scaled form stays finite; overflows to Infinity for large ν, small x', () => {
    expect(besselK(0, 800)).toBe(0);
    expect(besselKScaled(0, 800)).toBeGreaterThan(0);
    expect(besselK(1, Infinity)).toBe(0);
    // K_200(1e-3) ≈ Γ(200)/2 (2/x)^200 (DLMF 10.30.2) is far above 1.8e308
    expect(besselK(200, 1e-3)).toBe(Infinity);
  });
  it('throws RangeError naming the argument for non-finite ν, x ≤ 0 or NaN', () => {
    expect(() => besselK(Number.NaN, 1)).toThrow(/besselK: nu must be a finite number, got NaN/);
    expect(() => besselK(Infinity, 1)).toThrow(RangeError);
    expect(() => besselK(1, 0)).toThrow(/besselK: x must be a positive number, got 0/);
    expect(() => besselK(1, -2)).toThrow(RangeError);
    expect(() => besselKScaled(1, Number.NaN)).toThrow(/besselKScaled: x must be a positive number, got NaN/);
  });
});
