/**
 * The reference distribution of the data fit χ² of the posterior mean.
 *
 * PUBLIC API: fitWeights, WeightedChiSquare, dataFitReference, DataFitReference.
 *
 * Derivation (ours; the residual identity is Tarantola 2005, §3.2 algebra). Model: d = G m + e,
 * m ~ N(m0, Cm), e ~ N(0, Cd), K = G Cm Gᵀ + Cd = L Lᵀ, and r0 = d − G m0 ~ N(0, K). The residual of the
 * posterior mean m̃ = m0 + Cm Gᵀ K⁻¹ r0 is
 *
 *   r = d − G m̃ = r0 − G Cm Gᵀ K⁻¹ r0 = (K − G Cm Gᵀ) K⁻¹ r0 = Cd K⁻¹ r0,
 *
 * so χ² = rᵀ Cd⁻¹ r = r0ᵀ K⁻¹ Cd K⁻¹ r0. Write r0 = L z with z ~ N(0, I_M); since K⁻¹ = L⁻ᵀ L⁻¹,
 *
 *   χ² = zᵀ Lᵀ L⁻ᵀ L⁻¹ Cd L⁻ᵀ L⁻¹ L z = zᵀ A z,   A = L⁻¹ Cd L⁻ᵀ (symmetric positive definite).
 *
 * With A = U Λ Uᵀ and w = Uᵀ z ~ N(0, I): χ² = Σ_j λ_j w_j², a weighted sum of independent χ²₁
 * variables with weights λ_j = eigenvalues of A. They lie in (0, 1]: A = I − L⁻¹ G Cm Gᵀ L⁻ᵀ with the
 * subtracted matrix positive semi-definite. Mean Σ λ_j = tr(K⁻¹ Cd) = M − tr(K⁻¹ G Cm Gᵀ) = M − tr R
 * (R = Cm Gᵀ K⁻¹ G, cyclic trace): M minus the number of resolved parameters. Variance 2 Σ λ_j².
 * The classical χ²_M reference (every λ = 1) is what this becomes only for data the prior does not
 * inform at all; otherwise it overstates the expected misfit by tr R.
 *
 * With Cd = S Sᵀ (S = diag σ, or S = Ld for a full Cd), A = X Xᵀ with X = L⁻¹ S: the weights are the
 * squared singular values of X, computed here as the eigenvalues of the symmetric X Xᵀ by the
 * symmetric eigen-solver of ../linalg/eigen.ts (O(M³); no inverse is formed).
 *
 * Distribution: Imhof (1961), "Computing the distribution of quadratic forms in normal variables",
 * Biometrika 48:419–426, eq. 3.2 for central χ²₁ terms:
 *
 *   P(Q > x) = ½ + (1/π) ∫₀^∞ sin θ(u) / (u ρ(u)) du,
 *   θ(u) = ½ Σ arctan(λ_j u) − ½ x u,   ρ(u) = Π (1 + λ_j² u²)^¼,
 *
 * the integrand tending to ½(Σ λ_j − x) as u → 0. Imhof's truncation bound (his eq. 3.4, central
 * case, using any k of the terms since ρ(u) ≥ Π_{j ≤ k} (λ_j u)^½): the integral beyond U is at most
 * T_U = 2 / (π k U^{k/2} Π_{j ≤ k} λ_j^½). We take the k (of the largest weights) that gives the
 * smallest U with T_U ≤ 1e-10. Quadrature: 16-point Gauss–Legendre (nodes by Newton's method on P₁₆)
 * on panels over which the phase θ changes by at most π (|θ′| ≤ ½(Σ λ + x)), no wider than 1 near
 * the origin (weights scaled to λmax = 1) and than u/4 further out (the envelope 1/(u ρ) is a smooth
 * power-like function of u there), so their widths grow geometrically to π/ω. When that U would need
 * more than MAX_PANELS panels (few weights: the bound decays only like U^(−k/2)), the integral is
 * integrated exactly to U_cap and the rest, an oscillating tail of slowly decaying amplitude, as a sum
 * of half-period pieces of length 2π/x accelerated by repeated averaging of partial sums (Euler's
 * transformation for alternating series; common practice, no source), whose last change is reported
 * as the error estimate. When all weights are equal the distribution is λ χ²_M exactly and is taken
 * from ./chisquare.ts.
 */
import { InputError } from '../errors.ts';
import { solveLowerMatrix } from '../linalg/cholesky.ts';
import { symmetricEigenvalues } from '../linalg/eigen.ts';
import type { Matrix } from '../linalg/matrix.ts';
import { symmetricProductNT } from '../linalg/products.ts';
import { chiSquareCdf, chiSquareQuantile, regularizedGammaQ } from './chisquare.ts';

/**
 * Weights λ_j = eigenvalues of L⁻¹ Cd L⁻ᵀ = X Xᵀ, X = L⁻¹ S, Cd = S Sᵀ (S lower triangular or
 * diagonal, M × M), ascending; clamped at 0 (rounding can leave −ε for a weight of 0).
 */
export function fitWeights(L: Matrix, S: Matrix): Float64Array {
  return weightsFromWhitened(solveLowerMatrix(L, S));
}

/** Eigenvalues of X Xᵀ (ascending, clamped at 0) for X = L⁻¹ S already computed. */
export function weightsFromWhitened(X: Matrix): Float64Array {
  const A = symmetricProductNT(X, X);
  const w = symmetricEigenvalues(A);
  for (let i = 0; i < w.length; i++) if (w[i] < 0) w[i] = 0;
  return w;
}

/** Gauss–Legendre nodes and weights on [−1, 1], n points, by Newton's method on P_n (three-term recurrence). */
function gaussLegendre(n: number): { x: Float64Array; w: Float64Array } {
  const x = new Float64Array(n);
  const w = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    let z = Math.cos((Math.PI * (i + 0.75)) / (n + 0.5));
    let dp = 0;
    for (let it = 0; it < 100; it++) {
      let p0 = 1;
      let p1 = z;
      for (let k = 2; k <= n; k++) {
        const p2 = ((2 * k - 1) * z * p1 - (k - 1) * p0) / k;
        p0 = p1;
        p1 = p2;
      }
      dp = (n * (z * p1 - p0)) / (z * z - 1);
      const dz = p1 / dp;
      z -= dz;
      if (Math.abs(dz) < 1e-16) break;
    }
    x[i] = z;
    w[i] = 2 / ((1 - z * z) * dp * dp);
  }
  return { x, w };
}

const GL = gaussLegendre(16);
/** Truncation target of Imhof's bound (absolute, on a probability). */
const TRUNCATION = 1e-10;
/** Most panels of the table before the tail is summed by acceleration instead. */
const MAX_PANELS = 1000;
/** Half-period pieces of the accelerated tail. */
const TAIL_PIECES = 40;

/** Node table for x ≤ xmax: u_i, A_i = ½ Σ arctan(λ u_i), E_i = w_i / (u_i ρ(u_i)). */
interface Table {
  readonly xmax: number;
  readonly upper: number;
  readonly truncated: boolean;
  readonly u: Float64Array;
  readonly a: Float64Array;
  readonly e: Float64Array;
}

/** Distribution of Q = Σ λ_j χ²₁(j), λ_j ≥ 0 (independent terms), by Imhof's integral. */
export class WeightedChiSquare {
  /** Weights divided by their largest (Q is evaluated as λmax · Q′). */
  private readonly lam: Float64Array;
  private readonly scale: number;
  /** Σ λ_j (unscaled). */
  readonly mean: number;
  /** 2 Σ λ_j² (unscaled). */
  readonly variance: number;
  /** Non-zero weights. */
  readonly terms: number;
  private readonly equal: boolean;
  private readonly upperBound: number;
  private table: Table | null = null;
  /** Largest error estimate of the accelerated tail met so far (0 when no tail was needed). */
  tailError = 0;

  constructor(weights: ArrayLike<number>) {
    const pos: number[] = [];
    for (let i = 0; i < weights.length; i++) {
      const v = weights[i];
      if (!(v >= 0) || !Number.isFinite(v)) throw new InputError(`weights[${i}]`, 'a finite number ≥ 0', v);
      if (v > 0) pos.push(v);
    }
    pos.sort((p, q) => q - p);
    this.scale = pos.length > 0 ? pos[0] : 0;
    this.lam = Float64Array.from(pos, (v) => v / this.scale);
    this.terms = pos.length;
    let s = 0;
    let s2 = 0;
    for (const v of pos) {
      s += v;
      s2 += v * v;
    }
    this.mean = s;
    this.variance = 2 * s2;
    this.equal = pos.length > 0 && this.lam[pos.length - 1] > 1 - 1e-12;
    // U from Imhof's bound: min over k of (2 / (π k ε Π_{j≤k} √λ_j))^(2/k), in logs.
    let best = Infinity;
    let logProd = 0;
    for (let k = 1; k <= this.lam.length; k++) {
      logProd += 0.5 * Math.log(this.lam[k - 1]);
      const logU = (2 / k) * (Math.log(2 / (Math.PI * k * TRUNCATION)) - logProd);
      best = Math.min(best, logU);
    }
    this.upperBound = Math.exp(best);
  }

  /** P(Q > x). */
  sf(x: number): number {
    if (this.terms === 0) return x < 0 ? 1 : 0;
    if (!(x > 0)) return 1;
    if (x === Infinity) return 0;
    if (this.equal) return regularizedGammaQ(this.terms / 2, x / this.scale / 2);
    const xs = x / this.scale;
    const t = this.tableFor(xs);
    let s = 0;
    for (let i = 0; i < t.u.length; i++) s += t.e[i] * Math.sin(t.a[i] - 0.5 * xs * t.u[i]);
    if (t.truncated) s += this.tail(xs, t.upper);
    return Math.min(1, Math.max(0, 0.5 + s / Math.PI));
  }

  /** P(Q ≤ x). */
  cdf(x: number): number {
    if (this.equal && x > 0) return chiSquareCdf(x / this.scale, this.terms);
    return 1 - this.sf(x);
  }

  /** The x with P(Q ≤ x) = p, 0 < p < 1 (Illinois-safeguarded regula falsi on the CDF, bracket from the moments). */
  quantile(p: number): number {
    if (!(p > 0 && p < 1)) throw new InputError('quantile: p', 'a probability strictly between 0 and 1', p);
    if (this.terms === 0) return 0;
    if (this.equal) return this.scale * chiSquareQuantile(p, this.terms);
    // Start from the scaled χ² with the same first two moments (Satterthwaite), then bracket.
    const g = this.variance / (2 * this.mean);
    const nu = this.mean / g;
    const start = g * chiSquareQuantile(p, nu);
    const sd = Math.sqrt(this.variance);
    let lo = Math.max(0, start - sd);
    let hi = start + sd;
    while (lo > 0 && this.cdf(lo) > p) lo = Math.max(0, lo - 2 * sd);
    while (this.cdf(hi) < p) hi += 2 * sd;
    let flo = this.cdf(lo) - p;
    let fhi = this.cdf(hi) - p;
    let side = 0;
    for (let it = 0; it < 200; it++) {
      const x = fhi === flo ? 0.5 * (lo + hi) : hi - (fhi * (hi - lo)) / (fhi - flo);
      const fx = this.cdf(x) - p;
      if (Math.abs(fx) < 1e-13 || hi - lo <= 1e-12 * hi) return x;
      if (fx < 0) {
        lo = x;
        flo = fx;
        if (side === -1) fhi /= 2;
        side = -1;
      } else {
        hi = x;
        fhi = fx;
        if (side === 1) flo /= 2;
        side = 1;
      }
    }
    return 0.5 * (lo + hi);
  }

  /** Central interval [q((1 − level)/2), q((1 + level)/2)]. */
  interval(level = 0.95): [number, number] {
    return [this.quantile((1 - level) / 2), this.quantile((1 + level) / 2)];
  }

  private tableFor(xs: number): Table {
    if (this.table && xs <= this.table.xmax) return this.table;
    const sum = this.mean / this.scale;
    const sdS = Math.sqrt(this.variance) / this.scale;
    const xmax = Math.max(xs, sum + 12 * sdS + 4) * (this.table ? 2 : 1);
    const omega = 0.5 * (sum + xmax);
    // Panel widths: at most half an oscillation (π/ω), at most 1 near the origin (the envelope
    // varies on the scale 1/λmax = 1 there) and at most u/4 further out, where the envelope varies
    // on the scale u (a power of u): geometric growth up to π/ω.
    const hMax = Math.PI / omega;
    const h0 = Math.min(1, hMax);
    const edges: number[] = [0];
    let upper = this.upperBound;
    let truncated = false;
    while (edges[edges.length - 1] < upper) {
      if (edges.length > MAX_PANELS) {
        truncated = true;
        upper = edges[edges.length - 1];
        break;
      }
      const lo = edges[edges.length - 1];
      edges.push(Math.min(upper, lo + Math.min(hMax, Math.max(h0, lo / 4))));
    }
    const panels = edges.length - 1;
    const n = panels * GL.x.length;
    const u = new Float64Array(n);
    const a = new Float64Array(n);
    const e = new Float64Array(n);
    let idx = 0;
    for (let p = 0; p < panels; p++) {
      const w = edges[p + 1] - edges[p];
      const c = 0.5 * (edges[p] + edges[p + 1]);
      for (let g = 0; g < GL.x.length; g++) {
        const ui = c + 0.5 * w * GL.x[g];
        const { phase, logRho } = this.phaseAndLogRho(ui);
        u[idx] = ui;
        a[idx] = phase;
        e[idx] = (0.5 * w * GL.w[g]) / (ui * Math.exp(logRho));
        idx++;
      }
    }
    this.table = { xmax, upper, truncated, u, a, e };
    return this.table;
  }

  private phaseAndLogRho(u: number): { phase: number; logRho: number } {
    let phase = 0;
    let logRho = 0;
    for (let j = 0; j < this.lam.length; j++) {
      const t = this.lam[j] * u;
      phase += Math.atan(t);
      logRho += Math.log1p(t * t);
    }
    return { phase: 0.5 * phase, logRho: 0.25 * logRho };
  }

  /** ∫_U^∞ sin θ / (u ρ) du as accelerated half-period pieces (see the module comment). */
  private tail(xs: number, start: number): number {
    const half = (2 * Math.PI) / xs;
    const partial: number[] = [];
    let s = 0;
    let lo = start;
    for (let k = 0; k < TAIL_PIECES; k++) {
      const hi = lo + half;
      const sub = Math.max(1, Math.ceil((4 * half) / lo));
      const w = (hi - lo) / sub;
      for (let q = 0; q < sub; q++) {
        const c = lo + (q + 0.5) * w;
        for (let g = 0; g < GL.x.length; g++) {
          const ui = c + 0.5 * w * GL.x[g];
          const { phase, logRho } = this.phaseAndLogRho(ui);
          s += ((0.5 * w * GL.w[g]) / (ui * Math.exp(logRho))) * Math.sin(phase - 0.5 * xs * ui);
        }
      }
      partial.push(s);
      lo = hi;
    }
    // Repeated averaging of neighbouring partial sums (Euler's transformation).
    let row = partial;
    let prevEstimate = row[row.length - 1];
    while (row.length > 1) {
      prevEstimate = row[row.length - 1];
      const next: number[] = [];
      for (let i = 0; i + 1 < row.length; i++) next.push(0.5 * (row[i] + row[i + 1]));
      row = next;
    }
    this.tailError = Math.max(this.tailError, Math.abs(row[0] - prevEstimate) / Math.PI);
    return row[0];
  }
}

/** The data-fit reference reported beside the observed χ² (see the module comment). */
export interface DataFitReference {
  /** E χ² = Σ λ_j = M − tr R. */
  readonly expected: number;
  /** Central 95% interval of χ² itself (2.5% and 97.5% quantiles). */
  readonly interval95: readonly [number, number];
  /** P(χ² ≥ observed) under the model. */
  readonly upperTail: number;
  /** How the distribution was computed. */
  readonly method: string;
}

export const FIT_REFERENCE_METHOD = 'weighted sum of χ²₁ with weights eig(L⁻¹ Cd L⁻ᵀ), distribution by Imhof (1961) numerical inversion';

/** The reference for the observed χ² from the weights of {@link fitWeights}; null when M = 0. */
export function dataFitReference(weights: ArrayLike<number>, chi2: number): DataFitReference | null {
  if (weights.length === 0) return null;
  const q = new WeightedChiSquare(weights);
  return { expected: q.mean, interval95: q.interval(0.95), upperTail: q.sf(chi2), method: FIT_REFERENCE_METHOD };
}
