import { describe, expect, it } from 'vitest';
import { chiSquareCdf, chiSquareInterval, chiSquareQuantile, logGamma, regularizedGammaP } from '../../../src/core/inverse/chisquare.ts';

describe('chiSquareQuantile', () => {
  // NIST/SEMATECH e-Handbook of Statistical Methods §1.3.6.7.4, table of χ² critical values
  // (as listed in the shared reference notes (REFERENCES.md), 5–6 significant digits).
  it.each([
    [0.025, 1, 0.0009821],
    [0.975, 1, 5.02389],
    [0.025, 2, 0.0506356],
    [0.975, 2, 7.37776],
    [0.025, 10, 3.24697],
    [0.975, 10, 20.48318],
    [0.95, 10, 18.30704],
  ])('q(%f; df = %i) matches the NIST table value %f', (p, df, want) => {
    expect(Math.abs(chiSquareQuantile(p, df) - want)).toBeLessThanOrEqual(1e-5 * want + 1e-7);
  });
  it('df = 2 has the closed form −2 ln(1 − p)', () => {
    // χ²_2 is exponential with mean 2 (A&S 26.4.1 with ν = 2).
    for (const p of [1e-12, 1e-6, 0.01, 0.3, 0.5, 0.9, 0.999, 1 - 1e-9]) {
      expect(chiSquareQuantile(p, 2) / (-2 * Math.log1p(-p))).toBeCloseTo(1, 12);
    }
  });
  it('round-trips through the CDF over a wide range of p and df', () => {
    for (const df of [0.2, 0.5, 1, 3, 7.5, 40, 300, 5000]) {
      for (const p of [1e-10, 1e-4, 0.025, 0.16, 0.5, 0.84, 0.975, 1 - 1e-6]) {
        const x = chiSquareQuantile(p, df);
        const back = p > 0.5 ? 1 - (1 - chiSquareCdf(x, df)) : chiSquareCdf(x, df);
        expect(Math.abs(back - p)).toBeLessThanOrEqual(1e-12 * Math.max(p, 1e-3));
      }
    }
  });
  it('rejects p outside (0, 1) and bad df with clear messages', () => {
    expect(() => chiSquareQuantile(1, 3)).toThrow('chiSquareQuantile: p must be a probability strictly between 0 and 1, got 1');
    expect(() => chiSquareQuantile(0.5, 0)).toThrow('chiSquareQuantile: degrees of freedom must be a finite number > 0, got 0');
  });
  it('interval is central', () => {
    const [lo, hi] = chiSquareInterval(10, 0.95);
    expect(lo).toBeCloseTo(3.24697, 4);
    expect(hi).toBeCloseTo(20.48318, 4);
  });
});

describe('logGamma and P(a, y)', () => {
  it('Γ at integers and half-integers', () => {
    // Γ(n) = (n−1)!, Γ(1/2) = √π, Γ(n + 1/2) = (2n)! √π / (4ⁿ n!) (DLMF 5.4.1, 5.4.6).
    let f = 1;
    for (let n = 1; n < 25; n++) {
      expect(logGamma(n)).toBeCloseTo(Math.log(f), 12);
      f *= n;
    }
    expect(logGamma(0.5)).toBeCloseTo(0.5 * Math.log(Math.PI), 14);
    expect(logGamma(3.5)).toBeCloseTo(Math.log((15 / 8) * Math.sqrt(Math.PI)), 13);
    expect(logGamma(0.1)).toBeCloseTo(Math.log(9.513507698668732), 13); // Γ(0.1), A&S Table 6.1 via Γ(1.1)/0.1 (memory)
  });
  it('P(1/2, y) = erf(√y)', () => {
    // DLMF 8.4.1 form γ(1/2, y) = √π erf(√y); erf(1) = 0.8427007929497149 (A&S Table 7.1).
    expect(regularizedGammaP(0.5, 1)).toBeCloseTo(0.8427007929497149, 14);
  });
});
