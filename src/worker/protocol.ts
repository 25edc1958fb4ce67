/**
 * The message protocol between the workbench (main thread) and the numerics worker.
 *
 * Every request carries an `id`; every reply names the id it answers and holds either a result or a
 * serialised error. Long work may send `progress` messages first. Float64Array buffers in results are
 * transferred (zero-copy), not cloned. A posterior request on the FFT path also sends one `partial`
 * reply before its result: the posterior mean and the data fit, which need only the factorised K,
 * while the standard deviations (the bands) are still being computed. Requests of one `channel` supersede each other: only the
 * newest pending request of a channel is ever run (see ./client.ts and ./worker.ts).
 *
 * The problem is sent once (`loadDemo` or `setProblem`) and kept by the worker; every later request
 * names the `problemVersion` it was made for, so work for a replaced problem is refused, not run.
 */
import { assertNever } from '../core/errors.ts';
import type { Diagnostics } from '../core/prior/diagnostics.ts';
import type { PriorSpec } from '../core/prior/spec.ts';
import type { DataGeometry, Problem } from '../core/problems/spec.ts';
import type { Geometry } from '../core/grid/grid.ts';
import type { Matrix } from '../core/linalg/matrix.ts';
import type { PosteriorSummary } from '../core/inverse/types.ts';
import type { RequestBase } from './requestBase.ts';
import { isTuningKind, TUNING_KINDS, type TuningKind, type TuningRequest, type TuningResultMap } from './tuningProtocol.ts';

/** What the main thread needs to draw a problem (the operator itself stays in the worker). */
export interface ProblemView {
  readonly version: number;
  readonly demoId: string | null;
  readonly title: string;
  readonly description: string;
  /** A regular grid, or a cell list (the user's own mesh: shown on the cells screen, dense route). */
  readonly grid: Geometry;
  readonly dataCount: number;
  readonly values: Float64Array;
  /** Per-datum standard deviation (√diag Cd for a full data covariance). */
  readonly sigma: Float64Array;
  readonly truth: Float64Array | null;
  /** Sensitivity / coverage: column sums of |G|, length N. */
  readonly coverage: Float64Array;
  readonly operatorKind: 'dense' | 'sparse';
  /** Non-zeros of G (all entries for a dense G). */
  readonly operatorNonZeros: number;
  readonly quantity: { readonly name: string; readonly unit: string };
  /** Unit of the data values ('' when the problem gives none). */
  readonly dataUnit: string;
  /** Where the data were measured (positions, or path ends), null when the problem does not say. */
  readonly geometry: DataGeometry | null;
  /** The prior to start from: a demo's own, or for a loaded problem the rule of src/core/tuning/startPrior.ts. */
  readonly startPrior: PriorSpec | null;
  /** For a loaded problem: how its starting prior was made, in words with the numbers (null for demos). */
  readonly startRule: string | null;
  readonly truthPrior: PriorSpec | null;
  /** Which dense kernels the worker runs: the WebAssembly SIMD ones, or their JavaScript fallbacks (same results). */
  readonly numericKernels: 'WebAssembly SIMD' | 'JavaScript';
}

/** Posterior summary (its data-fit reference is summary.fitReference) and the prior mean. */
export interface PosteriorResult {
  readonly summary: PosteriorSummary;
  /** Prior mean m0 of the same prior (for the prior band). */
  readonly priorMean: Float64Array;
}

/**
 * What the posterior request sends first (FFT path): everything that needs only the mean
 * m̃ = m0 + Cm Gᵀ K⁻¹ (d − G m0), so the UI can draw the mean and the data fit while the bands
 * (√diag of the posterior covariance) are computed. Its arrays are copies, never the buffers the
 * final {@link PosteriorResult} holds, and equal to the final result's bit for bit.
 */
export interface PosteriorPartial {
  readonly path: 'fft' | 'dense';
  /** Posterior mean m̃ (length N). */
  readonly mean: Float64Array;
  /** Prior mean m0 of the same prior. */
  readonly priorMean: Float64Array;
  /** Pointwise prior standard deviation √diag(Cm) (for the prior band). */
  readonly priorStd: Float64Array;
  /** G m̃. */
  readonly predicted: Float64Array;
  /** Normalised residuals, as in PosteriorSummary.residuals. */
  readonly residuals: Float64Array;
  /** Σ residuals². */
  readonly chi2: number;
  readonly dataCount: number;
  readonly parameterCount: number;
}

/** Requests of one channel supersede each other (latest wins). */
export type Channel = 'problem' | 'posterior' | 'diagnostics' | 'priorDraws' | 'posteriorDraws' | 'resolution' | 'covariance' | TuningKind;

/** Order in which the worker runs pending channels: the posterior plot first. */
export const CHANNEL_PRIORITY: readonly Channel[] = [
  'problem',
  'posterior',
  'diagnostics',
  'resolution',
  'priorDraws',
  'posteriorDraws',
  'covariance',
  ...TUNING_KINDS,
];

export type WorkerRequest =
  | (RequestBase & { readonly kind: 'loadDemo'; readonly version: number; readonly demoId: string })
  | (RequestBase & {
      readonly kind: 'setProblem';
      readonly version: number;
      readonly problem: Problem<Geometry>;
      /** Fit the starting prior (src/core/tuning/startPrior.ts; default true). False: startPrior and startRule are null. */
      readonly startPrior?: boolean;
    })
  | (RequestBase & { readonly kind: 'posterior'; readonly problemVersion: number; readonly prior: PriorSpec })
  | (RequestBase & { readonly kind: 'diagnostics'; readonly problemVersion: number; readonly prior: PriorSpec })
  | (RequestBase & {
      readonly kind: 'priorDraws';
      readonly problemVersion: number;
      readonly prior: PriorSpec;
      readonly count: number;
      readonly seed: number;
    })
  | (RequestBase & {
      readonly kind: 'posteriorDraws';
      readonly problemVersion: number;
      readonly prior: PriorSpec;
      readonly count: number;
      readonly seed: number;
    })
  | (RequestBase & { readonly kind: 'resolution'; readonly problemVersion: number; readonly prior: PriorSpec; readonly cell: number })
  /** The dense Cm for the Prior screen's view, or for export (`form`: Cm itself or its lower Cholesky factor; larger limit). */
  | (RequestBase & {
      readonly kind: 'covariance';
      readonly problemVersion: number;
      readonly prior: PriorSpec;
      readonly form?: 'covariance' | 'cholesky';
    })
  /** Prior selection: see ./tuningProtocol.ts. */
  | TuningRequest
  /** Drop a queued request (no reply is sent for it); a running tuning request is aborted. */
  | (RequestBase & { readonly kind: 'cancel'; readonly target: number });

export type RequestKind = Exclude<WorkerRequest['kind'], 'cancel'>;

/** Result type of each request kind. */
export interface ResultMap extends TuningResultMap {
  loadDemo: ProblemView;
  setProblem: ProblemView;
  posterior: PosteriorResult;
  diagnostics: Diagnostics;
  priorDraws: Matrix;
  posteriorDraws: Matrix;
  resolution: { readonly cell: number; readonly row: Float64Array };
  covariance: Matrix;
}

/** The channel each request kind belongs to. */
export function channelOf(kind: RequestKind): Channel {
  if (isTuningKind(kind)) return kind;
  switch (kind) {
    case 'loadDemo':
    case 'setProblem':
      return 'problem';
    case 'posterior':
    case 'diagnostics':
    case 'priorDraws':
    case 'posteriorDraws':
    case 'resolution':
    case 'covariance':
      return kind;
    default:
      return assertNever(kind);
  }
}

/** An error as it crosses the worker boundary. `field` is set for input errors. */
export interface SerialisedError {
  readonly name: string;
  readonly message: string;
  readonly field?: string;
}

export type WorkerReply =
  | { readonly type: 'result'; readonly id: number; readonly result: ResultMap[RequestKind] }
  | { readonly type: 'error'; readonly id: number; readonly error: SerialisedError }
  | { readonly type: 'progress'; readonly id: number; readonly stage: string; readonly fraction: number }
  /** The first part of a posterior result (at most one per request, always before its `result`). */
  | { readonly type: 'partial'; readonly id: number; readonly partial: PosteriorPartial }
  /** Sent for a queued request the worker dropped because a newer one of its channel arrived. */
  | { readonly type: 'superseded'; readonly id: number };

export function serialiseError(e: unknown): SerialisedError {
  if (e instanceof Error) {
    const field = (e as { field?: unknown }).field;
    return typeof field === 'string' ? { name: e.name, message: e.message, field } : { name: e.name, message: e.message };
  }
  return { name: 'Error', message: String(e) };
}

/** Every distinct ArrayBuffer reachable in a result, for postMessage's transfer list. */
export function transferables(value: unknown, out: ArrayBuffer[] = [], seen = new Set<unknown>()): ArrayBuffer[] {
  if (value === null || typeof value !== 'object' || seen.has(value)) return out;
  seen.add(value);
  if (ArrayBuffer.isView(value)) {
    // Only whole-buffer arrays move; a view into a larger buffer (which the sender may still need) is cloned.
    const buf = value.buffer;
    if (buf instanceof ArrayBuffer && value.byteOffset === 0 && value.byteLength === buf.byteLength && !out.includes(buf)) {
      out.push(buf);
    }
    return out;
  }
  if (Array.isArray(value)) {
    for (const v of value) transferables(v, out, seen);
    return out;
  }
  for (const v of Object.values(value as Record<string, unknown>)) transferables(v, out, seen);
  return out;
}
