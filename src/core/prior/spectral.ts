/**
 * Dense-sampling condition estimate of one covariance term, used to explain (and predict, without
 * factorising anything) why a smooth kernel with a long length makes Cm numerically singular.
 *
 * On the infinite lattice with spacing Δ the kernel matrix is a (block) Toeplitz operator whose
 * symbol is f(ω) = Σ_k ρ(kΔ) e^{i k·ω}, ω ∈ [−π, π]^d. By Poisson summation f is the continuous
 * spectral density S summed over its aliases, f(ω) ∝ Σ_m S(ω + 2πm), and the eigenvalues of a
 * finite section lie in [min f, max f] and fill it as the grid grows (Grenander & Szegő 1958,
 * Toeplitz Forms and Their Applications, ch. 5, memory). Hence for large grids
 *   cond(C_term) ≈ κ = f(0) / min_ω f(ω)        (an upper bound on any finite section).
 *
 * Writing ρ(√(dᵀ M d)) with M = Rᵀ diag(1/l1², 1/l2²) R and lattice offsets d = Δ k gives, in
 * lattice units, the quadratic form q(ω) = ωᵀ B⁻¹ ω with B⁻¹ = Δ⁻¹ M⁻¹ Δ⁻¹, and (the constant
 * factors cancel in κ)
 *   Gaussian ρ = e^{−h²/2}:   S ∝ exp(−q/2)                      (R&W 2006 eq. 4.9 / its transform)
 *   Matérn ν (R&W eq. 4.14):  S ∝ (2ν + q)^{−(ν + d/2)}          (R&W eq. 4.15)
 * The exponential kernel is Matérn ν = ½. The spherical kernel has no simple closed-form spectrum
 * here and gets no estimate. Each kernel's log S(q) is its table entry's `logSpectralDensity` (../kernels/table.ts).
 *
 * Worked 1-D Gaussian case (a = l/Δ): f(0) ≈ √(2π) a, f(π) ≈ 2√(2π) a e^{−π²a²/2}, so
 * κ ≈ e^{π²a²/2} / 2, which passes 1e10 at a = √(2 ln(2·10¹⁰))/π ≈ 2.19 cells and 1/ε ≈ 4.5e15 at
 * a ≈ 2.73 cells (derived; checked against numpy eigvalsh in test/reference/prior_diagnostics.test.ts).
 */
import { gridDimension, type Grid } from '../grid/grid.ts';
import type { Term } from '../kernels/spec.ts';
import { kernelDefinition } from '../kernels/table.ts';

/** Aliases summed on each side of the base period in the Poisson sum. */
const ALIASES = 3;

/** Inverse lattice quadratic form B⁻¹ (symmetric 2 × 2, or 1 × 1 stored in b00). */
function latticeForm(term: Term, grid: Grid): { b00: number; b01: number; b11: number } {
  const dx = grid.spacing[0];
  const dy = grid.spacing[1] ?? 1;
  let m00: number;
  let m01: number;
  let m11: number;
  if (term.lengths !== undefined) {
    const [l1, l2] = term.lengths;
    const t = ((term.angle ?? 0) * Math.PI) / 180;
    const c = Math.cos(t);
    const s = Math.sin(t);
    // M⁻¹ = Rᵀ diag(l1², l2²) R with R = [[c, s], [−s, c]].
    m00 = c * c * l1 * l1 + s * s * l2 * l2;
    m01 = c * s * (l1 * l1 - l2 * l2);
    m11 = s * s * l1 * l1 + c * c * l2 * l2;
  } else {
    const l = term.length;
    m00 = l * l;
    m01 = 0;
    m11 = l * l;
  }
  return { b00: m00 / (dx * dx), b01: m01 / (dx * dy), b11: m11 / (dy * dy) };
}

/**
 * log κ (natural log) of the term's dense-sampling condition estimate, or null for kernels without
 * an estimate (spherical). Natural log so that huge values (e^{500}) stay representable.
 */
export function logLatticeCondition(term: Term, grid: Grid): number | null {
  const d = gridDimension(grid);
  // The kernel's spectral density from the table; null (spherical) means no closed form, so no estimate.
  const logS = kernelDefinition(term.kernel).logSpectralDensity(term.nu, d);
  if (logS === null) return null;
  const { b00, b01, b11 } = latticeForm(term, grid);
  const logSymbol = (w0: number, w1: number): number => {
    // log Σ_m S(ω + 2πm), by log-sum-exp so that e^{−500} does not underflow.
    const vals: number[] = [];
    const my = d === 2 ? ALIASES : 0;
    for (let m0 = -ALIASES; m0 <= ALIASES; m0++) {
      for (let m1 = -my; m1 <= my; m1++) {
        const a = w0 + 2 * Math.PI * m0;
        const b = w1 + 2 * Math.PI * m1;
        vals.push(logS(b00 * a * a + 2 * b01 * a * b + b11 * b * b));
      }
    }
    const top = Math.max(...vals);
    let s = 0;
    for (const v of vals) s += Math.exp(v - top);
    return top + Math.log(s);
  };
  const top = logSymbol(0, 0);
  let low = Infinity;
  const p = d === 1 ? 257 : 65; // grid over [0, π] × [−π, π] (f(−ω) = f(ω)); includes the corners
  for (let i = 0; i < p; i++) {
    const w0 = (Math.PI * i) / (p - 1);
    if (d === 1) {
      low = Math.min(low, logSymbol(w0, 0));
      continue;
    }
    for (let j = 0; j < 2 * p - 1; j++) low = Math.min(low, logSymbol(w0, -Math.PI + (Math.PI * j) / (p - 1)));
  }
  return top - low;
}
