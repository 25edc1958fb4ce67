import { describe, expect, it } from 'vitest';
import { Random } from '../../../src/core/sampling/random.ts';
import { InputError } from '../../../src/core/errors.ts';

describe('Random', () => {
  it('doubles lie in [0, 1) and are uniform: chi-square over 100 bins below its 0.999 quantile', () => {
    // df = 99: χ²₀.₉₉₉ ≈ df + z·√(2df) + (2/3)(z² − 1) with z = 3.090 (Wilson–Hilferty-type
    // expansion, A&S 26.4.17, memory) ≈ 99 + 43.5 + 5.7 = 148.2; use 149 (scipy gives 148.23).
    const r = new Random(99);
    const bins = new Float64Array(100);
    const n = 200000;
    let lo = 1;
    let hi = 0;
    for (let k = 0; k < n; k++) {
      const u = r.nextDouble();
      lo = Math.min(lo, u);
      hi = Math.max(hi, u);
      bins[Math.floor(u * 100)]++;
    }
    expect(lo).toBeGreaterThanOrEqual(0);
    expect(hi).toBeLessThan(1);
    const e = n / 100;
    const chi2 = bins.reduce((s, o) => s + ((o - e) * (o - e)) / e, 0);
    expect(chi2).toBeLessThan(149);
  });

  it('normals: sample mean and variance within 4-σ limits (se √(1/n) and √(2/n))', () => {
    const r = new Random(5);
    const z = r.fillNormal(new Float64Array(100000));
    const n = z.length;
    const mean = z.reduce((a, b) => a + b, 0) / n;
    const v = z.reduce((a, b) => a + (b - mean) * (b - mean), 0) / (n - 1);
    expect(Math.abs(mean)).toBeLessThan(4 / Math.sqrt(n));
    expect(Math.abs(v - 1)).toBeLessThan(4 * Math.sqrt(2 / n));
  });

  it('fillNormal gives the nextNormal stream (checked against numpy in test/reference/sampling.test.ts) bit for bit', () => {
    // Lengths that are odd (a spare carries over), cross the 624-word block boundary mid-attempt,
    // and interleave with single draws and integers, which shift where the blocks end.
    const a = new Random(31);
    const b = new Random(31);
    const got: number[] = [];
    const want: number[] = [];
    for (const len of [1, 2, 3, 155, 156, 157, 1001, 0, 7, 4096]) {
      got.push(...a.fillNormal(new Float64Array(len)));
      for (let k = 0; k < len; k++) want.push(b.nextNormal());
      got.push(a.nextNormal(), a.nextUint32(), a.nextDouble());
      want.push(b.nextNormal(), b.nextUint32(), b.nextDouble());
    }
    expect(got.length).toBe(want.length);
    expect(got).toEqual(want);
  });

  it('rejects non-integer or out-of-range seeds', () => {
    for (const s of [-1, 0.5, 2 ** 32, NaN]) expect(() => new Random(s)).toThrow(InputError);
  });
});
