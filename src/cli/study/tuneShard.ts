/**
 * `tune --shard K/N`: the evidence map split over its lengths (rows). A row is one core call with
 * the one-point length axis {min: ℓ_i, max: ℓ_i, count: 1} (logSpaced gives ℓ_i itself) and the
 * whole variance axis, so its numbers are those of the whole-map call (the method choice depends on
 * the variance count only; the worker's map-by-rows relies on the same fact). The unsharded run makes
 * one whole-map call; both end in {@link combineTune}. Imports nothing from ../commands.ts, which
 * imports it.
 */
import type { Problem } from '../../core/problems/spec.ts';
import type { PriorSpec } from '../../core/prior/spec.ts';
import {
  bestCell,
  type EvidenceMethod,
  evidenceMap,
  logSpaced,
  mapMethod,
  setTermLength,
  type LengthAxis,
  type LogAxis,
} from '../../core/tuning/evidenceMap.ts';
import { UsageError } from '../args.ts';

export interface TuneKey {
  readonly problem: string;
  readonly prior: unknown;
  readonly term: number;
  readonly axis: LengthAxis;
  readonly lengths: LogAxis;
  readonly variances: LogAxis;
  /** The tuned term as the prior file has it (for "best.lengths" of an anisotropic term). */
  readonly tuned: { readonly lengths?: readonly [number, number] } & Record<string, unknown>;
}

export interface TunePartial {
  /** One row per length of the range, one value per variance; null where K did not factor. */
  readonly rows: (number | null)[][];
  readonly methods: EvidenceMethod[];
}

/** Rows [first, end) of the evidence map of `key`'s term. */
export function tuneRows(problem: Problem, prior: PriorSpec, key: TuneKey, first: number, end: number): TunePartial {
  const { term, axis, lengths, variances } = key;
  const toRows = (map: ReturnType<typeof evidenceMap>) => {
    const nv = map.variances.length;
    return Array.from({ length: map.lengths.length }, (_, i) =>
      Array.from(map.logEvidence.subarray(i * nv, (i + 1) * nv), (v) => (Number.isFinite(v) ? v : null)),
    );
  };
  if (first === 0 && end === lengths.count) {
    const map = evidenceMap(problem, prior, { term, lengths, variances, axis });
    return { rows: toRows(map), methods: [...map.methodByLength] };
  }
  const all = logSpaced(lengths, 'lengths');
  const rows: (number | null)[][] = [];
  const methods: EvidenceMethod[] = [];
  for (let i = first; i < end; i++) {
    const L = all[i];
    const map = evidenceMap(problem, prior, { term, lengths: { min: L, max: L, count: 1 }, variances, axis });
    rows.push(...toRows(map));
    methods.push(map.methodByLength[0]);
  }
  return { rows, methods };
}

function edgeOf(axis: ArrayLike<number>, value: number): 'low' | 'high' | null {
  if (axis.length < 2) return null;
  if (value === axis[0]) return 'low';
  if (value === axis[axis.length - 1]) return 'high';
  return null;
}

/** The tune output (and its warnings) from the parts' rows, in order. */
export function combineTune(keyValue: unknown, parts: readonly TunePartial[]): { output: Record<string, unknown>; warnings: string[] } {
  const key = keyValue as TuneKey;
  const lengths = logSpaced(key.lengths, 'lengths');
  const variances = logSpaced(key.variances, 'variances');
  const rows = parts.flatMap((p) => p.rows);
  const methods = parts.flatMap((p) => p.methods);
  if (rows.length !== lengths.length) throw new UsageError(`the parts hold ${rows.length} lengths, expected ${lengths.length}`);
  const b = bestCell(
    lengths,
    variances,
    Float64Array.from(rows.flat(), (v) => v ?? Number.NaN),
  );
  const bestOnEdge = b ? { length: edgeOf(lengths, b.length), variance: edgeOf(variances, b.variance) } : { length: null, variance: null };
  const warnings: string[] = [];
  const lengthName = key.axis === 'both' ? 'length' : key.axis;
  for (const which of ['length', 'variance'] as const) {
    const e = bestOnEdge[which];
    if (e)
      warnings.push(
        `the maximum lies at the ${e === 'low' ? 'lower' : 'upper'} end of the ${which === 'length' ? lengthName : which} axis: the true maximum may lie beyond it; widen --${which === 'length' ? 'lengths' : 'variances'}`,
      );
  }
  const tuned = key.tuned;
  return {
    output: {
      term: key.term,
      axis: key.axis,
      lengths,
      variances,
      logEvidence: rows,
      best: b
        ? {
            length: b.length,
            variance: b.variance,
            logEvidence: b.logEvidence,
            ...(tuned.lengths === undefined ? {} : { lengths: setTermLength(tuned as never, b.length, key.axis).lengths }),
          }
        : null,
      bestOnEdge,
      warnings,
      method: mapMethod(methods),
    },
    warnings,
  };
}
