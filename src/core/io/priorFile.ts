/**
 * The prior file: JSON `{"kind": "priorscope.prior", "version": 1, …}` ⇄ PriorSpec.
 *
 *   mean        {"constant": c} | {"values": [N numbers]} | {"trend": {"intercept": a, "slope": [b1] or [b1, b2]}}
 *   terms       [{"kernel": "exponential"|"gaussian"|"matern"|"spherical", "variance": > 0,
 *                 "length": > 0  — or, in 2-D, "lengths": [l1, l2] (> 0) with optional "angle" (degrees),
 *                 or, in 3-D, "lengths": [l1, l2, l3] with optional "angles": [a1, a2, a3] (degrees, ../prior/lag.ts),
 *                 "nu": > 0 (matern only, required there)}, …]
 *   nugget      ≥ 0 (optional, default 0), variance units
 *   stdProfile  N numbers > 0 (optional)
 *
 * The meaning of each field is the core's (src/core/prior/spec.ts, src/core/kernels/spec.ts).
 * Reading keeps exactly the fields present (no defaults are filled in), so that
 * parse(write(spec)) deep-equals spec and write(parse(text)) = text for text this module wrote.
 * Unknown fields give warnings (and are dropped); an `angle` on an isotropic term and a `nu` on a
 * non-Matérn term are kept in the spec (for the exact round trip) but warned about: the core ignores them.
 */
import { cellCount, type Geometry, gridDimension } from '../grid/grid.ts';
import { isAnisotropic, KERNEL_NAMES, type KernelName, type Term } from '../kernels/spec.ts';
import { kernelsTaking, kernelTakes } from '../kernels/table.ts';
import type { MeanSpec, PriorSpec } from '../prior/spec.ts';
import { MAX_TERMS } from '../prior/validate.ts';
import { fieldError, FileFormatError, type FileWarning } from './errors.ts';
import { formatJson, JsonReader, parseJsonText } from './json.ts';

export const PRIOR_KIND = 'priorscope.prior';
export const PRIOR_VERSION = 1;

export interface PriorFileResult {
  readonly prior: PriorSpec;
  readonly warnings: readonly FileWarning[];
}

export interface PriorReadOptions {
  /** When given, lengths that depend on the grid (mean.values, stdProfile, 2-D-only fields) are checked. */
  readonly grid?: Geometry;
}

const TOP_FIELDS = ['kind', 'version', 'mean', 'terms', 'nugget', 'stdProfile'] as const;
const TERM_FIELDS = ['kernel', 'variance', 'length', 'lengths', 'angle', 'angles', 'nu'] as const;

/** Check `kind` and `version` of a parsed file object (shared with the problem file). */
export function checkKindVersion(r: JsonReader, obj: Record<string, unknown>, kind: string, version: number): void {
  const k = obj.kind;
  if (k !== kind) {
    const hint = typeof k === 'string' && k.startsWith('priorscope.') ? ` (this is a ${k.slice(11)} file)` : '';
    r.fail('kind', `"${kind}"${hint}`, k);
  }
  if (obj.version !== version) r.fail('version', `${version} (the version this program reads)`, obj.version);
}

function readMean(r: JsonReader, value: unknown): MeanSpec {
  const obj = r.object(value, 'mean', ['constant', 'values', 'trend']);
  const forms = ['constant', 'values', 'trend'].filter((k) => obj[k] !== undefined);
  if (forms.length !== 1) {
    r.fail('mean', 'an object with exactly one of constant, values, trend', forms.length === 0 ? 'none of them' : forms.join(' and '));
  }
  if (obj.constant !== undefined) return { constant: r.number(obj.constant, 'mean.constant') };
  if (obj.values !== undefined) return { values: r.numbers(obj.values, 'mean.values') };
  const t = r.object(obj.trend, 'mean.trend', ['intercept', 'slope']);
  const intercept = r.number(r.required(t, 'mean.trend', 'intercept', 'a finite number'), 'mean.trend.intercept');
  const slope = r.numbers(r.required(t, 'mean.trend', 'slope', 'an array of 1, 2 or 3 numbers'), 'mean.trend.slope');
  if (slope.length < 1 || slope.length > 3) r.fail('mean.trend.slope', 'an array of 1, 2 or 3 numbers (one per grid axis)', slope);
  return { trend: { intercept, slope } };
}

/**
 * An angle in degrees within [-360, 360]: larger values are no rotation a user means, and
 * cos/sin of 1e308 degrees carry no digits (the radians lose every bit of the angle).
 */
function readAngle(r: JsonReader, value: unknown, field: string): number {
  const a = r.number(value, field);
  if (Math.abs(a) > 360) r.fail(field, 'an angle in degrees from -360 to 360', a);
  return a;
}

function readTerm(r: JsonReader, value: unknown, k: number): Term {
  const f = `terms[${k}]`;
  const obj = r.object(value, f, TERM_FIELDS);
  const kernelValue = obj.kernel;
  if (typeof kernelValue !== 'string' || !(KERNEL_NAMES as readonly string[]).includes(kernelValue)) {
    r.fail(`${f}.kernel`, `one of ${KERNEL_NAMES.map((n) => `"${n}"`).join(', ')}`, kernelValue);
  }
  const kernel = kernelValue as KernelName;
  const variance = r.number(obj.variance, `${f}.variance`, { gt: 0 });
  if (obj.length !== undefined && obj.lengths !== undefined) {
    r.fail(f, 'a term with either length (isotropic) or lengths (anisotropic 2-D), not both', 'both');
  }
  let lengths: readonly [number, number] | readonly [number, number, number] | undefined;
  let length = 0;
  let angle: number | undefined;
  let angles: readonly [number, number, number] | undefined;
  if (obj.lengths !== undefined) {
    const three = Array.isArray(obj.lengths) && obj.lengths.length === 3;
    const l = r.numbers(obj.lengths, `${f}.lengths`, three ? 3 : 2, { gt: 0 });
    lengths = three ? [l[0], l[1], l[2]] : [l[0], l[1]];
    if (obj.angle !== undefined) angle = readAngle(r, obj.angle, `${f}.angle`);
    if (obj.angles !== undefined) {
      if (!three)
        r.fail(
          `${f}.angles`,
          'absent with two lengths (angles [a1, a2, a3] go with lengths [l1, l2, l3] in 3-D; give angle in 2-D)',
          obj.angles,
        );
      const a = r.array(obj.angles, `${f}.angles`, 3, 'angles in degrees').map((v, k) => readAngle(r, v, `${f}.angles[${k}]`));
      angles = [a[0], a[1], a[2]];
    }
  } else {
    if (obj.length === undefined) r.fail(`${f}.length`, 'a finite number > 0 (or give lengths [l1, l2] in 2-D)', undefined);
    length = r.number(obj.length, `${f}.length`, { gt: 0 });
    if (obj.angle !== undefined) {
      angle = readAngle(r, obj.angle, `${f}.angle`);
      r.warn(`${f}.angle`, `${f}.angle is ignored for an isotropic term (it rotates the two axes of lengths [l1, l2])`);
    }
  }
  // Kernel-specific fields (the kernel table): required where the kernel takes them, else kept and warned about.
  let nu: number | undefined;
  if (kernelTakes(kernel, 'nu')) {
    nu = r.number(r.required(obj, f, 'nu', `a finite number > 0 for the ${kernel} kernel`), `${f}.nu`, { gt: 0 });
  } else if (obj.nu !== undefined) {
    nu = r.number(obj.nu, `${f}.nu`, { gt: 0 });
    r.warn(`${f}.nu`, `${f}.nu is ignored for the ${kernel} kernel (only ${kernelsTaking('nu').join(', ')} has a smoothness)`);
  }
  // Only the fields present (no defaults filled in), so that the file round-trips exactly.
  const optional = { ...(angle !== undefined && { angle }), ...(nu !== undefined && { nu }) };
  return lengths !== undefined
    ? { kernel, variance, lengths, ...(angles !== undefined && { angles }), ...optional }
    : { kernel, variance, length, ...optional };
}

/** A parsed prior object (already JSON-decoded) → PriorSpec; `r` collects the warnings. */
export function readPriorObject(r: JsonReader, value: unknown, options: PriorReadOptions = {}): PriorSpec {
  const obj = r.object(value, '', TOP_FIELDS);
  checkKindVersion(r, obj, PRIOR_KIND, PRIOR_VERSION);
  const mean = readMean(r, r.required(obj, '', 'mean', 'an object with constant, values or trend'));
  const termsValue = r.array(r.required(obj, '', 'terms', 'an array of covariance terms'), 'terms', undefined, 'terms');
  if (termsValue.length > MAX_TERMS) r.fail('terms', `at most ${MAX_TERMS} covariance terms`, termsValue.length);
  const terms = termsValue.map((t, k) => readTerm(r, t, k));
  const prior: { -readonly [K in keyof PriorSpec]: PriorSpec[K] } = { mean, terms };
  if (obj.nugget !== undefined) prior.nugget = r.number(obj.nugget, 'nugget', { ge: 0 });
  if (obj.stdProfile !== undefined) prior.stdProfile = r.numbers(obj.stdProfile, 'stdProfile', undefined, { gt: 0 });
  if (terms.length === 0 && !((prior.nugget ?? 0) > 0)) {
    r.fail('terms', 'a non-empty array of covariance terms (or give a nugget > 0)', termsValue);
  }
  if (options.grid) checkPriorForGrid(r.file, prior, options.grid);
  return prior;
}

/**
 * Grid-dependent checks of a prior: lengths of mean.values and stdProfile equal the cell count,
 * the trend slope and anisotropic terms match the grid's dimension.
 */
export function checkPriorForGrid(file: string, prior: PriorSpec, grid: Geometry): void {
  const n = cellCount(grid);
  const dim = gridDimension(grid);
  const m = prior.mean;
  if ('values' in m && m.values.length !== n) {
    throw fieldError(file, 'mean.values', `an array of ${n} numbers (one per grid cell)`, m.values);
  }
  if ('trend' in m && m.trend.slope.length !== dim) {
    throw fieldError(file, 'mean.trend.slope', `an array of ${dim} number${dim === 1 ? '' : 's'} (one per grid axis)`, m.trend.slope);
  }
  if (prior.stdProfile && prior.stdProfile.length !== n) {
    throw fieldError(file, 'stdProfile', `an array of ${n} numbers (one per grid cell)`, prior.stdProfile);
  }
  prior.terms.forEach((t, k) => {
    if (t.lengths && dim === 1) {
      throw new FileFormatError(file, `terms[${k}].lengths needs a 2-D or 3-D grid; on this 1-D grid give terms[${k}].length`, {
        field: `terms[${k}].lengths`,
      });
    }
    if (t.lengths && t.lengths.length !== dim) {
      throw new FileFormatError(
        file,
        `terms[${k}].lengths has ${t.lengths.length} lengths; this ${dim}-D grid needs ${dim} (or one length)`,
        { field: `terms[${k}].lengths` },
      );
    }
  });
}

/** Parse a prior file (text or UTF-8 bytes). */
export function parsePriorFile(file: string, input: string | Uint8Array, options: PriorReadOptions = {}): PriorFileResult {
  const r = new JsonReader(file);
  const prior = readPriorObject(r, parseJsonText(file, input), options);
  return { prior, warnings: r.warnings };
}

/** The JSON object of a prior file, keys in the documented order, only the fields present. */
export function priorToJson(prior: PriorSpec): Record<string, unknown> {
  const m = prior.mean;
  const mean =
    'constant' in m
      ? { constant: m.constant }
      : 'values' in m
        ? { values: Array.from(m.values) }
        : { trend: { intercept: m.trend.intercept, slope: Array.from(m.trend.slope) } };
  const out: Record<string, unknown> = {
    kind: PRIOR_KIND,
    version: PRIOR_VERSION,
    mean,
    terms: prior.terms.map((t) => {
      const o: Record<string, unknown> = { kernel: t.kernel, variance: t.variance };
      if (t.length !== undefined) o.length = t.length;
      if (t.lengths !== undefined) o.lengths = Array.from(t.lengths);
      if (isAnisotropic(t) && t.angles !== undefined) o.angles = Array.from(t.angles);
      if (t.angle !== undefined) o.angle = t.angle;
      if (t.nu !== undefined) o.nu = t.nu;
      return o;
    }),
  };
  if (prior.nugget !== undefined) out.nugget = prior.nugget;
  if (prior.stdProfile !== undefined) out.stdProfile = Array.from(prior.stdProfile);
  return out;
}

/**
 * Prior file text (JSON from formatJson: one field per line, number arrays on one line). The spec is validated first: a spec that
 * would not read back throws the same FileFormatError the reader gives, naming `file`.
 */
export function writePriorFile(prior: PriorSpec, file = 'prior'): string {
  const text = formatJson(priorToJson(prior));
  parsePriorFile(file, text);
  return text;
}
