/**
 * Analytic derivatives of one term's covariance c(o) = σ² ρ(h(o)) with respect to the type-II coordinates of its
 * geometry (./typeII.ts): log length, log l1, log l2 and the angle in degrees. By the chain rule
 *
 *   ∂c/∂θ = σ² ρ'(h) ∂h/∂θ,
 *
 * with ρ' from the kernel table (../kernels/table.ts `derivative`) and, for the scaled distance of
 * ../prior/lag.ts (u = cos a·Δx + sin a·Δy, v = −sin a·Δx + cos a·Δy, h² = (u/l1)² + (v/l2)²; our derivation):
 *
 *   isotropic     h = r/l                   ∂h/∂log l  = −h
 *   anisotropic   ∂h/∂log l1 = −(u/l1)²/h,   ∂h/∂log l2 = −(v/l2)²/h,
 *                 ∂u/∂a = v, ∂v/∂a = −u  ⇒  ∂h/∂a = (u v / h)(1/l1² − 1/l2²) · π/180   (a in degrees).
 *
 * Each is an even function of the offset o (u and v change sign together), so it tabulates over the grid's
 * offsets like the covariance itself (../prior/lag.ts offsetTable) and projects through the same routes. At o = 0
 * the covariance is σ² whatever the lengths and angle, so the derivative is exactly 0 there (ρ'(0) may be −∞ for
 * Matérn ν < 1/2; ∂h/∂θ = 0 wins). 3-D terms (three lengths, three angles) are not type-II coordinates.
 * Gradient of the evidence from these: Rasmussen & Williams (2006) eq. 5.9; checked against central differences
 * of the log evidence in test/core/tuning/termDerivative.test.ts.
 */
import { correlationDerivative } from '../kernels/correlation.ts';
import type { Term } from '../kernels/spec.ts';
import type { OffsetFunction } from '../prior/lag.ts';

/** The geometry coordinates of a term (HyperParameter.field in ./typeII.ts). */
export type GeometryField = 'length' | 'lengths0' | 'lengths1' | 'angle';

const DEGREE = Math.PI / 180;

/** ∂(σ² ρ(h(o)))/∂θ as a function of the physical offset o, for θ = `field` of `term` (see the module comment). */
export function termDerivative(term: Term, field: GeometryField): OffsetFunction {
  const dRho = correlationDerivative(term.kernel, term.nu);
  const v = term.variance;
  if (term.lengths === undefined) {
    if (field !== 'length') throw new RangeError(`termDerivative: an isotropic term has no ${field}`);
    const l = term.length;
    return (ox, oy, oz) => {
      const h = Math.sqrt(ox * ox + oy * oy + oz * oz) / l;
      return h === 0 ? 0 : -v * h * dRho(h);
    };
  }
  if (term.lengths.length !== 2) throw new RangeError('termDerivative: 3-D terms have no type-II geometry coordinates');
  if (field === 'length') throw new RangeError('termDerivative: an anisotropic term has lengths, not length');
  const [l1, l2] = term.lengths;
  const theta = (term.angle ?? 0) * DEGREE;
  const c = Math.cos(theta);
  const s = Math.sin(theta);
  const spread = (1 / (l1 * l1) - 1 / (l2 * l2)) * DEGREE;
  return (ox, oy) => {
    const u = c * ox + s * oy;
    const w = -s * ox + c * oy;
    const a = u / l1;
    const b = w / l2;
    const h = Math.sqrt(a * a + b * b);
    if (h === 0) return 0;
    const d = v * dRho(h);
    switch (field) {
      case 'lengths0':
        return (-d * (a * a)) / h;
      case 'lengths1':
        return (-d * (b * b)) / h;
      default:
        return (d * u * w * spread) / h;
    }
  };
}
