/**
 * Seeded synthetic truth and noise for the demo problems: m_true = m0 + L z with Cm = L Lᵀ
 * (Cholesky) and z standard normal; data d = G m_true + σ e, e standard normal.
 *
 * PROVISIONAL: until src/core/prior/covariance.ts and src/core/sampling/random.ts are real this
 * file carries a minimal dense covariance of the spec (closed-form kernels only) and a small
 * seeded generator; both switch to the shared modules when those land.
 */
import { NotPositiveDefiniteError } from '../errors.ts';
import { cellCoordinates, cellCount, type Grid } from '../grid/grid.ts';
import { correlationFunction } from '../kernels/correlation.ts';
import { cholesky } from '../linalg/cholesky.ts';
import { matrix, type Matrix } from '../linalg/matrix.ts';
import type { PriorSpec } from '../prior/spec.ts';

/** Standard normals from a seeded stream (mulberry32 uniforms, Box–Muller; common practice, no source). */
export function seededNormals(seed: number, count: number): Float64Array {
  let a = seed >>> 0;
  const uniform = (): number => {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    return (((t ^ (t >>> 14)) >>> 0) + 0.5) / 4294967296;
  };
  const out = new Float64Array(count);
  for (let i = 0; i < count; i += 2) {
    const r = Math.sqrt(-2 * Math.log(uniform()));
    const th = 2 * Math.PI * uniform();
    out[i] = r * Math.cos(th);
    if (i + 1 < count) out[i + 1] = r * Math.sin(th);
  }
  return out;
}

/** Dense Cm of the spec (see src/core/prior/spec.ts for the formula). */
export function demoCovariance(grid: Grid, prior: PriorSpec): Matrix {
  const n = cellCount(grid);
  const { x, y } = cellCoordinates(grid);
  const C = matrix(n, n);
  for (const term of prior.terms) {
    const rho = correlationFunction(term.kernel, term.nu);
    const [l1, l2] = term.lengths ?? [term.length!, term.length!];
    const ang = ((term.angle ?? 0) * Math.PI) / 180;
    const c = Math.cos(ang);
    const s = Math.sin(ang);
    for (let i = 0; i < n; i++) {
      for (let j = 0; j <= i; j++) {
        const ex = x[i]! - x[j]!;
        const ey = y[i]! - y[j]!;
        const u = (c * ex + s * ey) / l1;
        const v = (-s * ex + c * ey) / l2;
        const val = term.variance * rho(Math.sqrt(u * u + v * v));
        C.data[i * n + j] += val;
        if (j !== i) C.data[j * n + i] += val;
      }
    }
  }
  const sp = prior.stdProfile;
  if (sp) for (let i = 0; i < n; i++) for (let j = 0; j < n; j++) C.data[i * n + j] *= sp[i]! * sp[j]!;
  const nug = prior.nugget ?? 0;
  for (let i = 0; i < n; i++) C.data[i * n + i] += nug;
  return C;
}

export function demoMean(grid: Grid, prior: PriorSpec): Float64Array {
  const n = cellCount(grid);
  const m = prior.mean;
  if ('constant' in m) return new Float64Array(n).fill(m.constant);
  if ('values' in m) return Float64Array.from(m.values);
  const { x, y } = cellCoordinates(grid);
  const out = new Float64Array(n);
  for (let i = 0; i < n; i++) out[i] = m.trend.intercept + m.trend.slope[0]! * x[i]! + (m.trend.slope[1] ?? 0) * y[i]!;
  return out;
}

/** One prior realisation m0 + L z, z from `seed`. */
export function drawFromPrior(grid: Grid, prior: PriorSpec, seed: number): Float64Array {
  const C = demoCovariance(grid, prior);
  const f = cholesky(C, { inPlace: true });
  if (!f.ok) throw new NotPositiveDefiniteError('demo truth prior covariance', f.pivot, 'add a nugget');
  const L = f.factor;
  const n = L.rows;
  const z = seededNormals(seed, n);
  const out = demoMean(grid, prior);
  for (let i = 0; i < n; i++) {
    let s = 0;
    const o = i * n;
    for (let k = 0; k <= i; k++) s += L.data[o + k]! * z[k]!;
    out[i] += s;
  }
  return out;
}
