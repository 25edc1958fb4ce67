/**
 * Validation of a PriorSpec against a grid, at the edge of the core (files, UI, command line).
 * Every failure is an InputError naming the field path (`terms[0].length`, `stdProfile[12]`,
 * `mean.values`) and the value received.
 *
 * Decisions (documented here because they are policy, not mathematics):
 * - `nu` on a kernel other than `matern` is ignored, not an error (a user switching the kernel in
 *   the UI keeps the field); diagnostics report it with the warning code "nu-ignored".
 * - `matern` without `nu` uses DEFAULT_MATERN_NU (1.5, src/core/kernels/spec.ts).
 * - `angle` without `lengths` is allowed (it has no effect on an isotropic term) but must be finite.
 * - A term may not have both `length` and `lengths`; in 1-D only `length` is allowed.
 * - No terms and no (or zero) nugget is an error: the covariance would be the zero matrix.
 * - Scale: every magnitude must be computable in double precision with room for the products the
 *   posterior forms (G Cm Gᵀ over up to 4·10⁶ cells, 1/σ²): |mean| ≤ 1e50, standard deviations
 *   (√variance, √nugget, stdProfile) from 1e-50 to 1e50 (a prior mean of 1e308 or a profile of 1e300
 *   used to overflow into null results). Our choice, no source: doubles reach 1.8e308, and 1e50 leaves
 *   (4e6 · 1e50 · 1e50)² ≈ 1.6e213 for the data-space products.
 * - At most {@link MAX_TERMS} covariance terms (see there).
 */
import { InputError } from '../errors.ts';
import { cellCount, gridDimension, validateGrid, type Geometry } from '../grid/grid.ts';
import { correlationFunction } from '../kernels/correlation.ts';
import { kernelTakes } from '../kernels/table.ts';
import { KERNEL_NAMES, type Term } from '../kernels/spec.ts';
import type { PriorSpec } from './spec.ts';

const isFiniteNumber = (v: unknown): v is number => typeof v === 'number' && Number.isFinite(v);
const isPositive = (v: unknown): v is number => isFiniteNumber(v) && v > 0;
const isObject = (v: unknown): v is Record<string, unknown> => typeof v === 'object' && v !== null && !Array.isArray(v);
const isArrayLike = (v: unknown): v is ArrayLike<unknown> => Array.isArray(v) || ArrayBuffer.isView(v);

/** Largest magnitude of a mean, datum, operator entry or standard deviation (see the module comment). */
export const SCALE_LIMIT = 1e50;
/** Smallest non-zero standard deviation (σ, √variance, profile), see the module comment. */
export const SCALE_MIN = 1e-50;

function checkScale(field: string, v: number, what: string, positive: boolean, shown: number = v): void {
  const a = Math.abs(v);
  if (a > SCALE_LIMIT || (positive && a > 0 && a < SCALE_MIN)) {
    throw new InputError(
      field,
      `${what} ${positive ? `from ${SCALE_MIN} to ${SCALE_LIMIT}` : `of magnitude ≤ ${SCALE_LIMIT}`} (results at this scale cannot be computed in double precision; change the unit)`,
      shown,
    );
  }
}
/**
 * Largest number of covariance terms a prior may have: 16. A prior is a sum of a few nested
 * structures (a short-range, a long-range, perhaps an anisotropic one and a nugget); practice rarely
 * uses more than three or four (common practice, no source), so 16 leaves room for experiments while
 * every cost that grows with the term count (covariance assembly, the term list on screen, the
 * autosave and share link) stays bounded. Files, the command line, share links, the autosave and the
 * "Add term" button all refuse more, with this number in the message.
 */
export const MAX_TERMS = 16;

/** Throws InputError (field path + value) unless the prior is valid for this grid. */
export function validatePrior(prior: PriorSpec, grid: Geometry): void {
  validateGrid(grid);
  if (!isObject(prior)) throw new InputError('prior', 'an object with mean and terms', prior);
  const n = cellCount(grid);
  const dim = gridDimension(grid);
  validateMean(prior.mean, n, dim);

  if (!Array.isArray(prior.terms)) throw new InputError('terms', 'an array of covariance terms', prior.terms);
  if (prior.terms.length > MAX_TERMS) throw new InputError('terms', `at most ${MAX_TERMS} covariance terms`, prior.terms.length);
  prior.terms.forEach((t, k) => validateTerm(t, `terms[${k}]`, dim));

  if (prior.nugget !== undefined && !(isFiniteNumber(prior.nugget) && prior.nugget >= 0)) {
    throw new InputError('nugget', 'a finite number ≥ 0', prior.nugget);
  }
  if (prior.terms.length === 0 && !((prior.nugget ?? 0) > 0)) {
    throw new InputError('terms', 'at least one covariance term, or a nugget > 0 (the covariance would be zero)', prior.terms);
  }

  const s = prior.stdProfile;
  if (s !== undefined) {
    if (!isArrayLike(s) || s.length !== n) {
      throw new InputError('stdProfile', `an array of ${n} numbers (one per grid cell)`, s);
    }
    for (let i = 0; i < n; i++) {
      if (!isPositive(s[i])) throw new InputError(`stdProfile[${i}]`, 'a finite number > 0', s[i]);
      checkScale(`stdProfile[${i}]`, s[i] as number, 'a standard-deviation multiplier', true);
    }
  }
  validateScales(prior, n);
}

/** The scale rule of the module comment, after the shape checks. */
function validateScales(prior: PriorSpec, n: number): void {
  const m = prior.mean;
  if ('constant' in m) checkScale('mean.constant', m.constant, 'a mean', false);
  else if ('values' in m) for (let i = 0; i < n; i++) checkScale(`mean.values[${i}]`, m.values[i], 'a mean', false);
  else {
    checkScale('mean.trend.intercept', m.trend.intercept, 'an intercept', false);
    m.trend.slope.forEach((v, k) => checkScale(`mean.trend.slope[${k}]`, v, 'a slope', false));
  }
  prior.terms.forEach((t, k) =>
    checkScale(`terms[${k}].variance`, Math.sqrt(t.variance), 'a variance whose square root is', true, t.variance),
  );
  if (prior.nugget !== undefined && prior.nugget > 0)
    checkScale('nugget', Math.sqrt(prior.nugget), 'a nugget whose square root is', true, prior.nugget);
}

function validateMean(mean: unknown, n: number, dim: 1 | 2 | 3): void {
  const forms = 'one of {constant}, {values}, {trend: {intercept, slope}}';
  if (!isObject(mean)) throw new InputError('mean', forms, mean);
  const keys = ['constant', 'values', 'trend'].filter((k) => k in mean);
  if (keys.length !== 1) throw new InputError('mean', `exactly ${forms}`, keys.length === 0 ? mean : keys.join(' and '));
  if ('constant' in mean) {
    if (!isFiniteNumber(mean.constant)) throw new InputError('mean.constant', 'a finite number', mean.constant);
  } else if ('values' in mean) {
    const v = mean.values;
    if (!isArrayLike(v) || v.length !== n) throw new InputError('mean.values', `an array of ${n} numbers (one per grid cell)`, v);
    for (let i = 0; i < n; i++) {
      if (!isFiniteNumber(v[i])) throw new InputError(`mean.values[${i}]`, 'a finite number', v[i]);
    }
  } else {
    const t = mean.trend;
    if (!isObject(t)) throw new InputError('mean.trend', 'an object {intercept, slope}', t);
    if (!isFiniteNumber(t.intercept)) throw new InputError('mean.trend.intercept', 'a finite number', t.intercept);
    const s = t.slope;
    if (!isArrayLike(s) || s.length !== dim) {
      throw new InputError('mean.trend.slope', `an array of ${dim} number${dim === 1 ? '' : 's'} (one per grid axis)`, s);
    }
    for (let k = 0; k < dim; k++) {
      if (!isFiniteNumber(s[k])) throw new InputError(`mean.trend.slope[${k}]`, 'a finite number', s[k]);
    }
  }
}

function validateTerm(term: Term, f: string, dim: 1 | 2 | 3): void {
  if (!isObject(term)) throw new InputError(f, 'an object {kernel, variance, length or lengths}', term);
  if (!(KERNEL_NAMES as readonly unknown[]).includes(term.kernel)) {
    throw new InputError(`${f}.kernel`, `one of ${KERNEL_NAMES.join(', ')}`, term.kernel);
  }
  if (!isPositive(term.variance)) throw new InputError(`${f}.variance`, 'a finite number > 0', term.variance);

  const hasLength = term.length !== undefined;
  const hasLengths = term.lengths !== undefined;
  if (hasLengths && dim === 1) {
    throw new InputError(`${f}.lengths`, 'absent on a 1-D grid (give a single length)', term.lengths);
  }
  if (hasLength && hasLengths) {
    throw new InputError(`${f}.lengths`, 'absent when length is given (use one of length or lengths)', term.lengths);
  }
  if (!hasLengths) {
    if (!isPositive(term.length)) throw new InputError(`${f}.length`, 'a finite number > 0 (the correlation length)', term.length);
  } else {
    const l = term.lengths;
    const want = dim === 3 ? 'an array of 3 lengths [l1, l2, l3]' : 'an array of 2 lengths [l1, l2]';
    if (!isArrayLike(l) || l.length !== dim) throw new InputError(`${f}.lengths`, want, l);
    for (let k = 0; k < dim; k++) {
      if (!isPositive(l[k])) throw new InputError(`${f}.lengths[${k}]`, 'a finite number > 0', l[k]);
    }
  }
  const angles = (term as { angles?: unknown }).angles;
  if (angles !== undefined) {
    if (dim !== 3) throw new InputError(`${f}.angles`, 'absent below 3-D (give angle on a 2-D grid)', angles);
    if (!isArrayLike(angles) || angles.length !== 3)
      throw new InputError(`${f}.angles`, 'an array of 3 angles [a1, a2, a3] in degrees', angles);
    for (let k = 0; k < 3; k++) {
      if (!isFiniteNumber(angles[k])) throw new InputError(`${f}.angles[${k}]`, 'a finite number of degrees', angles[k]);
    }
  }
  if (term.angle !== undefined && !isFiniteNumber(term.angle)) {
    throw new InputError(`${f}.angle`, 'a finite number of degrees', term.angle);
  }
  if (term.nu !== undefined && kernelTakes(term.kernel, 'nu')) {
    if (!isPositive(term.nu)) throw new InputError(`${f}.nu`, 'a finite number > 0', term.nu);
    try {
      correlationFunction(term.kernel, term.nu);
    } catch (e) {
      throw new InputError(`${f}.nu`, `a smoothness the ${term.kernel} kernel supports (${(e as Error).message})`, term.nu);
    }
  }
}
