/**
 * One benchmark case. Files test/bench/cases/*.ts export `cases: BenchCase[]`; test/bench/run.ts
 * picks them all up. The scipy/numpy counterpart is named by `scipyOp`: an entry of OPS in
 * test/bench/scipy_dense.py, or of OPS in any test/bench/cases/*.py plugin next to the case file.
 */
export interface BenchCase {
  /** Unique, stable id (shows in the table and in bench-results/bench.json). */
  readonly name: string;
  /** Sizes and other numbers of the case; sent unchanged to the Python side. */
  readonly params?: Readonly<Record<string, number>>;
  /** Floating-point operations of one run, for the GFLOP/s columns (omit when not meaningful). */
  readonly flops?: number;
  /** Builds the inputs (not timed) and returns the operation to time. Give this or `run`. */
  readonly setup?: () => () => unknown;
  /** The operation to time, inputs already built (the simpler form; used when `setup` is absent). */
  readonly run?: () => unknown;
  /** The same operation on the same sizes in scipy/numpy; omit to time ours only. */
  readonly scipyOp?: string;
  /** Timed runs after warm-up (median reported); default 5, never fewer. */
  readonly runs?: number;
  /** Untimed warm-up runs; default 1. */
  readonly warmup?: number;
  /** Other figures of the case, read after its timed runs (for example a child process's peak RSS); printed and kept in the JSON. */
  readonly report?: () => Readonly<Record<string, number>>;
}
