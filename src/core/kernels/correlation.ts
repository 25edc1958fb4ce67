/**
 * Correlation ρ(h) at scaled distance h ≥ 0 for each kernel (see ./spec.ts for how h is formed).
 * PUBLIC API (used by prior/, the CLI and the UI): correlationFunction, correlation, practicalRange.
 * Provisional: closed forms only; general Matérn ν comes with the Bessel K_ν implementation.
 */
import type { KernelName } from './spec.ts';

export type CorrelationFunction = (h: number) => number;

/** A fast evaluator ρ(h) for one kernel (constants precomputed). */
export function correlationFunction(kernel: KernelName, nu = 1.5): CorrelationFunction {
  switch (kernel) {
    case 'exponential':
      return (h) => Math.exp(-h);
    case 'gaussian':
      return (h) => Math.exp(-0.5 * h * h);
    case 'spherical':
      return (h) => (h < 1 ? 1 - 1.5 * h + 0.5 * h * h * h : 0);
    case 'matern': {
      if (nu === 0.5) return (h) => Math.exp(-h);
      if (nu === 1.5) {
        const s = Math.sqrt(3);
        return (h) => (1 + s * h) * Math.exp(-s * h);
      }
      if (nu === 2.5) {
        const s = Math.sqrt(5);
        return (h) => (1 + s * h + (5 / 3) * h * h) * Math.exp(-s * h);
      }
      throw new Error(`matern with nu = ${nu} is not available yet`);
    }
  }
}

export function correlation(kernel: KernelName, h: number, nu?: number): number {
  return correlationFunction(kernel, nu)(h);
}

/** Scaled distance h at which ρ(h) = 0.05 (multiply by the length for a distance). */
export function practicalRange(kernel: KernelName, nu = 1.5): number {
  const rho = correlationFunction(kernel, nu);
  let lo = 0;
  let hi = 1;
  while (rho(hi) > 0.05) hi *= 2;
  for (let k = 0; k < 200 && hi - lo > 1e-14 * hi; k++) {
    const mid = 0.5 * (lo + hi);
    if (rho(mid) > 0.05) lo = mid;
    else hi = mid;
  }
  return 0.5 * (lo + hi);
}
