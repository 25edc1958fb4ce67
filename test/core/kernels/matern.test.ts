import { describe, expect, it } from 'vitest';
import { maternBessel, maternCorrelationFunction, matern12, matern32, matern52 } from '../../../src/core/kernels/matern.ts';
import { gamma } from '../../../src/core/special/gamma.ts';

const H = [1e-8, 1e-4, 0.01, 0.1, 0.3, 0.7, 1, 1.4, 2, 3, 5, 8, 13, 21, 40];
const rel = (a: number, b: number): number => (a === b ? 0 : Math.abs(a - b) / Math.abs(b));

describe('Matérn general-ν path against the closed forms (Rasmussen & Williams 2006 eq. 4.17)', () => {
  it.each([
    [0.5, matern12],
    [1.5, matern32],
    [2.5, matern52],
  ])('ν = %s agrees to 1e-13 relative', (nu, closed) => {
    const f = maternBessel(nu);
    for (const h of H) expect(rel(f(h), closed(h))).toBeLessThan(1e-13);
  });
  it('closed forms at h = 1 match the derived values 0.367879, 0.483358, 0.523994 (REFERENCES.md)', () => {
    expect(matern12(1)).toBeCloseTo(0.367879, 6);
    expect(matern32(1)).toBeCloseTo(0.483358, 6);
    expect(matern52(1)).toBeCloseTo(0.523994, 6);
  });
  it('uses the closed forms for ν = 1/2, 3/2, 5/2 and the Bessel path otherwise', () => {
    expect(maternCorrelationFunction(1.5)).toBe(matern32);
    expect(maternCorrelationFunction(1.5000001)(0.7)).toBeCloseTo(matern32(0.7), 6);
  });
});

describe('Matérn near h = 0 (no 0·∞)', () => {
  it('is exactly 1 at h = 0 and finite in [0, 1] down to the smallest double', () => {
    for (const nu of [0.01, 0.3, 0.8, 1, 2.75, 7.5, 30, 100, 1000]) {
      const f = maternBessel(nu);
      expect(f(0)).toBe(1);
      for (const h of [5e-324, 1e-300, 1e-100, 1e-20]) {
        const r = f(h);
        expect(r).toBeGreaterThanOrEqual(0);
        expect(r).toBeLessThanOrEqual(1);
      }
    }
  });
  it('follows the small-argument expansion for ν < 1 (DLMF 10.27.4, 10.25.2, 5.5.3)', () => {
    // From K_ν = π/(2 sin νπ) (I_{−ν} − I_ν), the leading terms of I_{±ν} and the reflection formula
    // Γ(ν)Γ(1 − ν) = π/sin νπ (derived):
    //   1 − ρ = Γ(1 − ν)/Γ(1 + ν) (z/2)^{2ν} − z²/(4(1 − ν)) + O(z^{2+2ν}),
    // so the omitted part is ≈ z² ≤ 2e-6 relative at z ≤ 1.3e-3; rounding of 1 − ρ (≥ 1e-6 here) is ≤ 2e-10.
    for (const nu of [0.3, 0.6, 0.8]) {
      const f = maternBessel(nu);
      for (const h of [1e-4, 1e-3]) {
        const z = Math.sqrt(2 * nu) * h;
        const expansion = (gamma(1 - nu) / gamma(1 + nu)) * Math.pow(z / 2, 2 * nu) - (z * z) / (4 * (1 - nu));
        expect(rel(1 - f(h), expansion)).toBeLessThan(1e-5);
      }
    }
  });
  it('follows 1 − ρ ≈ z²/(4(ν − 1)) = ν h²/(2(ν − 1)) for ν > 1 (derived from DLMF 10.31.1 / 10.25.2)', () => {
    // Next terms are O(z⁴) and O(z^{2ν}) (ν < 2); at h = 1e-3 with ν ≥ 1.25 they are ≤ 1e-3 relative
    // (z^{2ν−2} = (√(2ν)·1e-3)^{0.5} ≈ 0.04 for ν = 1.25, so that case uses h = 1e-6: 2e-3);
    // rounding of 1 − ρ ≈ 1e-7 is 2e-9 relative.
    const cases: [number, number, number][] = [
      [1.25, 1e-6, 3e-3],
      [2.75, 1e-3, 1e-3],
      [7.5, 1e-3, 1e-4],
      [30, 1e-3, 1e-4],
    ];
    for (const [nu, h, tol] of cases) {
      const z = Math.sqrt(2 * nu) * h;
      expect(rel(1 - maternBessel(nu)(h), (z * z) / (4 * (nu - 1)))).toBeLessThan(tol);
    }
  });
});

describe('Matérn → Gaussian as ν → ∞', () => {
  // Derived (first order in 1/ν): the spectral density (R&W eq. 4.15) in our scaling is ∝ (1 + ω²/(2ν))^{−(ν+d/2)}
  // = e^{−ω²/2} [1 + (ω⁴/8 − ω²/4)/ν + O(ν⁻²)] in d = 1; Fourier-transforming with the Gaussian moments
  // E[ω² cos ωh] = (1 − h²) e^{−h²/2}, E[ω⁴ cos ωh] = (3 − 6h² + h⁴) e^{−h²/2} and normalising gives
  //   ρ_ν(h) = e^{−h²/2} [1 + h²(h² − 4)/(8ν)] + O(ν⁻²).
  // Check: near 0 this gives 1 − h²/2 − h²/(2ν), as does 1 − νh²/(2(ν − 1)) above.
  const hs = Array.from({ length: 800 }, (_, i) => (i + 1) * 0.01);
  const gauss = (h: number): number => Math.exp(-0.5 * h * h);
  const first = (h: number, nu: number): number => (gauss(h) * h * h * (h * h - 4)) / (8 * nu);
  const M1 = Math.max(...hs.map((h) => Math.abs(first(h, 1)))); // max_h |e^{−h²/2} h²(h² − 4)/8| ≈ 0.2306
  const errors = (nu: number): { e1: number; e2: number } => {
    const f = maternBessel(nu);
    let e1 = 0;
    let e2 = 0;
    for (const h of hs) {
      const d = f(h) - gauss(h);
      e1 = Math.max(e1, Math.abs(d));
      e2 = Math.max(e2, Math.abs(d - first(h, nu)));
    }
    return { e1, e2 };
  };
  const e = { 10: errors(10), 100: errors(100), 1000: errors(1000) };
  it('max |ρ_ν − ρ_Gauss| · ν approaches max |e^{−h²/2}h²(h² − 4)/8| with an O(1/ν) deviation', () => {
    // measured: ν·e1 = 0.22679 (ν = 10), 0.23028 (100), 0.23055 (1000) against M1 = 0.23058
    expect(Math.abs(100 * e[100].e1 - M1)).toBeLessThan((2 * M1) / 100);
    expect(Math.abs(1000 * e[1000].e1 - M1)).toBeLessThan((2 * M1) / 1000);
  });
  it('the remainder after the first-order term falls like 1/ν² (ratio 100 per decade of ν)', () => {
    // measured: ν²·e2 = 0.183 (10), 0.195 (100), 0.196 (1000)
    const r1 = e[10].e2 / e[100].e2;
    const r2 = e[100].e2 / e[1000].e2;
    for (const r of [r1, r2]) {
      expect(r).toBeGreaterThan(80);
      expect(r).toBeLessThan(125);
    }
  });
});

describe('Matérn far tail and arguments', () => {
  it('decays to exactly 0 without NaN for very large h, also for large ν', () => {
    for (const nu of [0.3, 0.8, 7.5, 30, 1000]) {
      const f = maternBessel(nu);
      expect(f(1e4)).toBe(0);
      expect(Number.isNaN(f(1e300))).toBe(false);
    }
  });
  it('large ν keeps the e^{−z} scaling without overflow: ν = 1000 at z = √2000·h ≫ 700 is tiny but positive', () => {
    // accuracy there is checked against scipy in log form in test/reference/kernels.test.ts
    const v = maternBessel(1000)(30);
    expect(v).toBeGreaterThan(0);
    expect(v).toBeLessThan(1e-100);
  });
  it('rejects ν that is not finite and > 0', () => {
    for (const bad of [0, -1, Number.NaN, Infinity]) expect(() => maternBessel(bad)).toThrow(RangeError);
    expect(() => maternCorrelationFunction(-2)).toThrow(/matern: nu must be a finite number > 0, got -2/);
  });
});
