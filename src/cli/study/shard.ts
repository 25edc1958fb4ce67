/**
 * Batch work on existing schedulers: `--shard K/N` makes a heavy command compute only its K-th
 * part (K from 1 to N) and write a partial result; `priorscope merge` combines the N partial files
 * into exactly the output of the unsharded run.
 *
 * Exactness: a command's work is a list of independent items (calibration replicates, prior files,
 * profile values); shard K takes items ⌊(K−1)T/N⌋ … ⌊KT/N⌋ − 1, and each item is computed the same
 * way whichever shard holds it (calibration replicates draw from their own seeded streams,
 * src/core/tuning/calibration.ts replicateSeed). The unsharded run goes through the same path: its
 * one partial is written to JSON text and read back before the same `combine` makes the output, so
 * the merged output is byte-identical to it (JSON numbers round-trip exactly).
 *
 * Partial file: {"kind": "priorscope.partial", "version": 1, "command", "shard": {"index": K,
 * "count": N}, "items": [first, end), "key": {…what must agree between parts: the problem's
 * fingerprint, the priors, the options…}, "data": {…}}.
 */
import { problemFingerprint } from '../../core/io/fingerprint.ts';
import { formatJson, parseJsonText } from '../../core/io/json.ts';
import { FileFormatError } from '../../core/io/errors.ts';
import type { Problem } from '../../core/problems/spec.ts';
import { optionString, UsageError, type OptionSpec, type ParsedArgs } from '../args.ts';
import { readInputFile } from '../files.ts';

export const PARTIAL_KIND = 'priorscope.partial';
export const PARTIAL_VERSION = 1;
/** Largest N of --shard K/N. */
export const MAX_SHARDS = 100_000;

export const SHARD: OptionSpec = {
  name: 'shard',
  value: 'K/N',
  help: 'compute only part K of N (K from 1) and write a partial result for `priorscope merge`',
};

export interface Shard {
  readonly index: number;
  readonly count: number;
}

/** --shard K/N, or null without it. */
export function shardOption(args: ParsedArgs): Shard | null {
  const text = optionString(args, 'shard');
  if (text === undefined) return null;
  const m = /^(\d+)\/(\d+)$/.exec(text.trim());
  const index = m ? Number(m[1]) : Number.NaN;
  const count = m ? Number(m[2]) : Number.NaN;
  if (!(count >= 1 && count <= MAX_SHARDS && index >= 1 && index <= count)) {
    throw new UsageError(`--shard must be K/N with N an integer from 1 to ${MAX_SHARDS} and K from 1 to N, got ${JSON.stringify(text)}`);
  }
  return { index, count };
}

/** Items [first, end) of shard K of N over `total` items. */
export function shardRange(total: number, shard: Shard | null): [number, number] {
  if (shard === null) return [0, total];
  return [Math.floor(((shard.index - 1) * total) / shard.count), Math.floor((shard.index * total) / shard.count)];
}

/** The problem's identity in a partial's key (a partial of another problem cannot be merged). */
export function problemKey(problem: Problem): string {
  return problemFingerprint(problem);
}

export interface PartialFile {
  readonly kind: typeof PARTIAL_KIND;
  readonly version: number;
  readonly command: string;
  readonly shard: Shard;
  readonly items: readonly [number, number];
  readonly key: unknown;
  readonly data: unknown;
}

/** JSON text and back: what a partial file holds. */
function roundTrip<T>(value: T): T {
  return JSON.parse(formatJson(value)) as T;
}

/**
 * Runs a shardable command: with --shard, computes its items and writes (`write`: the command's
 * stdout or --out) the partial; without, computes every item and writes `combine(key, [data])` (the data read back from JSON text, as
 * merge would read it). Returns what `combine` returned (null for a partial).
 */
export function runShardable<D>(
  write: (text: string) => void,
  args: ParsedArgs,
  spec: {
    command: string;
    total: number;
    key: unknown;
    compute: (first: number, end: number) => D;
    combine: (key: unknown, parts: readonly D[]) => unknown;
  },
): unknown {
  const shard = shardOption(args);
  const [first, end] = shardRange(spec.total, shard);
  const data = spec.compute(first, end);
  if (shard !== null) {
    const partial: PartialFile = {
      kind: PARTIAL_KIND,
      version: PARTIAL_VERSION,
      command: spec.command,
      shard,
      items: [first, end],
      key: spec.key,
      data,
    };
    write(formatJson(partial));
    return null;
  }
  const out = spec.combine(roundTrip(spec.key), [roundTrip(data)]);
  write(formatJson(out));
  return out;
}

/** Reads and checks partial files: one command, one key, shards 1 … N each exactly once; sorted by shard. */
export function readPartials(paths: readonly string[]): PartialFile[] {
  if (paths.length === 0) throw new UsageError('give the partial files to merge (written by a command run with --shard K/N)');
  const parts = paths.map((path) => {
    const v = parseJsonText(path, readInputFile(path)) as Partial<PartialFile> | null;
    if (v === null || typeof v !== 'object' || v.kind !== PARTIAL_KIND) {
      throw new FileFormatError(path, `must be a partial result (kind "${PARTIAL_KIND}", written by a command run with --shard K/N)`, {
        field: 'kind',
      });
    }
    if (v.version !== PARTIAL_VERSION)
      throw new FileFormatError(path, `must be partial-file version ${PARTIAL_VERSION}, got ${JSON.stringify(v.version)}`, {
        field: 'version',
      });
    const s = v.shard;
    if (!s || !Number.isInteger(s.index) || !Number.isInteger(s.count) || s.index < 1 || s.index > s.count) {
      throw new FileFormatError(path, 'must have "shard": {"index": K, "count": N} with 1 ≤ K ≤ N', { field: 'shard' });
    }
    return { path, part: v as PartialFile };
  });
  const first = parts[0];
  const keyText = formatJson(first.part.key);
  for (const { path, part } of parts.slice(1)) {
    if (part.command !== first.part.command)
      throw new FileFormatError(path, `is a partial of \`${part.command}\`, but ${first.path} is one of \`${first.part.command}\``, {
        field: 'command',
      });
    if (part.shard.count !== first.part.shard.count) {
      throw new FileFormatError(
        path,
        `is shard ${part.shard.index} of ${part.shard.count}, but ${first.path} is one of ${first.part.shard.count} shards`,
        { field: 'shard.count' },
      );
    }
    if (formatJson(part.key) !== keyText) {
      throw new FileFormatError(
        path,
        `comes from another run than ${first.path} (problem, priors or options differ: "key" is not the same)`,
        { field: 'key' },
      );
    }
  }
  const n = first.part.shard.count;
  const byIndex = new Map<number, { path: string; part: PartialFile }>();
  for (const p of parts) {
    const other = byIndex.get(p.part.shard.index);
    if (other)
      throw new FileFormatError(p.path, `is shard ${p.part.shard.index} of ${n} again (also ${other.path})`, { field: 'shard.index' });
    byIndex.set(p.part.shard.index, p);
  }
  const missing = Array.from({ length: n }, (_, k) => k + 1).filter((k) => !byIndex.has(k));
  if (missing.length > 0) {
    throw new UsageError(
      `shard${missing.length === 1 ? '' : 's'} ${missing.slice(0, 10).join(', ')}${missing.length > 10 ? ', …' : ''} of ${n} missing: merge needs every part`,
    );
  }
  return Array.from({ length: n }, (_, k) => byIndex.get(k + 1)!.part);
}
