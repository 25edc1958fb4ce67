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
import type { OffsetFunction } from '../prior/lag.ts';
import type { PriorSpec } from '../prior/spec.ts';
import { kernelDefinition } from '../kernels/table.ts';
import { circulantEmbedding, gridAxes, productPadding, stationaryCovariance } from './embedding.ts';
import type { FftEngine, FftImplementation } from './engine.ts';
import { fftEngine } from './transform.ts';

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
 * grids other than 1-D, 2-D and 3-D regular ones are refused. This is the rule of everything built on
 * covariance products: the structured posterior (mean, std, resolution rows) and the projections of the
 * prior-selection criteria, realisations by circulant embedding and the positive-definiteness bracket.
 */
export function nonStationaryReason(grid: Grid, prior: PriorSpec): string | null {
  return productReason(grid, prior);
}

/** As {@link nonStationaryReason} for covariance products alone ({@link covarianceOperator}), which run on 1-D, 2-D and 3-D grids. */
export function productReason(grid: Grid, prior: PriorSpec): string | null {
  const dim = grid.shape.length;
  if (dim !== 1 && dim !== 2 && dim !== 3) return `grid has ${dim} axes; the FFT path handles 1-D, 2-D and 3-D grids`;
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
 * The kernel part C of the prior on one grid as a circulant product, on the realm's FFT engine
 * (./transform.ts: WebAssembly SIMD or its bit-identical JavaScript twin, Stockham radix-4, natural
 * order). A product C̃ x = F⁻¹(λ ⊙ F pad x) of two real vectors at once (a + i b) runs as
 *   x-passes on the ny rows that hold data (the zero half px/2 … px − 1 of each padded row is not
 *   read) → F_y over all columns at once (rows ≥ py/2 not read) → × λ/P → inverse-direction
 *   (unnormalised) transforms along y and along x on the ny rows and nx columns that are wanted,
 * so no work is spent on the padding that is known to be zero or thrown away. The "row spectrum"
 * R = F_x pad(a + i b) (ny rows of px complex values) depends only on the vectors, not on the prior;
 * the full spectrum F pad(a + i b) (natural order) is what callers cache across priors.
 * Workspace is the engine's memory; not for concurrent use within a realm.
 */
export class CirculantProduct {
  readonly nx: number;
  readonly ny: number;
  /** 1 on 1-D and 2-D grids. */
  readonly nz: number;
  readonly px: number;
  readonly py: number;
  /** 1 on 1-D and 2-D grids. */
  readonly pz: number;
  /** λ, real eigenvalues of the embedding (px·py·pz, x fastest). */
  readonly eigenvalues: Float64Array;
  /** c(0, 0), the kernel variance Σ_t variance_t. */
  readonly variance: number;
  private readonly engine: FftEngine;
  /** λ/(px·py) in the eigenvalues' layout (x fastest): the inverse transform's scale, folded in. */
  private readonly lambdaN: Float64Array;

  /**
   * `kernel`, when given, replaces the prior's kernel part by another even function of the offset (a term's
   * derivative in ../tuning/termDerivative.ts) for the eigenvalues and the variance.
   */
  constructor(grid: Grid, prior: PriorSpec, padding?: readonly number[], engine: FftEngine = fftEngine(), kernel?: OffsetFunction) {
    const { nx, ny } = gridAxes(grid);
    const nz = grid.shape[2] ?? 1;
    this.nx = nx;
    this.ny = ny;
    this.nz = nz;
    this.px = padding?.[0] ?? productPadding(nx);
    this.py = padding?.[1] ?? productPadding(ny);
    this.pz = padding?.[2] ?? productPadding(nz);
    if (this.px < 2 * nx - 1 || this.py < 2 * ny - 1 || this.pz < 2 * nz - 1) {
      throw new RangeError(`CirculantProduct: padding ${this.px} × ${this.py} × ${this.pz} is below 2n − 1 for ${nx} × ${ny} × ${nz}`);
    }
    const { px, py, pz } = this;
    this.eigenvalues = circulantEmbedding(grid, kernel ?? prior.terms, px, py, pz).eigenvalues;
    this.variance = kernel === undefined ? stationaryCovariance(prior.terms)(0, 0) : kernel(0, 0, 0);
    this.engine = engine;
    const scale = 1 / (px * py * pz);
    this.lambdaN = this.eigenvalues.map((v) => v * scale);
  }

  /** Which FFT implementation runs the products. */
  get implementation(): FftImplementation {
    return this.engine.implementation;
  }

  /**
   * Byte addresses of the work regions (after the twiddle tables and the resident λ): Y, Z, T of
   * px·py complex values (T the kernel's scratch), X of px·ny; and a current view of the memory.
   */
  private regions() {
    const e = this.engine;
    const { px, py, pz, ny, nz } = this;
    for (const n of [px, py, pz]) {
      if (n > 1) {
        e.twiddles(n, false);
        e.twiddles(n, true);
      }
    }
    const { at: lam, end } = e.resident(this.lambdaN);
    const full = 16 * px * py * pz;
    const y = end;
    const z = y + full;
    const t = z + full;
    const x = t + full;
    const view = e.reserve(x + 16 * px * ny * nz);
    return { lam, y, z, t, x, view };
  }

  /** Length of one row spectrum (interleaved complex, px·ny·nz values). */
  get spectrumLength(): number {
    return 2 * this.px * this.ny * this.nz;
  }

  /** Rows holding data: ny·nz (row r = iy + ny·iz starts at grid index nx·r). */
  private get rows(): number {
    return this.ny * this.nz;
  }

  /**
   * Row spectrum F_x pad(a + i b) into `out` (length spectrumLength). `b` may be null (zero
   * imaginary part). a and b are grid vectors of length nx·ny.
   */
  spectrum(a: ArrayLike<number>, b: ArrayLike<number> | null, out: Float64Array): Float64Array {
    const e = this.engine;
    const { nx, px } = this;
    const ny = this.rows;
    const { x, z, t, view } = this.regions();
    const w = 2 * px;
    const x0 = x / 8;
    const z0 = z / 8;
    const rowBytes = 16 * px;
    // Doubles of a padded row that must be zero: up to the half the kernel reads (px ≥ 4), else all.
    const readEnd = px >= 4 ? px : w;
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
          const u = a[g + ix];
          const v = b[g + ix];
          view[o + 2 * ix] = u;
          view[o + 2 * ix + 1] = v;
          any ||= u !== 0 || v !== 0;
        }
      } else {
        for (let ix = 0; ix < nx; ix++) {
          const u = a[g + ix];
          view[o + 2 * ix] = u;
          view[o + 2 * ix + 1] = 0;
          any ||= u !== 0;
        }
      }
      if (any) {
        if (2 * nx < readEnd) view.fill(0, o + 2 * nx, o + readEnd);
        if (start < 0) start = iy;
      } else {
        flush(iy);
        out.fill(0, w * iy, w * (iy + 1));
      }
    }
    flush(ny);
    return out;
  }

  /** Length of one full 2-D (3-D) spectrum (px·py(·pz) complex values, natural order). */
  get columnSpectrumLength(): number {
    return 2 * this.px * this.py * this.pz;
  }

  /**
   * From a row spectrum R = F_x pad(a + i b): outA = [C̃ a]_grid, outB = [C̃ b]_grid (outB may be
   * null), written at the given offsets. `spec` is not modified. With `save`, the full 2-D
   * spectrum F pad(a + i b) is kept there for {@link fromColumnSpectrum}.
   */
  fromSpectrum(
    spec: Float64Array,
    outA: Float64Array,
    outB: Float64Array | null,
    offsetA = 0,
    offsetB = 0,
    save: Float64Array | null = null,
  ): void {
    if (this.nz > 1 || this.pz > 1) {
      this.fromSpectrum3(spec, outA, outB, offsetA, offsetB, save);
      return;
    }
    const { px, py, ny } = this;
    const r = this.regions();
    const w = 2 * px;
    const y0 = r.y / 8;
    r.view.set(spec.subarray(0, w * ny), y0);
    // Rows ny … py/2 − 1 are zero; rows ≥ py/2 are not read (py ≥ 4), else all rows are read.
    r.view.fill(0, y0 + w * ny, y0 + w * (py >= 4 ? py >> 1 : py));
    this.engine.run(r.y, r.z, r.t, py, px, 1, 0, false, true);
    if (save !== null) {
      if (save.length < w * py) throw new RangeError(`CirculantProduct.fromSpectrum: save has length ${save.length}, expected ${w * py}`);
      const z0 = r.z / 8;
      save.set(this.engine.f64().subarray(z0, z0 + w * py));
    }
    this.filter(r, outA, outB, offsetA, offsetB, false);
  }

  /** As {@link fromSpectrum}, from a full 2-D spectrum kept by its `save` (one y-pass less). */
  fromColumnSpectrum(spec: Float64Array, outA: Float64Array, outB: Float64Array | null, offsetA = 0, offsetB = 0): void {
    const { px, py, pz } = this;
    const r = this.regions();
    // The saved spectrum goes to T; Z ← (λ/P) ⊙ T in the kernel.
    r.view.set(spec.subarray(0, 2 * px * py * pz), r.t / 8);
    this.engine.scaleInto(r.z, r.t, r.lam, px * py * pz);
    if (this.nz > 1 || this.pz > 1) this.filter3(r, outA, outB, offsetA, offsetB, true);
    else this.filter(r, outA, outB, offsetA, offsetB, true);
  }

  /**
   * 3-D form of {@link fromSpectrum}: rows (iy, iz) of the row spectrum go to Z (rows ny … py/2 − 1 of
   * each slab zeroed), the y-pass runs on the nz slabs holding data into Y (slabs nz … pz/2 − 1
   * zeroed), the z-pass over all px·py columns into Z gives the full spectrum.
   */
  private fromSpectrum3(
    spec: Float64Array,
    outA: Float64Array,
    outB: Float64Array | null,
    offsetA: number,
    offsetB: number,
    save: Float64Array | null,
  ): void {
    const e = this.engine;
    const { px, py, pz, ny, nz } = this;
    const r = this.regions();
    const w = 2 * px;
    const slab = w * py;
    const z0 = r.z / 8;
    const y0 = r.y / 8;
    const yEnd = py >= 4 ? py >> 1 : py;
    for (let iz = 0; iz < nz; iz++) {
      r.view.set(spec.subarray(w * ny * iz, w * ny * (iz + 1)), z0 + slab * iz);
      r.view.fill(0, z0 + slab * iz + w * ny, z0 + slab * iz + w * yEnd);
    }
    e.run(r.z, r.y, r.t, py, px, nz, 16 * px * py, false, true);
    const v = e.f64();
    v.fill(0, y0 + slab * nz, y0 + slab * (pz >= 4 ? pz >> 1 : pz));
    e.run(r.y, r.z, r.t, pz, px * py, 1, 0, false, true);
    if (save !== null) {
      if (save.length < slab * pz)
        throw new RangeError(`CirculantProduct.fromSpectrum: save has length ${save.length}, expected ${slab * pz}`);
      save.set(e.f64().subarray(z0, z0 + slab * pz));
    }
    this.filter3(r, outA, outB, offsetA, offsetB, false);
  }

  /**
   * 3-D form of {@link filter}: from the full spectrum in Z, × λ/P (unless `scaled`), then inverse-direction
   * transforms along z into Y (slabs < nz wanted), along y on those slabs into Z (rows < ny wanted) and along
   * x on those rows into X.
   */
  private filter3(
    r: ReturnType<CirculantProduct['regions']>,
    outA: Float64Array,
    outB: Float64Array | null,
    offsetA: number,
    offsetB: number,
    scaled: boolean,
  ): void {
    const e = this.engine;
    const { ny, nz, px, py, pz } = this;
    const rowBytes = 16 * px;
    const slabBytes = rowBytes * py;
    if (!scaled) e.scale(r.z, r.lam, px * py * pz);
    e.run(r.z, r.y, r.t, pz, px * py, 1, 0, true, false, true);
    e.run(r.y, r.z, r.t, py, px, nz, slabBytes, true, false, true);
    for (let iz = 0; iz < nz; iz++) e.run(r.z + slabBytes * iz, r.x + rowBytes * ny * iz, r.t, px, 1, ny, rowBytes, true, false, true);
    this.readRows(r.x, ny * nz, outA, outB, offsetA, offsetB);
  }

  /**
   * From the full spectrum in region Z (natural order): × λ/P (unless `scaled`), then the inverse-direction
   * (unnormalised, e^(+2πi…)) transforms along y into Y and along x on rows t < ny into X, so
   * out[t][ix] = X[t][ix] (re → outA, im → outB).
   */
  private filter(
    r: ReturnType<CirculantProduct['regions']>,
    outA: Float64Array,
    outB: Float64Array | null,
    offsetA: number,
    offsetB: number,
    scaled: boolean,
  ): void {
    const e = this.engine;
    const { ny, px, py } = this;
    const rowBytes = 16 * px;
    if (!scaled) e.scale(r.z, r.lam, px * py);
    // Only rows t < ny ≤ py/2 and columns ix < nx ≤ px/2 are read out.
    e.run(r.z, r.y, r.t, py, px, 1, 0, true, false, true);
    e.run(r.y, r.x, r.t, px, 1, ny, rowBytes, true, false, true);
    this.readRows(r.x, ny, outA, outB, offsetA, offsetB);
  }

  /** The first nx columns of `rows` transformed rows at region X (px complex each): re → outA, im → outB. */
  private readRows(x: number, rows: number, outA: Float64Array, outB: Float64Array | null, offsetA: number, offsetB: number): void {
    const { nx, px } = this;
    const v = this.engine.f64();
    const w = 2 * px;
    const x0 = x / 8;
    for (let t = 0; t < rows; t++) {
      const o = x0 + w * t;
      const g = nx * t;
      if (outB !== null) {
        for (let ix = 0; ix < nx; ix++) {
          outA[offsetA + g + ix] = v[o + 2 * ix];
          outB[offsetB + g + ix] = v[o + 2 * ix + 1];
        }
      } else {
        for (let ix = 0; ix < nx; ix++) outA[offsetA + g + ix] = v[o + 2 * ix];
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
  const reasonNot = productReason(grid, prior);
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
          for (let i = 0; i < n; i++) d[i] = cm.data[i * n + i];
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
        for (let i = 0; i < n; i++) y[i] = s[i] * x[i];
        return y;
      };
      const finish = (x: ArrayLike<number>, y: Float64Array, off: number): void => {
        if (s !== undefined) for (let i = 0; i < n; i++) y[off + i] *= s[i];
        if (nugget !== 0) for (let i = 0; i < n; i++) y[off + i] += nugget * x[i];
      };
      return {
        path,
        size: n,
        padding: [cp.px, cp.py, cp.pz].slice(0, gridDimension(grid)),
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
          for (let i = 0; i < n; i++) d[i] = (s === undefined ? 1 : s[i] * s[i]) * cp.variance + nugget;
          return d;
        },
      };
    }
    default:
      return assertNever(path);
  }
}
