import { describe, expect, it } from 'vitest';
import { InputError } from '../../../src/core/errors.ts';
import { deriv2, gravity, shaw } from '../../../src/core/problems/hansen.ts';

describe('deriv2', () => {
  it('n = 3 matches the published matrix, solution and right-hand side', () => {
    // Hansen (1994), Regularization Tools, deriv2 example 1 with n = 3; values as listed (rounded to
    // 6 significant digits) in the shared reference notes (REFERENCES.md).
    const A = [
      [-0.0277778, -0.0277778, -0.00925926],
      [-0.0277778, -0.0648148, -0.0277778],
      [-0.00925926, -0.0277778, -0.0277778],
    ];
    const x = [0.096225, 0.2886751, 0.4811252];
    const b = [-0.0151465, -0.0347479, -0.0222743];
    const p = deriv2(3);
    A.flat().forEach((v, k) => expect(Math.abs(p.A.data[k] - v)).toBeLessThan(6e-8));
    x.forEach((v, i) => expect(Math.abs(p.x[i] - v)).toBeLessThan(6e-8));
    b.forEach((v, i) => expect(Math.abs(p.b[i] - v)).toBeLessThan(6e-8));
  });
  it('is symmetric', () => {
    const { A } = deriv2(17);
    for (let i = 0; i < 17; i++) for (let j = 0; j < 17; j++) expect(A.data[i * 17 + j]).toBe(A.data[j * 17 + i]);
  });
});

describe('shaw', () => {
  it('is symmetric with the u = 0 diagonal (2 cos s)² h on the anti-diagonal', () => {
    const n = 20;
    const { A } = shaw(n);
    const h = Math.PI / n;
    for (let i = 0; i < n; i++) {
      for (let j = 0; j < n; j++) expect(A.data[i * n + j]).toBe(A.data[j * n + i]);
      const s = -Math.PI / 2 + (i + 0.5) * h;
      // K(s, −s) = (2 cos s)² since sin u / u → 1 (Hansen 1994 kernel definition).
      expect(A.data[i * n + (n - 1 - i)]).toBeCloseTo(h * (2 * Math.cos(s)) ** 2, 14);
    }
  });
  it('rejects odd n with a clear message', () => {
    expect(() => shaw(7)).toThrow(InputError);
    expect(() => shaw(7)).toThrow('shaw(n): n must be an even positive integer, got 7');
  });
});

describe('gravity', () => {
  it('is symmetric Toeplitz with diagonal h/d²', () => {
    const n = 12;
    const { A } = gravity(n);
    // K(s, s) = d / d³ = 1/d² = 16 for d = 0.25 (Hansen 1994 kernel at zero offset).
    for (let i = 0; i < n; i++) expect(A.data[i * n + i]).toBeCloseTo(16 / n, 13);
    for (let i = 1; i < n; i++) for (let j = 1; j < n; j++) expect(A.data[i * n + j]).toBeCloseTo(A.data[(i - 1) * n + j - 1], 13);
  });
  it('rejects non-integer sizes', () => {
    expect(() => gravity(2.5)).toThrow('gravity(n): n must be a positive integer, got 2.5');
  });
});
