/**
 * The worker side of prior selection: runs the tuning requests of ./tuningProtocol.ts on
 * the numerical core (src/core/tuning) for the problem the engine holds.
 *
 * ## Progress and cancellation
 * The core's calls are synchronous, so a call that runs for seconds would keep the worker's
 * message loop from seeing a `cancel` or a newer request. Long requests are therefore cut into
 * units that are separate core calls, and between units the request awaits a macrotask
 * ({@link yieldToMessages}, a `setTimeout(0)`), during which the worker handles incoming messages;
 * the queue then sets this request's abort flag (./tuningSignals.ts), which is checked after the
 * yield. Units:
 * - evidence map: one row (one length, every variance) per core call — the row's lengths axis is
 *   {min: ℓ_i, max: ℓ_i, count: 1}, so each value is computed exactly as in the whole-map call
 *   (same ℓ_i from logSpaced, same 'auto' method choice, which depends on the variance count only);
 * - ν profile: one ν per call (the core factors per ν anyway); the nugget profile is one call (one
 *   eigendecomposition serves all values, cheap);
 * - calibration: chunks of replicates ({@link calibrationChunks}), merged by {@link mergeCalibration};
 *   replicate r draws from its own stream seeded replicateSeed(seed, r) (src/core/tuning/calibration.ts),
 *   the command line's streams, so `priorscope calibrate --seed S` gives the workbench's replicates;
 * - candidates: one candidate per unit; cross-calibration: one (truth, inversion) pair per unit,
 *   every pair with the same replicate streams (common random numbers, as calibrationTable does).
 * The type-II fit is one core call (BFGS state cannot be split without changing the optimiser);
 * it reports progress but can only be cancelled before it starts.
 *
 * ## Large grids
 * Each request makes one spectrum cache (structuredProblem) and passes it to every core call of
 * its units, so on the FFT route (stationary prior, N > TUNING_DENSE_LIMIT, src/core/tuning/
 * projected.ts) the row spectra of G are transformed once per request, not once per row or
 * candidate. Candidate scoring on that route uses the structured posterior (mean, std, χ², log
 * evidence, and K's factor for leave-one-out and the predictive check) and its draws
 * (structuredPosteriorDraws); below the limit it is the dense code as before, number for number.
 */
import { cellCount } from '../core/grid/grid.ts';
import type { DataFitReference } from '../core/inverse/fitReference.ts';
import { posteriorRealisations, posteriorSummary, preparePosterior } from '../core/inverse/posterior.ts';
import {
  prepareStructuredPosterior,
  structuredPosteriorSummary,
  structuredProblem,
  type StructuredProblem,
} from '../core/inverse/structured.ts';
import { structuredPosteriorDraws } from '../core/inverse/structuredDraws.ts';
import { diagnosePriorAuto } from '../core/prior/structuredDiagnostics.ts';
import type { PriorSpec } from '../core/prior/spec.ts';
import type { Problem } from '../core/problems/spec.ts';
import {
  calibrate,
  replicateSeed,
  evidenceMap,
  finishMap,
  evidenceProfile,
  leaveOneOut,
  logEvidence,
  logSpaced,
  maximiseEvidence,
  priorCriteria,
  priorPredictiveCheck,
  leaveOneOutFromFactor,
  predictiveFromStatistic,
  tuningRoute,
  type CalibrationResult,
  type EvidenceMap,
  type EvidenceMethod,
  type EvidenceProfile,
} from '../core/tuning/index.ts';
import { averagedPosterior } from '../core/tuning/averaged.ts';
import { assertNever, InputError } from '../core/errors.ts';
import type { WorkerRequest } from './protocol.ts';
import type { CandidateScores, CrossCalibration, TuningRequest, TuningResultMap } from './tuningProtocol.ts';
import { isTuningKind } from './tuningProtocol.ts';
import { closeSignal, openSignal, type AbortFlag } from './tuningSignals.ts';

export type ProgressFn = (stage: string, fraction: number) => void;

/** Largest number of values on one evidence-map axis accepted from the UI. */
export const MAX_AXIS_COUNT = 200;
/** Largest number of calibration replicates per request. */
export const MAX_REPLICATES = 2000;
/** Largest number of pinned candidates. */
export const MAX_CANDIDATES = 4;

export function isTuningRequest(r: WorkerRequest): r is TuningRequest {
  return isTuningKind(r.kind);
}

/** Let the worker's message loop run (a macrotask). */
export function yieldToMessages(): Promise<void> {
  return new Promise((resolve) => setTimeout(resolve, 0));
}

/** Run one tuning request; `flag` (tests) replaces the registry's abort flag. */
export async function runTuning<K extends TuningRequest['kind']>(
  problem: Problem,
  req: Extract<TuningRequest, { kind: K }>,
  progress: ProgressFn = () => {},
  flag?: AbortFlag,
): Promise<TuningResultMap[K]> {
  const r = req as TuningRequest;
  const signal = flag ?? openSignal(r.id, r.kind);
  try {
    return (await dispatch(problem, r, progress, signal)) as TuningResultMap[K];
  } finally {
    if (!flag) closeSignal(r.id);
  }
}

async function dispatch(
  problem: Problem,
  r: TuningRequest,
  progress: ProgressFn,
  signal: AbortFlag,
): Promise<TuningResultMap[TuningRequest['kind']]> {
  // One spectrum cache per request, shared by its units (module comment, "Large grids").
  const structured = structuredProblem(problem);
  switch (r.kind) {
    case 'evidenceMap':
      return mapByRows(problem, r.prior, r.term, r.lengths, r.variances, progress, signal, structured);
    case 'evidenceProfile':
      return profile(problem, r, progress, signal, structured);
    case 'typeII':
      progress('type-II maximum likelihood', 0);
      return maximiseEvidence(problem, r.prior, {
        fixed: r.fixed,
        signal,
        structured,
        onProgress: (f) => progress('type-II maximum likelihood', f),
      });
    case 'criteria':
      return priorCriteria(problem, r.prior, { structured });
    case 'calibration':
      return calibrationByChunks(problem, r.prior, r, progress, signal, structured);
    case 'candidates':
      return scoreCandidates(problem, r.priors, r.draws, r.seed, progress, signal, structured);
    case 'crossCalibration':
      return crossCalibration(problem, r.priors, r, progress, signal, structured);
    case 'averaged':
      // One posterior per map cell of non-negligible weight (src/core/tuning/averaged.ts); not cancellable part way.
      progress('averaging the posterior over the evidence map', 0);
      return averagedPosterior(problem, r.prior, r.map, { hyperPrior: r.hyperPrior });
    default:
      return assertNever(r);
  }
}

function checkAxisCount(field: string, count: number): void {
  if (!Number.isInteger(count) || count < 1 || count > MAX_AXIS_COUNT)
    throw new InputError(`${field}.count`, `an integer from 1 to ${MAX_AXIS_COUNT}`, count);
}

/** The evidence map computed one length (row) per core call, yielding between rows (module comment). */
export async function mapByRows(
  problem: Problem,
  prior: PriorSpec,
  term: number,
  lengthAxis: { min: number; max: number; count: number },
  varianceAxis: { min: number; max: number; count: number },
  progress: ProgressFn,
  signal: AbortFlag,
  structured: StructuredProblem = structuredProblem(problem),
): Promise<EvidenceMap> {
  checkAxisCount('lengths', lengthAxis.count);
  checkAxisCount('variances', varianceAxis.count);
  const lengths = logSpaced(lengthAxis, 'lengths');
  const variances = logSpaced(varianceAxis, 'variances');
  const nl = lengths.length;
  const nv = variances.length;
  const out = new Float64Array(nl * nv).fill(Number.NaN);
  const methods: EvidenceMethod[] = [];
  let note: string | undefined;
  let cancelled = false;
  for (let i = 0; i < nl; i++) {
    if (i > 0) await yieldToMessages();
    if (signal.aborted) {
      cancelled = true;
      break;
    }
    const L = lengths[i];
    const row = evidenceMap(problem, prior, { term, lengths: { min: L, max: L, count: 1 }, variances: varianceAxis, structured });
    out.set(row.logEvidence, i * nv);
    methods.push(row.methodByLength[0]);
    if (row.note !== undefined) note = row.note;
    progress(`evidence map: length ${i + 1} of ${nl}`, (i + 1) / nl);
  }
  return finishMap(term, lengths, variances, out, methods, cancelled, note);
}

async function profile(
  problem: Problem,
  r: Extract<TuningRequest, { kind: 'evidenceProfile' }>,
  progress: ProgressFn,
  signal: AbortFlag,
  structured: StructuredProblem,
): Promise<EvidenceProfile> {
  if (r.which.parameter === 'nugget') return evidenceProfile(problem, r.prior, r.which, { values: r.values, signal, structured });
  const values = Float64Array.from(r.values);
  const out = new Float64Array(values.length).fill(Number.NaN);
  let cancelled = false;
  for (let k = 0; k < values.length; k++) {
    if (k > 0) await yieldToMessages();
    if (signal.aborted) {
      cancelled = true;
      break;
    }
    out[k] = evidenceProfile(problem, r.prior, r.which, { values: [values[k]], structured }).logEvidence[0];
    progress(`ν profile: value ${k + 1} of ${values.length}`, (k + 1) / values.length);
  }
  let best: EvidenceProfile['best'] = null;
  for (let k = 0; k < out.length; k++) {
    const v = out[k];
    if (Number.isFinite(v) && (best === null || v > best.logEvidence)) best = { value: values[k], logEvidence: v, index: k };
  }
  return { parameter: 'nu', values, logEvidence: out, method: 'cholesky', best, cancelled };
}

/** Replicate counts of the calibration chunks (at most 10 chunks), each with a seed (seed + k) mod 2³² that only checks the seed: replicates draw from replicateSeed streams. */
export function calibrationChunks(replicates: number, seed: number): { replicates: number; seed: number }[] {
  if (!Number.isInteger(replicates) || replicates < 1 || replicates > MAX_REPLICATES)
    throw new InputError('replicates', `an integer from 1 to ${MAX_REPLICATES}`, replicates);
  const size = Math.max(1, Math.ceil(replicates / 10));
  const out: { replicates: number; seed: number }[] = [];
  for (let done = 0, k = 0; done < replicates; k++) {
    const n = Math.min(size, replicates - done);
    out.push({ replicates: n, seed: (seed + k) >>> 0 });
    done += n;
  }
  return out;
}

/**
 * Merge calibration results of disjoint replicate sets of one (truth, inversion) pair: coverages
 * weighted by replicate count, per-replicate coverages concatenated, rank histograms summed.
 */
export function mergeCalibration(parts: readonly CalibrationResult[]): CalibrationResult {
  const used = parts.filter((p) => p.replicates > 0);
  if (used.length === 0) {
    const p = parts[0];
    if (!p) throw new InputError('parts', 'at least one calibration result', parts);
    return p;
  }
  const total = used.reduce((a, p) => a + p.replicates, 0);
  const n = used[0].cellCoverage68.length;
  const c68 = new Float64Array(n);
  const c95 = new Float64Array(n);
  const hist = new Float64Array(used[0].rankHistogram.length);
  let cov68 = 0;
  let cov95 = 0;
  for (const p of used) {
    const w = p.replicates / total;
    cov68 += w * p.coverage68;
    cov95 += w * p.coverage95;
    for (let i = 0; i < n; i++) {
      c68[i] += w * p.cellCoverage68[i];
      c95[i] += w * p.cellCoverage95[i];
    }
    for (let b = 0; b < hist.length; b++) hist[b] += p.rankHistogram[b];
  }
  const cat = (f: (p: CalibrationResult) => Float64Array) => {
    const out = new Float64Array(total);
    let o = 0;
    for (const p of used) {
      out.set(f(p).subarray(0, p.replicates), o);
      o += p.replicates;
    }
    return out;
  };
  return {
    coverage68: cov68,
    coverage95: cov95,
    cellCoverage68: c68,
    cellCoverage95: c95,
    replicateCoverage68: cat((p) => p.replicateCoverage68),
    replicateCoverage95: cat((p) => p.replicateCoverage95),
    rankHistogram: hist,
    replicates: total,
    draws: used[0].draws,
    cancelled: parts.some((p) => p.cancelled),
    ...(used[0].route !== undefined ? { route: used[0].route } : {}),
    ...(used.some((p) => p.approximateDraws === true) ? { approximateDraws: true } : {}),
  };
}

async function calibrationByChunks(
  problem: Problem,
  prior: PriorSpec,
  o: { replicates: number; draws: number; seed: number },
  progress: ProgressFn,
  signal: AbortFlag,
  structured: StructuredProblem,
): Promise<CalibrationResult> {
  const chunks = calibrationChunks(o.replicates, o.seed);
  const parts: CalibrationResult[] = [];
  let done = 0;
  for (const [k, c] of chunks.entries()) {
    if (k > 0) await yieldToMessages();
    if (signal.aborted) break;
    const first = done;
    parts.push(
      calibrate(problem, prior, prior, {
        replicates: c.replicates,
        draws: o.draws,
        seed: c.seed,
        streamSeed: (r) => replicateSeed(o.seed, first + r),
        structured,
      }),
    );
    done += c.replicates;
    progress(`calibration: ${done} of ${o.replicates} replicates`, done / o.replicates);
  }
  if (parts.length === 0) {
    // Cancelled before the first chunk: an empty, cancelled result of the right shape.
    const n = cellCount(problem.grid);
    return {
      coverage68: Number.NaN,
      coverage95: Number.NaN,
      cellCoverage68: new Float64Array(n).fill(Number.NaN),
      cellCoverage95: new Float64Array(n).fill(Number.NaN),
      replicateCoverage68: new Float64Array(0),
      replicateCoverage95: new Float64Array(0),
      rankHistogram: new Float64Array(o.draws + 1),
      replicates: 0,
      draws: o.draws,
      cancelled: true,
    };
  }
  const merged = mergeCalibration(parts);
  return done < o.replicates ? { ...merged, cancelled: true } : merged;
}

/** A candidate's data-fit scores: χ² and its 95% interval, each divided by the expected value M − tr R, and the tail. */
function fitScores(
  chi2: number,
  ref: DataFitReference | null | undefined,
): Pick<Extract<CandidateScores, { ok: true }>, 'chi2OverExpected' | 'chi2Interval95OverExpected' | 'chi2UpperTail'> {
  if (ref === null || ref === undefined) throw new InputError('data.values', 'at least one datum to score a candidate against', 0);
  return {
    chi2OverExpected: chi2 / ref.expected,
    chi2Interval95OverExpected: [ref.interval95[0] / ref.expected, ref.interval95[1] / ref.expected],
    chi2UpperTail: ref.upperTail,
  };
}

function checkCandidates(priors: readonly PriorSpec[]): void {
  if (priors.length < 1 || priors.length > MAX_CANDIDATES)
    throw new InputError('candidates', `between 1 and ${MAX_CANDIDATES} pinned priors`, priors.length);
}

/**
 * Scores, posterior mean/std and posterior draws of each candidate (one candidate per unit). Dense
 * route up to TUNING_DENSE_LIMIT cells (or for a non-stationary prior), FFT route above (module
 * comment, "Large grids").
 */
export async function scoreCandidates(
  problem: Problem,
  priors: readonly PriorSpec[],
  draws: number,
  seed: number,
  progress: ProgressFn,
  signal: AbortFlag,
  structured: StructuredProblem = structuredProblem(problem),
): Promise<CandidateScores[]> {
  checkCandidates(priors);
  const out: CandidateScores[] = [];
  for (const [k, prior] of priors.entries()) {
    if (k > 0) await yieldToMessages();
    if (signal.aborted) break;
    try {
      if (tuningRoute(problem, prior) === 'fft') {
        out.push(scoreStructured(structured, prior, draws, seed));
        progress(`scoring candidate ${k + 1} of ${priors.length}`, (k + 1) / priors.length);
        continue;
      }
      const state = preparePosterior(problem, prior);
      const s = posteriorSummary(state);
      const ppc = priorPredictiveCheck(problem, prior);
      out.push({
        ok: true,
        logEvidence: logEvidence(problem, prior),
        looLogScore: leaveOneOut(problem, prior).logScore,
        ...fitScores(s.chi2, s.fitReference),
        predictiveReduced: ppc.reduced,
        predictiveP: ppc.pTwoSided,
        conditionNumber: diagnosePriorAuto(problem.grid, prior).conditionNumber, // FFT estimate on large stationary grids
        mean: s.mean,
        std: s.std,
        draws: posteriorRealisations(state, draws, seed),
      });
    } catch (e) {
      out.push({ ok: false, error: e instanceof Error ? e.message : String(e) });
    }
    progress(`scoring candidate ${k + 1} of ${priors.length}`, (k + 1) / priors.length);
  }
  return out;
}

/**
 * One candidate's scores on the FFT route: one structured posterior (Bᵀ by circulant products, K
 * and its factor) gives the mean, std, χ² and log evidence (structuredPosteriorSummary), the
 * leave-one-out score from K's factor and r, the predictive check from q = rᵀK⁻¹r = rᵀα, and the
 * draws (structuredPosteriorDraws). The same formulas as the dense route's separate calls, to
 * round-off (test/worker/tuning.test.ts).
 */
export function scoreStructured(structured: StructuredProblem, prior: PriorSpec, draws: number, seed: number): CandidateScores {
  const problem = structured.problem;
  const state = prepareStructuredPosterior(structured, prior);
  const s = structuredPosteriorSummary(state);
  let q = 0;
  for (let k = 0; k < state.r.length; k++) q += state.r[k] * state.alpha[k];
  const ppc = predictiveFromStatistic(q, s.dataCount);
  return {
    ok: true,
    logEvidence: s.logEvidence,
    looLogScore: leaveOneOutFromFactor(problem, state.L, state.r).logScore,
    ...fitScores(s.chi2, s.fitReference),
    predictiveReduced: ppc.reduced,
    predictiveP: ppc.pTwoSided,
    conditionNumber: diagnosePriorAuto(problem.grid, prior).conditionNumber,
    mean: s.mean,
    std: s.std,
    draws: structuredPosteriorDraws(state, draws, seed).realisations,
  };
}

async function crossCalibration(
  problem: Problem,
  priors: readonly PriorSpec[],
  o: { replicates: number; draws: number; seed: number },
  progress: ProgressFn,
  signal: AbortFlag,
  structured: StructuredProblem,
): Promise<CrossCalibration> {
  checkCandidates(priors);
  calibrationChunks(o.replicates, o.seed); // validates the replicate count
  const K = priors.length;
  const c68 = new Float64Array(K * K).fill(Number.NaN);
  const c95 = new Float64Array(K * K).fill(Number.NaN);
  let cancelled = false;
  for (let cell = 0; cell < K * K; cell++) {
    if (cell > 0) await yieldToMessages();
    if (signal.aborted) {
      cancelled = true;
      break;
    }
    const i = Math.floor(cell / K);
    const j = cell % K;
    const res = calibrate(problem, priors[i], priors[j], {
      replicates: o.replicates,
      draws: o.draws,
      seed: o.seed,
      streamSeed: (r) => replicateSeed(o.seed, r),
      structured,
    });
    c68[cell] = res.coverage68;
    c95[cell] = res.coverage95;
    progress(`cross-calibration: pair ${cell + 1} of ${K * K}`, (cell + 1) / (K * K));
  }
  return { size: K, coverage68: c68, coverage95: c95, replicates: o.replicates, cancelled };
}
