import { describe, expect, it } from 'vitest';
import {
  candidateRanges,
  clippedFraction,
  constantValue,
  DIVERGING,
  divergingRange,
  effectiveRange,
  SEQUENTIAL,
  sequentialRange,
  signedView,
  trueAspectHeight,
} from '../../src/app/colourScales.ts';

describe('colour ranges', () => {
  it('a diverging range is symmetric about the prior mean and covers the largest departure of any field', () => {
    // realisation departs −3 below the mean 10, the posterior mean +1.5 above: half-width 3 on both sides
    const r = divergingRange(
      [
        [8, 7, 11],
        [11.5, 10],
      ],
      10,
    );
    expect(r).toEqual([7, 13]);
    expect((r[0] + r[1]) / 2).toBe(10);
    // every value of every field lies inside
    expect(
      clippedFraction(
        [
          [8, 7, 11],
          [11.5, 10],
        ],
        r,
      ),
    ).toBe(0);
  });

  it('skips non-finite values and never returns an empty range', () => {
    expect(divergingRange([[2, Number.NaN, 5]], 2)).toEqual([-1, 5]);
    const flat = divergingRange([[4, 4]], 4);
    expect(flat[1]).toBeGreaterThan(flat[0]);
    expect((flat[0] + flat[1]) / 2).toBe(4);
  });

  it('a sequential range starts at 0 and ends at the largest magnitude', () => {
    expect(
      sequentialRange([
        [0.2, 0.9],
        [0.4, 1.3],
      ]),
    ).toEqual([0, 1.3]);
    expect(sequentialRange([[0, 0]])).toEqual([0, 1]);
  });

  it('limits fixed by hand replace the automatic range about the same centre; invalid ones are ignored', () => {
    expect(effectiveRange([7, 13], 10, { half: 1 })).toEqual([9, 11]);
    expect(effectiveRange([7, 13], 10, { half: null })).toEqual([7, 13]);
    expect(effectiveRange([7, 13], 10, { half: -2 })).toEqual([7, 13]);
    expect(clippedFraction([[8, 10, 12, 10.5]], [9, 11])).toBe(0.5);
  });

  it('draws a field about a constant prior mean as it is, about a varying mean as its departure', () => {
    expect(constantValue([3, 3, 3])).toBe(3);
    expect(constantValue([3, 3.1])).toBeNull();
    const c = signedView([1, 5], [3, 3]);
    expect(c.perturbation).toBe(false);
    expect(c.centre).toBe(3);
    expect(Array.from(c.values)).toEqual([1, 5]);
    const v = signedView([1, 5], [0, 2]);
    expect(v.perturbation).toBe(true);
    expect(v.centre).toBe(0);
    expect(Array.from(v.values)).toEqual([1, 3]);
    expect(() => signedView([1], [1, 2])).toThrow(/1 values, prior mean 2/);
  });

  it('the diverging scale is neutral (pale) in the middle and the sequential scale runs pale to dark', () => {
    const lum = (hex: string) => {
      const n = Number.parseInt(hex.slice(1), 16);
      return 0.2126 * (n >> 16) + 0.7152 * ((n >> 8) & 255) + 0.0722 * (n & 255);
    };
    const mid = DIVERGING.find(([t]) => t === 0.5)![1];
    for (const [, c] of DIVERGING) expect(lum(c)).toBeLessThanOrEqual(lum(mid));
    const ls = SEQUENTIAL.map(([, c]) => lum(c));
    for (let i = 1; i < ls.length; i++) expect(ls[i]).toBeLessThan(ls[i - 1]);
  });

  it('pinned candidates share one signed range about their common constant mean and one std range', () => {
    const a = {
      prior: { mean: { constant: 5 } },
      signed: [
        [4, 6],
        [5, 8],
      ],
      std: [0.5, 1],
    };
    const b = { prior: { mean: { constant: 5 } }, signed: [[1, 5]], std: [2, 0.1] };
    const r = candidateRanges([a, b], { half: null });
    expect(r.signed).toEqual([1, 9]);
    expect(r.std).toEqual([0, 2]);
    expect(candidateRanges([a, b], { half: 2 }).signed).toEqual([3, 7]);
    // different means: centred on the midpoint of all values (1 … 8)
    expect(candidateRanges([a, { ...b, prior: { mean: { constant: 0 } } }], { half: null }).centre).toBe(4.5);
  });

  it('a 2 km × 0.5 km section gets a plot area four times wider than high', () => {
    const m = { l: 50, r: 10, t: 30, b: 40 };
    const h = trueAspectHeight([2000, 500], 460, m);
    expect(h - m.t - m.b).toBe(100);
    expect(trueAspectHeight([10, 1000], 460, m)).toBe(520);
  });
});
