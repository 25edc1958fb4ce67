/**
 * Hansen (1994) test problems against an independent numpy/scipy re-implementation
 * (test/reference/hansen_reference.py: deriv2 by Galerkin quadrature of the kernel, shaw and
 * gravity by vectorised kernels) and against the continuous integrals by scipy.integrate.quad.
 */
import { describe, expect, it } from 'vitest';
import { deriv2, gravity, shaw, type TestProblem } from '../../src/core/problems/hansen.ts';
import { runPython } from './python.ts';

interface Packed {
  A: number[][];
  x: number[];
  b: number[];
}
interface Reply {
  deriv2: Record<string, Packed>;
  shaw: Record<string, Packed>;
  gravity: Record<string, Packed>;
  continuous: { shaw: Record<string, number[]>; gravity: Record<string, number[]> };
}

const SIZES = [8, 10, 16, 24, 32];
const ref = runPython<Reply>('hansen_reference.py', { sizes: SIZES, integrals: [16, 32, 64] });

function maxAbs(a: ArrayLike<number>): number {
  let m = 0;
  for (let i = 0; i < a.length; i++) m = Math.max(m, Math.abs(a[i]));
  return m;
}

function compare(ours: TestProblem, theirs: Packed, tol: number): void {
  const n = ours.x.length;
  const flat = theirs.A.flat();
  const scale = maxAbs(flat);
  for (let k = 0; k < n * n; k++) expect(Math.abs(ours.A.data[k] - flat[k])).toBeLessThanOrEqual(tol * scale);
  const xs = maxAbs(theirs.x);
  ours.x.forEach((v, i) => expect(Math.abs(v - theirs.x[i])).toBeLessThanOrEqual(tol * xs));
  const bs = maxAbs(theirs.b);
  ours.b.forEach((v, i) => expect(Math.abs(v - theirs.b[i])).toBeLessThanOrEqual(tol * bs));
}

describe.each(SIZES)('Hansen problems, n = %i, against the numpy/scipy re-implementation', (n) => {
  it('deriv2 (Galerkin quadrature of K(s,t) in scipy)', () => compare(deriv2(n), ref.deriv2[String(n)], 1e-11));
  it('shaw (numpy midpoint rule, np.sinc)', () => compare(shaw(n), ref.shaw[String(n)], 1e-13));
  it('gravity (numpy midpoint rule)', () => compare(gravity(n), ref.gravity[String(n)], 1e-13));
});

describe('midpoint-rule right-hand sides converge to the continuous integrals at O(h²)', () => {
  // Midpoint-rule error is O(h²) for a smooth integrand (common practice, no source): halving h
  // should cut the max error by about 4. We accept ratios in [3, 5].
  for (const [name, make] of [
    ['shaw', shaw],
    ['gravity', gravity],
  ] as const) {
    it(name, () => {
      const errs = [16, 32, 64].map((n) => {
        const g = ref.continuous[name][String(n)];
        const b = make(n).b;
        return maxAbs(b.map((v, i) => v - g[i]));
      });
      for (let k = 0; k + 1 < errs.length; k++) {
        const ratio = errs[k] / errs[k + 1];
        expect(ratio).toBeGreaterThan(3);
        expect(ratio).toBeLessThan(5);
      }
    });
  }
});
