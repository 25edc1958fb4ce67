/**
 * Discrete ill-posed test problems from Hansen (1994), "Regularization Tools: a Matlab package for
 * analysis and solution of discrete ill-posed problems", Numer. Algorithms 6:1–35.
 * PUBLIC API: deriv2, shaw, gravity. Each returns the n × n matrix A, the exact discrete solution x
 * and the exact right-hand side b = A x (no noise).
 *
 * Our re-statement of the definitions (they are the ones in the shared reference notes (REFERENCES.md)); indices
 * below are one-based as in the paper, i, j = 1 … n.
 */
import { InputError } from '../errors.ts';
import { matrix, matvec, type Matrix } from '../linalg/matrix.ts';

export interface TestProblem {
  readonly A: Matrix;
  readonly x: Float64Array;
  readonly b: Float64Array;
}

function checkSize(name: string, n: number, even = false): void {
  if (!Number.isInteger(n) || n < 1) throw new InputError(`${name}(n): n`, 'a positive integer', n);
  if (even && n % 2 !== 0) throw new InputError(`${name}(n): n`, 'an even positive integer', n);
}

/**
 * deriv2 (Hansen 1994, example 1): first kind Fredholm equation ∫₀¹ K(s,t) f(t) dt = g(s) with the
 * Green's function of the second derivative, K(s,t) = s(t − 1) for s < t and t(s − 1) for s ≥ t,
 * f(t) = t, g(s) = (s³ − s)/6. Galerkin discretisation with orthonormal box functions
 * φ_i = h^(−1/2) on [(i−1)h, ih], h = 1/n, which integrates to
 *   A_ii = h² ((i² − i + 1/4) h − (i − 2/3)),
 *   A_ij = h² (j − 1/2) ((i − 1/2) h − 1)   for j < i  (A symmetric),
 *   x_i  = h^(3/2) (i − 1/2)                 (the box projection of f(t) = t).
 * (Entries derived by integrating K over the boxes; they match Hansen's published n = 3 matrix.)
 */
export function deriv2(n: number): TestProblem {
  checkSize('deriv2', n);
  const h = 1 / n;
  const h2 = h * h;
  const A = matrix(n, n);
  const a = A.data;
  for (let i = 1; i <= n; i++) {
    a[(i - 1) * n + (i - 1)] = h2 * ((i * i - i + 0.25) * h - (i - 2 / 3));
    for (let j = 1; j < i; j++) {
      const v = h2 * (j - 0.5) * ((i - 0.5) * h - 1);
      a[(i - 1) * n + (j - 1)] = v;
      a[(j - 1) * n + (i - 1)] = v;
    }
  }
  const x = new Float64Array(n);
  const h32 = h * Math.sqrt(h);
  for (let i = 1; i <= n; i++) x[i - 1] = h32 * (i - 0.5);
  return { A, x, b: matvec(A, x) };
}

/**
 * shaw (Hansen 1994): one-dimensional image restoration, s, t ∈ [−π/2, π/2],
 * K(s,t) = (cos s + cos t)² (sin u / u)², u = π (sin s + sin t), discretised with the midpoint rule,
 * h = π/n, s_i = t_i = −π/2 + (i − 1/2) h, A_ij = h K(s_i, t_j); sin u / u := 1 at u = 0.
 * Solution f(t) = 2 exp(−6 (t − 0.8)²) + exp(−2 (t + 0.5)²), x_i = f(t_i). n must be even (as in
 * Hansen's definition, where the symmetric pairs i ↔ n + 1 − i hit u = 0 exactly).
 */
export function shaw(n: number): TestProblem {
  checkSize('shaw', n, true);
  const h = Math.PI / n;
  const t = new Float64Array(n);
  const co = new Float64Array(n);
  const si = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    t[i] = -Math.PI / 2 + (i + 0.5) * h;
    co[i] = Math.cos(t[i]);
    si[i] = Math.sin(t[i]);
  }
  const A = matrix(n, n);
  for (let i = 0; i < n; i++) {
    for (let j = i; j < n; j++) {
      // Mirror pairs sin t_i = −sin t_j: force u = 0 exactly instead of a rounding residue.
      const u = i + j === n - 1 ? 0 : Math.PI * (si[i] + si[j]);
      const sinc = u === 0 ? 1 : Math.sin(u) / u;
      const c = co[i] + co[j];
      const v = h * c * c * sinc * sinc;
      A.data[i * n + j] = v;
      A.data[j * n + i] = v;
    }
  }
  const x = new Float64Array(n);
  for (let i = 0; i < n; i++) x[i] = 2 * Math.exp(-6 * (t[i] - 0.8) ** 2) + Math.exp(-2 * (t[i] + 0.5) ** 2);
  return { A, x, b: matvec(A, x) };
}

/**
 * gravity (Hansen 1994, example 1): vertical gravity of a mass distribution f(t) at depth d = 0.25
 * below the surface, s, t ∈ [0, 1], K(s,t) = d (d² + (s − t)²)^(−3/2), midpoint rule h = 1/n,
 * s_i = t_i = (i − 1/2) h, A_ij = h K(s_i, t_j); f(t) = sin(π t) + ½ sin(2π t).
 */
export function gravity(n: number, depth = 0.25): TestProblem {
  checkSize('gravity', n);
  if (!(depth > 0) || !Number.isFinite(depth)) throw new InputError('gravity(n, depth): depth', 'a finite number > 0', depth);
  const h = 1 / n;
  const t = new Float64Array(n);
  for (let i = 0; i < n; i++) t[i] = (i + 0.5) * h;
  const A = matrix(n, n);
  for (let i = 0; i < n; i++) {
    for (let j = 0; j < n; j++) {
      const e = t[i] - t[j];
      A.data[i * n + j] = (h * depth) / Math.pow(depth * depth + e * e, 1.5);
    }
  }
  const x = new Float64Array(n);
  for (let i = 0; i < n; i++) x[i] = Math.sin(Math.PI * t[i]) + 0.5 * Math.sin(2 * Math.PI * t[i]);
  return { A, x, b: matvec(A, x) };
}
