import { describe, expect, it } from 'vitest';
import { formatNumber, formatSpread } from '../../src/core/format.ts';

describe('formatNumber: significant digits, never a lost exponent', () => {
  it.each([
    [6.895288123456789e-10, 4, '6.895e-10'],
    [1e-10, 4, '1e-10'],
    [-2.5e-7, 3, '-2.5e-7'],
    [0.0123456, 4, '0.01235'],
    [0.001, 4, '0.001'],
    [0.00099996, 4, '0.001'],
    [12.345678, 4, '12.35'],
    [99999, 4, '1e5'],
    [123456, 4, '1.235e5'],
    [2.5e21, 4, '2.5e21'],
    [0, 4, '0'],
    [-3, 4, '-3'],
  ])('%s with %i digits → %s', (x, d, text) => {
    const s = formatNumber(x, d);
    expect(s).toBe(text);
    // It reads back to the value rounded to d significant digits.
    expect(Number(s)).toBe(Number(x.toPrecision(d)));
  });

  it('keeps the exponent of every magnitude from 1e-300 to 1e300 (reads back within rounding)', () => {
    for (let e = -300; e <= 300; e += 7) {
      const x = 6.895288 * 10 ** e;
      const back = Number(formatNumber(x, 4));
      expect(Math.abs(back - x) / x).toBeLessThan(5e-4);
    }
  });

  it('names non-finite values', () => {
    expect(formatNumber(Number.NaN)).toBe('NaN');
    expect(formatNumber(Infinity)).toBe('Infinity');
    expect(formatNumber(-Infinity)).toBe('-Infinity');
  });
});

describe('formatSpread', () => {
  it('says about 10^k up to double precision, and no absurd powers beyond', () => {
    expect(formatSpread(12.4)).toBe('about 10^12');
    expect(formatSpread(3429)).toBe('more than 10^16 (past the 16 significant digits of double precision)');
    expect(formatSpread(Infinity)).toMatch(/^more than 10\^16/);
  });
});
