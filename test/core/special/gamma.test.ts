import { describe, expect, it } from 'vitest';
import { EULER_GAMMA, gamma, lnGamma1p, logGamma } from '../../../src/core/special/gamma.ts';

const rel = (a: number, b: number): number => (a === b ? 0 : Math.abs(a - b) / Math.abs(b));

/** (n − 1)! as an exact integer, then rounded once to double. */
function factorial(n: number): number {
  let f = 1n;
  for (let k = 2n; k <= BigInt(n); k++) f *= k;
  return Number(f);
}

describe('gamma', () => {
  it('Γ(n) = (n − 1)! for n = 1 … 171 (DLMF 5.4.1), within 4 ulp', () => {
    for (let n = 1; n <= 171; n++) expect(rel(gamma(n), factorial(n - 1))).toBeLessThan(9e-16);
  });
  it('Γ(n + ½) = (2n)! √π / (4^n n!) for n = 0 … 80 (DLMF 5.4.6)', () => {
    for (let n = 0; n <= 80; n++) {
      // (2n)!/(4^n n!) as an exact rational rounded once: numerator and denominator are exact BigInts.
      let num = 1n;
      for (let k = BigInt(n + 1); k <= BigInt(2 * n); k++) num *= k;
      const ratio = Number((num * 10n ** 40n) / 4n ** BigInt(n)) / 1e40;
      expect(rel(gamma(n + 0.5), ratio * Math.sqrt(Math.PI))).toBeLessThan(1e-15);
    }
  });
  it('satisfies the duplication formula Γ(2x) = 2^{2x−1} Γ(x) Γ(x + ½)/√π (DLMF 5.5.5) on 0.01 … 85', () => {
    for (let x = 0.01; x < 85; x = x * 1.37 + 0.003) {
      const rhs = (Math.pow(2, 2 * x - 1) * gamma(x) * gamma(x + 0.5)) / Math.sqrt(Math.PI);
      // each side carries a few ulp; 2^{2x−1} via pow adds ≤ 1 ulp
      expect(rel(gamma(2 * x), rhs)).toBeLessThan(4e-15);
    }
  });
  it('satisfies Γ(x + 1) = x Γ(x) across every branch boundary (DLMF 5.5.1)', () => {
    for (const x of [1e-300, 1e-9, 0.4999999, 0.5, 0.75, 1.4999999, 1.5, 2.5, 8.9999, 9, 9.5, 9.9999999, 10, 55.5, 170]) {
      expect(rel(gamma(x + 1), x * gamma(x))).toBeLessThan(3e-15);
    }
  });
  it('overflows to Infinity past x ≈ 171.62 and rejects x ≤ 0 and NaN', () => {
    expect(gamma(171.6)).toBeLessThan(Infinity);
    expect(gamma(171.7)).toBe(Infinity);
    for (const bad of [0, -1, -0.5, Number.NaN]) expect(() => gamma(bad)).toThrow(RangeError);
    expect(() => gamma(-2)).toThrow(/gamma: x must be a positive number, got -2/);
  });
});

describe('logGamma', () => {
  it('is 0 at x = 1 and x = 2 exactly', () => {
    expect(logGamma(1)).toBe(0);
    expect(logGamma(2)).toBe(0);
  });
  it('is relatively accurate next to its zeros: Taylor series of ln Γ(1 + z) (DLMF 5.7.3) for |z| ≤ 1e-4', () => {
    // ln Γ(1 + z) = −γz + ζ(2)z²/2 − ζ(3)z³/3 + ζ(4)z⁴/4 − …; ζ(2) = π²/6, ζ(4) = π⁴/90 (DLMF 25.6.1),
    // ζ(3) = 1.2020569031595942 (Apéry's constant, value from memory; scipy.special.zeta(3) prints the same).
    // The first omitted term ζ(5)|z|⁵/5 is < 3e-21 relative to |γz| for |z| ≤ 1e-4.
    const taylor = (z: number): number =>
      -EULER_GAMMA * z + (Math.PI ** 2 / 12) * z * z - (1.2020569031595942 / 3) * z ** 3 + (Math.PI ** 4 / 360) * z ** 4;
    for (const z of [1e-300, 1e-12, -3e-9, 1e-6, -1e-5, 1e-4, -1e-4]) {
      expect(rel(lnGamma1p(z), taylor(z))).toBeLessThan(4e-16);
      expect(rel(logGamma(1 + z), taylor(1 + z - 1))).toBeLessThan(4e-16); // 1 + z − 1 is the exact shift
      // ln Γ(2 + z) = ln(1 + z) + ln Γ(1 + z) (DLMF 5.5.1) ≈ (1 − γ)z: the two parts (≈ z and ≈ −γz) partly
      // cancel, amplifying their ulp errors by (1 + γ)/(1 − γ) ≈ 3.7, so the band is 4 × 4e-16.
      const z2 = 2 + z - 2;
      expect(rel(logGamma(2 + z), Math.log1p(z2) + taylor(z2))).toBeLessThan(1.6e-15);
    }
  });
  it('agrees with ln Γ(x) where Γ is finite and continues Stirling beyond (DLMF 5.11.1)', () => {
    for (const x of [1e-8, 0.3, 3.3, 9.99, 10, 25.5, 170.5])
      expect(Math.abs(logGamma(x) - Math.log(gamma(x)))).toBeLessThan(2e-15 * Math.max(1, Math.abs(logGamma(x))));
    // Stirling's leading terms at x = 1e6: (x − ½)ln x − x + ½ ln 2π + 1/(12x), next term 1/(360x³) < 1e-20
    const x = 1e6;
    expect(rel(logGamma(x), (x - 0.5) * Math.log(x) - x + 0.5 * Math.log(2 * Math.PI) + 1 / (12 * x))).toBeLessThan(2e-16);
  });
  it('rejects x ≤ 0 and NaN', () => {
    for (const bad of [0, -3, Number.NaN]) expect(() => logGamma(bad)).toThrow(RangeError);
  });
});
