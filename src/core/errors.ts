/**
 * Typed errors of the numerical core.
 *
 * The core validates at its edges (specs coming from files, the UI or the command line) and throws
 * {@link InputError} naming the offending field and value; inside, it trusts typed data.
 */

/** Invalid input: names the field (a dotted path such as `terms[0].length`) and the value received. */
export class InputError extends Error {
  readonly field: string;
  readonly value: unknown;
  readonly expected: string;
  constructor(field: string, expected: string, value: unknown) {
    super(`${field} must be ${expected}, got ${formatValue(value)}`);
    this.name = 'InputError';
    this.field = field;
    this.expected = expected;
    this.value = value;
  }
}

/** A matrix that had to be positive definite was not; `pivot` is the zero-based failing row. */
export class NotPositiveDefiniteError extends Error {
  readonly pivot: number;
  readonly what: string;
  constructor(what: string, pivot: number, hint = '') {
    super(`${what} is not positive definite (Cholesky failed at row ${pivot})${hint ? `: ${hint}` : ''}`);
    this.name = 'NotPositiveDefiniteError';
    this.pivot = pivot;
    this.what = what;
  }
}

/** Short, printable rendering of a received value for error messages. */
export function formatValue(value: unknown): string {
  if (typeof value === 'number') return Number.isNaN(value) ? 'NaN' : String(value);
  if (typeof value === 'string') return JSON.stringify(value.length > 40 ? value.slice(0, 40) + '…' : value);
  if (value === undefined) return 'nothing';
  if (value === null) return 'null';
  if (Array.isArray(value)) return `an array of length ${value.length}`;
  if (ArrayBuffer.isView(value)) return `an array of length ${(value as unknown as ArrayLike<number>).length}`;
  return typeof value;
}

/**
 * The `default` of an exhaustive `switch` over a union: the type checker proves it unreachable
 * (`x` is `never`), and if a value from outside the types gets there anyway it throws, naming `what`.
 */
export function assertNever(x: never, what = 'variant'): never {
  throw new Error(`unexpected ${what}: ${JSON.stringify(x)}`);
}
