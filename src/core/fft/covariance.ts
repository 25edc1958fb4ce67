/**
 * Prior covariance products Cm·x on regular grids, through circulant embedding when the prior is
 * stationary on the grid, else through the dense matrix.
 *
 *   Cm = S C S + nugget·I,   S = diag(stdProfile) (identity when absent),
 *   C  = BTTB kernel part, embedded in a BCCB matrix C̃ = F⁻¹ diag(λ) F (./embedding.ts),
 *   Cm·x = s ⊙ [F⁻¹(λ ⊙ F pad(s ⊙ x))]_grid + nugget·x.
 *
 * Two real vectors travel in one complex transform: since λ is real and even, F⁻¹(λ ⊙ F(a + ib)) =
 * C̃a + i C̃b (linearity; both products are real). Cost per pair of vectors: one forward and one
 * inverse px × py transform, px = smallest power of two ≥ 2nx − 1 (likewise py).
 *
 * PUBLIC API: covarianceOperator, isStationaryOnGrid, nonStationaryReason, CirculantProduct.
 */
import { assertNever, InputError } from '../errors.ts';
import { cellCount, gridDimension, type Grid } from '../grid/grid.ts';
import { matrix, matvec, type Matrix } from '../linalg/matrix.ts';
import { covarianceMatrix } from '../prior/covariance.ts';
import type { PriorSpec } from '../prior/spec.ts';
import { kernelDefinition } from '../kernels/table.ts';
import { circulantEmbedding, gridAxes, productPadding, stationaryCovariance } from './embedding.ts';
import { Fft2 } from './fft2.ts';
import { fftEngine, type FftEngine } from '../wasm/fft.ts';

export type CovariancePath = 'fft' | 'dense';

export interface CovarianceOperator {
  readonly path: CovariancePath;
  /** N, the number of grid cells. */
  readonly size: number;
  /** Embedding sizes per grid axis ([px] or [px, py]); the grid shape itself on the dense path. */
  readonly padding: readonly number[];
  /** Why the dense path ran ('' on the FFT path). */
  readonly reason: string;
  /** Cm·x (length N). */
  apply(x: ArrayLike<number>): Float64Array;
  /** Cm·xᵢ for every row xᵢ of X (count × N), one result per row. */
  applyMany(x: Matrix): Matrix;
  /** diag(Cm). */
  diagonal(): Float64Array;
}

/**
 * Why the FFT path cannot represent this prior on this grid, or null when it can.
 * Today every kernel is stationary (its covariance depends on the offset only; the kernel table's
 * `stationary`, ../kernels/table.ts) and the std profile and nugget are diagonal corrections, so only
 * grids other than 1-D/2-D regular ones are refused.
 */
export function nonStationaryReason(grid: Grid, prior: PriorSpec): string | null {
  const dim = grid.shape.length;
  if (dim !== 1 && dim !== 2) return `grid has ${dim} axes; the FFT path handles 1-D and 2-D grids`;
  for (const [k, t] of prior.terms.entries()) {
    if (!kernelDefinition(t.kernel).stationary) return `terms[${k}].kernel ${t.kernel} is not stationary`;
  }
  return null;
}

/** True when Cm·x can go through circulant embedding (see {@link nonStationaryReason}). */
export function isStationaryOnGrid(grid: Grid, prior: PriorSpec): boolean {
  return nonStationaryReason(grid, prior) === null;
}

/**
 * The kernel part C of the prior on one grid as a circulant product. A product runs as
 *   forward x-passes on the ny rows that hold data → along y for all columns at once: F_y, × λ/P,
 *   F_y (radix-4 butterflies across whole rows; ../fft/fft2.ts rowFilter) → forward x-passes on
 *   the ny rows that are wanted,
 * (forward transforms only, F⁻¹ = (1/P) R F with R the index reversal),
 * so buffers hold ny (not py) rows. The "row spectrum" R = F_x pad(a + i b) (ny rows of px complex
 * values) depends only on the vectors, not on the prior: it is what callers cache.
 * Workspace is per instance; not for concurrent use.
 *
 * With WebAssembly SIMD (and px, py ≥ 4) the same product runs in the kernel of
 * ../wasm/wat/fft.wat (Stockham radix-4, natural order): x-passes on the rows that hold data
 * (the zero half px/2 … px − 1 of each padded row is not read), F_y over all columns at once
 * (rows ≥ py/2 not read), × λ/P, then inverse-direction (unnormalised) transforms along y and
 * along x on the ny rows that are wanted (no index reversal: F⁻¹ = (1/P) R F read backwards). Full spectra are saved in Fft2.rowFilter's row order ({@link Fft2.spectrumRowOrder})
 * so saved spectra work on either route. Which route runs is fixed per instance at construction;
 * every instance in a realm takes the same one, so split and threaded runs stay bit-identical.
 */
export class CirculantProduct {
  readonly nx: number;
  readonly ny: number;
  readonly px: number;
  readonly py: number;
  /** λ, real eigenvalues of the embedding (px·py, x fastest). */
  readonly eigenvalues: Float64Array;
  /** c(0, 0), the kernel variance Σ_t variance_t. */
  readonly variance: number;
  private readonly lambdaT: Float64Array;
  private readonly fft: Fft2;
  private readonly work: Float64Array;
  private readonly rowIn: Float64Array;
  private readonly rowOut: Float64Array;
  /** The WebAssembly engine, or null for the JavaScript route. */
  private readonly engine: FftEngine | null;
  /** λ/(px·py) in the eigenvalues' layout (x fastest), for the WebAssembly route. */
  private readonly lambdaN: Float64Array | null;

  constructor(grid: Grid, prior: PriorSpec, padding?: readonly [number, number]) {
    const { nx, ny } = gridAxes(grid);
    this.nx = nx;
    this.ny = ny;
    this.px = padding?.[0] ?? productPadding(nx);
    this.py = padding?.[1] ?? productPadding(ny);
    if (this.px < 2 * nx - 1 || this.py < 2 * ny - 1) {
      throw new RangeError(`CirculantProduct: padding ${this.px} × ${this.py} is below 2n − 1 for ${nx} × ${ny}`);
    }
    const { px, py } = this;
    this.eigenvalues = circulantEmbedding(grid, prior.terms, px, py).eigenvalues;
    this.lambdaT = new Float64Array(px * py);
    // λ' = λ / (px·py): the inverse transform's scale, folded in (see Fft2.rowFilter).
    const scale = 1 / (px * py);
    for (let ky = 0; ky < py; ky++) for (let kx = 0; kx < px; kx++) this.lambdaT[kx * py + ky] = scale * this.eigenvalues[kx + px * ky]!;
    this.variance = stationaryCovariance(prior.terms)(0, 0);
    this.fft = new Fft2(px, py);
    this.work = new Float64Array(2 * px * ny);
    // One padded input row (its tail beyond nx stays zero) and one transformed output row.
    this.rowIn = new Float64Array(2 * px);
    this.rowOut = new Float64Array(2 * px);
    this.engine = px >= 4 && py >= 4 ? fftEngine() : null;
    this.lambdaN = this.engine === null ? null : this.eigenvalues.map((v) => v * scale);
  }

  /** Whether products run in the WebAssembly kernel (else fft.js and Fft2's JavaScript y-pass). */
  get usesWasm(): boolean {
    return this.engine !== null;
  }

  /**
   * Byte addresses of the kernel regions (after the twiddle tables and the resident λ): Y, Z, T of
   * px·py complex values (T the kernel's scratch), X of px·ny; and a current view of the memory.
   */
  private regions(e: FftEngine) {
    const { px, py, ny } = this;
    e.twiddles(px, false);
    e.twiddles(py, false);
    e.twiddles(px, true);
    e.twiddles(py, true);
    const { at: lam, end } = e.resident(this.lambdaN!);
    const full = 16 * px * py;
    const y = end;
    const z = y + full;
    const t = z + full;
    const x = t + full;
    const view = e.reserve(x + 16 * px * ny);
    return { lam, y, z, t, x, view };
  }

  /** Length of one row spectrum (interleaved complex, px·ny values). */
  get spectrumLength(): number {
    return 2 * this.px * this.ny;
  }

  /**
   * Row spectrum F_x pad(a + i b) into `out` (length spectrumLength). `b` may be null (zero
   * imaginary part). a and b are grid vectors of length nx·ny.
   */
  spectrum(a: ArrayLike<number>, b: ArrayLike<number> | null, out: Float64Array): Float64Array {
    if (this.engine !== null) return this.spectrumWasm(this.engine, a, b, out);
    const { nx, ny, px } = this;
    const row = this.rowIn;
    const w = 2 * px;
    for (let iy = 0; iy < ny; iy++) {
      const o = w * iy;
      const g = nx * iy;
      // A grid row that is zero in both vectors has a zero transform: skipped.
      let any = false;
      for (let ix = 0; ix < nx; ix++) {
        const v = a[g + ix]!;
        row[2 * ix] = v;
        if (v !== 0) any = true;
      }
      if (b !== null) {
        for (let ix = 0; ix < nx; ix++) {
          const v = b[g + ix]!;
          row[2 * ix + 1] = v;
          if (v !== 0) any = true;
        }
      } else {
        for (let ix = 0; ix < nx; ix++) row[2 * ix + 1] = 0;
      }
      if (any) this.fft.transformRow(row, out.subarray(o, o + w));
      else out.fill(0, o, o + w);
    }
    return out;
  }

  private spectrumWasm(e: FftEngine, a: ArrayLike<number>, b: ArrayLike<number> | null, out: Float64Array): Float64Array {
    const { nx, ny, px } = this;
    const { x, z, t, view } = this.regions(e);
    const w = 2 * px;
    const x0 = x / 8;
    const z0 = z / 8;
    const rowBytes = 16 * px;
    // Runs of rows holding data are transformed in one call each; all-zero rows give zero rows.
    let start = -1;
    const flush = (end: number): void => {
      if (start < 0) return;
      e.run(x + rowBytes * start, z + rowBytes * start, t, px, 1, end - start, rowBytes, false, true);
      out.set(view.subarray(z0 + w * start, z0 + w * end), w * start);
      start = -1;
    };
    for (let iy = 0; iy < ny; iy++) {
      const o = x0 + w * iy;
      const g = nx * iy;
      let any = false;
      if (b !== null) {
        for (let ix = 0; ix < nx; ix++) {
          const u = a[g + ix]!;
          const v = b[g + ix]!;
          view[o + 2 * ix] = u;
          view[o + 2 * ix + 1] = v;
          any ||= u !== 0 || v !== 0;
        }
      } else {
        for (let ix = 0; ix < nx; ix++) {
          const u = a[g + ix]!;
          view[o + 2 * ix] = u;
          view[o + 2 * ix + 1] = 0;
          any ||= u !== 0;
        }
      }
      // The kernel does not read the upper half (px/2 … px − 1); nx … px/2 − 1 must be zero.
      if (any) {
        if (2 * nx < px) view.fill(0, o + 2 * nx, o + px);
        if (start < 0) start = iy;
      } else {
        flush(iy);
        out.fill(0, w * iy, w * (iy + 1));
      }
    }
    flush(ny);
    return out;
  }

  /** Length of one full 2-D spectrum (px·py complex values, in Fft2.rowFilter's order). */
  get columnSpectrumLength(): number {
    return 2 * this.px * this.py;
  }

  /**
   * From a row spectrum R = F_x pad(a + i b): outA = [C̃ a]_grid, outB = [C̃ b]_grid (outB may be
   * null), written at the given offsets. `spec` is not modified. With `save`, the full 2-D
   * spectrum F pad(a + i b) is kept there (Fft2.rowFilter's internal row order) for
   * {@link fromColumnSpectrum}.
   */
  fromSpectrum(spec: Float64Array, outA: Float64Array, outB: Float64Array | null, offsetA = 0, offsetB = 0, save: Float64Array | null = null): void {
    if (this.engine !== null) {
      this.fromSpectrumWasm(this.engine, spec, outA, outB, offsetA, offsetB, save);
      return;
    }
    // Forward transforms only: y = (1/P) R F (λ ⊙ F x); rows come back reversed from the column
    // filter, columns are read at −ix mod px in finish().
    this.fft.rowFilter(spec, this.lambdaT, this.ny, this.ny, this.work, save);
    this.finish(outA, outB, offsetA, offsetB);
  }

  /** As {@link fromSpectrum}, from a full 2-D spectrum kept by its `save` (one y-pass less). */
  fromColumnSpectrum(spec: Float64Array, outA: Float64Array, outB: Float64Array | null, offsetA = 0, offsetB = 0): void {
    if (this.engine !== null) {
      const { px, py } = this;
      const r = this.regions(this.engine);
      const order = this.fft.spectrumRowOrder();
      const w = 2 * px;
      // The saved rows go to T as they are; Z row order[p] ← (λ/P) ⊙ T row p in the kernel.
      r.view.set(spec.subarray(0, w * py), r.t / 8);
      for (let p = 0; p < py; p++) this.engine.scaleInto(r.z + 8 * w * order[p]!, r.t + 8 * w * p, r.lam + 8 * px * order[p]!, px);
      this.filterWasm(this.engine, r, outA, outB, offsetA, offsetB, true);
      return;
    }
    this.fft.rowFilterCached(spec, this.lambdaT, this.ny, this.work);
    this.finish(outA, outB, offsetA, offsetB);
  }

  private fromSpectrumWasm(
    e: FftEngine,
    spec: Float64Array,
    outA: Float64Array,
    outB: Float64Array | null,
    offsetA: number,
    offsetB: number,
    save: Float64Array | null,
  ): void {
    const { px, py, ny } = this;
    const r = this.regions(e);
    const w = 2 * px;
    const y0 = r.y / 8;
    r.view.set(spec.subarray(0, w * ny), y0);
    // Rows ny … py/2 − 1 are zero; rows ≥ py/2 are not read (py ≥ 2 ny).
    r.view.fill(0, y0 + w * ny, y0 + w * (py >> 1));
    e.run(r.y, r.z, r.t, py, px, 1, 0, false, true);
    if (save !== null) {
      if (save.length < w * py) throw new RangeError(`CirculantProduct.fromSpectrum: save has length ${save.length}, expected ${w * py}`);
      const order = this.fft.spectrumRowOrder();
      const z0 = r.z / 8;
      for (let p = 0; p < py; p++) save.set(r.view.subarray(z0 + w * order[p]!, z0 + w * (order[p]! + 1)), w * p);
    }
    this.filterWasm(e, r, outA, outB, offsetA, offsetB);
  }

  /**
   * From the full spectrum in region Z (natural order): × λ/P (unless `scaled`), then the inverse-direction
   * (unnormalised, e^(+2πi…)) transforms along y into Y and along x on rows t < ny into X — the
   * same as the forward transforms read at (−t, −ix) of the JS route, F⁻¹ = (1/P) R F — so
   * out[t][ix] = X[t][ix] (re → outA, im → outB) with no index reversal.
   */
  private filterWasm(
    e: FftEngine,
    r: ReturnType<CirculantProduct['regions']>,
    outA: Float64Array,
    outB: Float64Array | null,
    offsetA: number,
    offsetB: number,
    scaled = false,
  ): void {
    const { nx, ny, px, py } = this;
    const rowBytes = 16 * px;
    if (!scaled) e.scale(r.z, r.lam, px * py);
    // Only rows t < ny ≤ py/2 and columns ix < nx ≤ px/2 are read out.
    e.run(r.z, r.y, r.t, py, px, 1, 0, true, false, true);
    e.run(r.y, r.x, r.t, px, 1, ny, rowBytes, true, false, true);
    const v = r.view;
    const w = 2 * px;
    const x0 = r.x / 8;
    for (let t = 0; t < ny; t++) {
      const o = x0 + w * t;
      const g = nx * t;
      if (outB !== null) {
        for (let ix = 0; ix < nx; ix++) {
          outA[offsetA + g + ix] = v[o + 2 * ix]!;
          outB[offsetB + g + ix] = v[o + 2 * ix + 1]!;
        }
      } else {
        for (let ix = 0; ix < nx; ix++) outA[offsetA + g + ix] = v[o + 2 * ix]!;
      }
    }
  }

  private finish(outA: Float64Array, outB: Float64Array | null, offsetA: number, offsetB: number): void {
    const { nx, ny, px } = this;
    const work = this.work;
    const t = this.rowOut;
    const w = 2 * px;
    for (let iy = 0; iy < ny; iy++) {
      this.fft.transformRow(work.subarray(w * iy, w * (iy + 1)), t);
      const g = nx * iy;
      outA[offsetA + g] = t[0]!;
      for (let ix = 1; ix < nx; ix++) outA[offsetA + g + ix] = t[2 * (px - ix)]!;
      if (outB !== null) {
        outB[offsetB + g] = t[1]!;
        for (let ix = 1; ix < nx; ix++) outB[offsetB + g + ix] = t[2 * (px - ix) + 1]!;
      }
    }
  }
}

function checkLength(x: ArrayLike<number>, n: number, field: string): void {
  if (x.length !== n) throw new InputError(field, `a vector of length ${n} (one value per grid cell)`, x);
}

export interface CovarianceOperatorOptions {
  /** Force a path (e.g. to compare); default: 'fft' when isStationaryOnGrid, else 'dense'. */
  readonly path?: CovariancePath;
}

/**
 * Cm as an operator on this grid. The FFT path is exact for products (round-off only); the
 * dense path assembles Cm with prior/covariance.ts (N² memory).
 */
export function covarianceOperator(grid: Grid, prior: PriorSpec, options: CovarianceOperatorOptions = {}): CovarianceOperator {
  const n = cellCount(grid);
  const reasonNot = nonStationaryReason(grid, prior);
  const path: CovariancePath = options.path ?? (reasonNot === null ? 'fft' : 'dense');
  if (path === 'fft' && reasonNot !== null) throw new InputError('path', 'dense for this prior and grid', `fft (${reasonNot})`);
  const s = prior.stdProfile;
  if (s !== undefined) checkLength(s, n, 'prior.stdProfile');
  const nugget = prior.nugget ?? 0;
  switch (path) {
    case 'dense': {
      const cm = covarianceMatrix(grid, prior);
      const reason = options.path === 'dense' ? 'dense path requested' : (reasonNot ?? '');
      return {
        path,
        size: n,
        padding: [...grid.shape],
        reason,
        apply: (x) => {
          checkLength(x, n, 'x');
          return matvec(cm, x);
        },
        applyMany: (x) => {
          if (x.cols !== n) throw new InputError('x.cols', `${n} (one column per grid cell)`, x.cols);
          const out = matrix(x.rows, n);
          for (let r = 0; r < x.rows; r++) out.data.set(matvec(cm, x.data.subarray(r * n, (r + 1) * n)), r * n);
          return out;
        },
        diagonal: () => {
          const d = new Float64Array(n);
          for (let i = 0; i < n; i++) d[i] = cm.data[i * n + i]!;
          return d;
        },
      };
    }
    case 'fft': {
      const cp = new CirculantProduct(grid, prior);
      const spec = new Float64Array(cp.spectrumLength);
      const scaled = (x: ArrayLike<number>): ArrayLike<number> => {
        if (s === undefined) return x;
        const y = new Float64Array(n);
        for (let i = 0; i < n; i++) y[i] = s[i]! * x[i]!;
        return y;
      };
      const finish = (x: ArrayLike<number>, y: Float64Array, off: number): void => {
        if (s !== undefined) for (let i = 0; i < n; i++) y[off + i] *= s[i]!;
        if (nugget !== 0) for (let i = 0; i < n; i++) y[off + i] += nugget * x[i]!;
      };
      return {
        path,
        size: n,
        padding: gridDimension(grid) === 1 ? [cp.px] : [cp.px, cp.py],
        reason: '',
        apply: (x) => {
          checkLength(x, n, 'x');
          const y = new Float64Array(n);
          cp.fromSpectrum(cp.spectrum(scaled(x), null, spec), y, null);
          finish(x, y, 0);
          return y;
        },
        applyMany: (x) => {
          if (x.cols !== n) throw new InputError('x.cols', `${n} (one column per grid cell)`, x.cols);
          const out = matrix(x.rows, n);
          for (let r = 0; r < x.rows; r += 2) {
            const a = x.data.subarray(r * n, (r + 1) * n);
            const b = r + 1 < x.rows ? x.data.subarray((r + 1) * n, (r + 2) * n) : null;
            cp.spectrum(scaled(a), b === null ? null : scaled(b), spec);
            cp.fromSpectrum(spec, out.data, b === null ? null : out.data, r * n, (r + 1) * n);
            finish(a, out.data, r * n);
            if (b !== null) finish(b, out.data, (r + 1) * n);
          }
          return out;
        },
        diagonal: () => {
          const d = new Float64Array(n);
          for (let i = 0; i < n; i++) d[i] = (s === undefined ? 1 : s[i]! * s[i]!) * cp.variance + nugget;
          return d;
        },
      };
    }
    default:
      return assertNever(path);
  }
}
