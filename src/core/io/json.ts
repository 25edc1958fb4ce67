/**
 * Shared pieces of the JSON file formats: parsing with a located syntax error, and a reader that
 * checks typed fields, names each failure by its dotted path, and collects warnings for fields it
 * does not know.
 */
import { matrix, type Matrix } from '../linalg/matrix.ts';
import { checkFileSize, fieldError, FileFormatError, type FileWarning } from './errors.ts';

/** Bytes → text (UTF-8, a leading byte-order mark dropped), size-checked. */
export function decodeText(file: string, input: string | Uint8Array): string {
  if (typeof input === 'string') {
    checkFileSize(file, input.length);
    return input.charCodeAt(0) === 0xfeff ? input.slice(1) : input;
  }
  checkFileSize(file, input.byteLength);
  let text: string;
  try {
    text = new TextDecoder('utf-8', { fatal: true, ignoreBOM: false }).decode(input);
  } catch {
    throw new FileFormatError(file, 'is not UTF-8 text (is it a binary file?)');
  }
  return text;
}

/** 1-based line and column of character `pos` in `text`. */
export function lineColumn(text: string, pos: number): { line: number; column: number } {
  let line = 1;
  let start = 0;
  for (let k = 0; k < pos && k < text.length; k++) {
    if (text.charCodeAt(k) === 10) {
      line++;
      start = k + 1;
    }
  }
  return { line, column: pos - start + 1 };
}

/**
 * JSON.parse, with a failure reported as a FileFormatError naming the line, column and the reason.
 * A field name that appears twice in one object is refused, naming the field and its line: JSON
 * parsers silently keep the last one (RFC 8259 §4 leaves it open), so a file could say two things.
 */
export function parseJsonText(file: string, input: string | Uint8Array): unknown {
  const text = decodeText(file, input);
  let value: unknown;
  try {
    value = JSON.parse(text) as unknown;
  } catch (e) {
    const found = locateJsonError(text);
    if (found) {
      const { line, column } = lineColumn(text, found.pos);
      throw new FileFormatError(file, `is not valid JSON: line ${line}, column ${column}: ${found.reason}`, { line, column });
    }
    throw new FileFormatError(file, `is not valid JSON: ${(e as Error).message}`);
  }
  const dup = findDuplicateKey(text);
  if (dup) {
    const { line } = lineColumn(text, dup.pos);
    throw new FileFormatError(
      file,
      `field ${dup.field} appears twice (line ${line}); each field may appear once in an object, remove one of them`,
      { field: dup.field, line },
    );
  }
  return value;
}

/**
 * The first field name repeated within one object of valid JSON `text`, with its dotted path and
 * the position of the repeat, or null. One pass over the characters, no parse tree.
 */
export function findDuplicateKey(text: string): { field: string; pos: number } | null {
  interface Frame {
    readonly keys: Set<string> | null; // null: an array
    readonly path: string;
    index: number;
    key: string;
  }
  const stack: Frame[] = [];
  const n = text.length;
  let expectKey = false;
  const here = (f: Frame | undefined): string => (f === undefined ? '' : f.keys ? joinField(f.path, f.key) : `${f.path}[${f.index}]`);
  for (let p = 0; p < n; p++) {
    const c = text.charCodeAt(p);
    if (c === 34) {
      const start = p;
      let escaped = false;
      p++;
      while (p < n) {
        const d = text.charCodeAt(p);
        if (d === 92) {
          escaped = true;
          p += 2;
          continue;
        }
        if (d === 34) break;
        p++;
      }
      if (expectKey) {
        const top = stack[stack.length - 1];
        const raw = text.slice(start + 1, p);
        const key = escaped ? (JSON.parse(text.slice(start, p + 1)) as string) : raw;
        if (top.keys!.has(key)) return { field: joinField(top.path, key), pos: start };
        top.keys!.add(key);
        top.key = key;
        expectKey = false;
      }
    } else if (c === 123) {
      stack.push({ keys: new Set(), path: here(stack[stack.length - 1]), index: 0, key: '' });
      expectKey = true;
    } else if (c === 91) {
      stack.push({ keys: null, path: here(stack[stack.length - 1]), index: 0, key: '' });
      expectKey = false;
    } else if (c === 125 || c === 93) {
      stack.pop();
      expectKey = false;
    } else if (c === 44) {
      const top = stack[stack.length - 1];
      if (top?.keys) expectKey = true;
      else if (top) top.index++;
    }
  }
  return null;
}

/**
 * First syntax error of `text` as JSON (RFC 8259), or null when it is valid. Only runs after
 * JSON.parse has failed, to turn the engine's message (which differs between engines) into a
 * position and a plain reason.
 */
export function locateJsonError(text: string): { pos: number; reason: string } | null {
  let p = 0;
  const n = text.length;
  const ws = () => {
    while (p < n) {
      const c = text.charCodeAt(p);
      if (c === 32 || c === 9 || c === 10 || c === 13) p++;
      else break;
    }
  };
  class Stop {
    constructor(
      readonly pos: number,
      readonly reason: string,
    ) {}
  }
  const fail = (reason: string, at = p): never => {
    throw new Stop(at, reason);
  };
  const describe = (at: number) => (at >= n ? 'the end of the file' : JSON.stringify(text.slice(at, at + 12)));
  const value = (depth: number): void => {
    if (depth > 1000) fail('nesting deeper than 1000 levels');
    ws();
    if (p >= n) fail('expected a value, got the end of the file');
    const c = text[p];
    if (c === '{') {
      p++;
      ws();
      if (text[p] === '}') {
        p++;
        return;
      }
      for (;;) {
        ws();
        if (text[p] !== '"') fail(`expected a double-quoted field name, got ${describe(p)}`);
        string();
        ws();
        if (text[p] !== ':') fail(`expected ':' after a field name, got ${describe(p)}`);
        p++;
        value(depth + 1);
        ws();
        if (text[p] === ',') {
          p++;
          ws();
          if (text[p] === '}') fail('trailing comma before }');
          continue;
        }
        if (text[p] === '}') {
          p++;
          return;
        }
        fail(`expected ',' or '}' after a field value, got ${describe(p)}`);
      }
    }
    if (c === '[') {
      p++;
      ws();
      if (text[p] === ']') {
        p++;
        return;
      }
      for (;;) {
        value(depth + 1);
        ws();
        if (text[p] === ',') {
          p++;
          ws();
          if (text[p] === ']') fail('trailing comma before ]');
          continue;
        }
        if (text[p] === ']') {
          p++;
          return;
        }
        fail(`expected ',' or ']' after an array element, got ${describe(p)}`);
      }
    }
    if (c === '"') return string();
    if (c === '-' || (c >= '0' && c <= '9')) return number();
    for (const word of ['true', 'false', 'null']) {
      if (text.startsWith(word, p)) {
        p += word.length;
        return;
      }
    }
    if (/^-?(NaN|Infinity)/.test(text.slice(p, p + 10))) {
      fail('NaN and Infinity are not JSON numbers; every number must be finite');
    }
    fail(`expected a value (number, string, array, object, true, false or null), got ${describe(p)}`);
  };
  const string = (): void => {
    const start = p;
    p++;
    while (p < n) {
      const c = text.charCodeAt(p);
      if (c === 34) {
        p++;
        return;
      }
      if (c < 32) fail('control character (such as a line break) inside a string');
      if (c === 92) {
        const e = text[p + 1];
        if (e === 'u') {
          if (!/^[0-9a-fA-F]{4}$/.test(text.slice(p + 2, p + 6))) fail('bad \\u escape in a string');
          p += 6;
          continue;
        }
        if (e === undefined || !'"\\/bfnrt'.includes(e)) fail('bad escape in a string');
        p += 2;
        continue;
      }
      p++;
    }
    fail('unterminated string', start);
  };
  const number = (): void => {
    const m = /^-?(0|[1-9][0-9]*)(\.[0-9]+)?([eE][+-]?[0-9]+)?/.exec(text.slice(p, p + 400));
    if (!m || m[0] === '-') {
      if (/^-?(NaN|Infinity)/.test(text.slice(p, p + 10))) fail('NaN and Infinity are not JSON numbers; every number must be finite');
      return fail(`malformed number ${describe(p)}`);
    }
    const start = p;
    p += m[0].length;
    const next = text[p];
    if (next !== undefined && /[0-9.eE+\-a-zA-Z]/.test(next)) fail(`malformed number ${describe(start)}`, start);
  };
  try {
    value(0);
    ws();
    if (p < n) fail(`unexpected text after the end of the JSON value: ${describe(p)}`);
    return null;
  } catch (e) {
    if (e instanceof Stop) return { pos: e.pos, reason: e.reason };
    throw e;
  }
}

/** Path of a child field: `join('data', 'sigma')` = "data.sigma", `join('', 'grid')` = "grid". */
export function joinField(parent: string, child: string | number): string {
  if (typeof child === 'number') return `${parent}[${child}]`;
  return parent ? `${parent}.${child}` : child;
}

export interface NumberRule {
  /** Require an integer. */
  readonly integer?: boolean;
  /** Require value > gt. */
  readonly gt?: number;
  /** Require value ≥ ge. */
  readonly ge?: number;
}

function ruleText(rule: NumberRule, value: unknown): string {
  const isNumber = typeof value === 'number' && Number.isFinite(value);
  const kind = rule.integer ? 'an integer' : 'a finite number';
  const bound = rule.gt !== undefined ? `> ${rule.gt}` : rule.ge !== undefined ? `≥ ${rule.ge}` : '';
  if (!bound) return kind;
  // "data.sigma[3] must be > 0, got -1" for a number out of range; the full expectation otherwise.
  return isNumber && (!rule.integer || Number.isInteger(value)) ? bound : `${kind} ${bound}`;
}

/** Words of the trade users write for our field names (common practice, no source). */
const FIELD_SYNONYMS: Readonly<Record<string, string>> = {
  range: 'length',
  ranges: 'lengths',
  scale: 'length',
  sill: 'variance',
  std: 'sigma',
  sd: 'sigma',
  stdev: 'sigma',
  error: 'sigma',
  errors: 'sigma',
  data: 'values',
  model: 'kernel',
  type: 'kernel',
  rotation: 'angle',
  smoothness: 'nu',
};

/** Levenshtein distance (common practice, no source). */
function editDistance(a: string, b: string): number {
  const row = Array.from({ length: b.length + 1 }, (_, j) => j);
  for (let i = 1; i <= a.length; i++) {
    let diag = row[0];
    row[0] = i;
    for (let j = 1; j <= b.length; j++) {
      const up = row[j];
      row[j] = Math.min(up + 1, row[j - 1] + 1, diag + (a[i - 1] === b[j - 1] ? 0 : 1));
      diag = up;
    }
  }
  return row[b.length];
}

/** The known field a mistyped or synonymous `key` most likely means, or null. */
export function suggestField(key: string, known: readonly string[]): string | null {
  const lower = key.toLowerCase();
  const synonym = FIELD_SYNONYMS[lower];
  if (synonym !== undefined && known.includes(synonym)) return synonym;
  let best: string | null = null;
  let bestD = Infinity;
  for (const k of known) {
    const d = editDistance(lower, k.toLowerCase());
    if (d < bestD) {
      bestD = d;
      best = k;
    }
  }
  return best !== null && bestD <= Math.min(2, Math.ceil(best.length / 3)) ? best : null;
}

/**
 * Typed access to a parsed JSON document of one file. Every check throws a FileFormatError naming
 * the file and the dotted field; unknown fields are collected in `warnings`.
 */
export class JsonReader {
  readonly file: string;
  readonly warnings: FileWarning[] = [];
  constructor(file: string) {
    this.file = file;
  }

  /** Unknown keys seen in each object, by the object's dotted path (for "did you mean" on a missing field). */
  private readonly unknownKeys = new Map<string, string[]>();

  fail(field: string, expected: string, value: unknown): never {
    const e = fieldError(this.file, field || '(top level)', expected, value);
    if (value === undefined && field) {
      const dot = field.lastIndexOf('.');
      const parent = dot < 0 ? '' : field.slice(0, dot);
      const key = field.slice(dot + 1);
      const unknown = this.unknownKeys.get(parent) ?? [];
      if (unknown.length > 0) {
        const hit = unknown.find((u) => suggestField(u, [key]) === key);
        const names = (hit ? [hit] : unknown).map((u) => joinField(parent, u)).join(', ');
        throw new FileFormatError(
          this.file,
          `${e.detail}; unknown field${hit || unknown.length === 1 ? '' : 's'} ${names} given${hit ? ` (did you mean ${key}?)` : ''}`,
          { field },
        );
      }
    }
    throw e;
  }

  warn(field: string, message: string): void {
    this.warnings.push({ file: this.file, field, message: `${this.file}: ${message}` });
  }

  /** `value` as a plain object; warns about keys outside `known`. */
  object(value: unknown, field: string, known: readonly string[]): Record<string, unknown> {
    if (typeof value !== 'object' || value === null || Array.isArray(value)) this.fail(field, 'an object', value);
    const obj = value as Record<string, unknown>;
    const unknown: string[] = [];
    for (const key of Object.keys(obj)) {
      if (!known.includes(key)) {
        unknown.push(key);
        const guess = suggestField(
          key,
          known.filter((k) => obj[k] === undefined),
        );
        this.warn(
          joinField(field, key),
          `unknown field ${joinField(field, key)} ignored (${guess ? `did you mean ${guess}? ` : ''}known here: ${known.join(', ')})`,
        );
      }
    }
    this.unknownKeys.set(field, unknown);
    return obj;
  }

  required(obj: Record<string, unknown>, parent: string, key: string, expected: string): unknown {
    const v = obj[key];
    if (v === undefined) this.fail(joinField(parent, key), expected, undefined);
    return v;
  }

  number(value: unknown, field: string, rule: NumberRule = {}): number {
    const ok =
      typeof value === 'number' &&
      Number.isFinite(value) &&
      (!rule.integer || Number.isInteger(value)) &&
      (rule.gt === undefined || value > rule.gt) &&
      (rule.ge === undefined || value >= rule.ge);
    if (!ok) {
      this.fail(field, ruleText(rule, value), value);
    }
    return value as number;
  }

  string(value: unknown, field: string): string {
    if (typeof value !== 'string') this.fail(field, 'a string', value);
    return value as string;
  }

  array(value: unknown, field: string, length?: number, what = 'numbers'): unknown[] {
    if (!Array.isArray(value)) this.fail(field, length === undefined ? `an array of ${what}` : `an array of ${length} ${what}`, value);
    const arr = value as unknown[];
    if (length !== undefined && arr.length !== length) this.fail(field, `an array of ${length} ${what}`, arr);
    return arr;
  }

  /** An array of finite numbers (each checked against `rule`), optionally of a given length. */
  numbers(value: unknown, field: string, length?: number, rule: NumberRule = {}): number[] {
    const arr = this.array(value, field, length);
    const out = new Array<number>(arr.length);
    const plain = !rule.integer && rule.gt === undefined && rule.ge === undefined;
    for (let k = 0; k < arr.length; k++) {
      const v = arr[k];
      // The field name is built only for a failure (10⁶ entries: 5.6 s → see the commit).
      if (plain && typeof v === 'number' && Number.isFinite(v)) out[k] = v;
      else out[k] = this.number(v, joinField(field, k), rule);
    }
    return out;
  }

  /** `numbers` into a Float64Array. */
  vector(value: unknown, field: string, length?: number, rule: NumberRule = {}): Float64Array {
    return Float64Array.from(this.numbers(value, field, length, rule));
  }

  /** Rows of numbers (an array of `rows` arrays of `cols` numbers) into a Matrix. */
  matrixRows(value: unknown, field: string, rows?: number, cols?: number): Matrix {
    const arr = this.array(value, field, rows, 'rows');
    if (arr.length === 0) this.fail(field, 'a non-empty array of rows', arr);
    const first = arr[0];
    const c = cols ?? (Array.isArray(first) ? first.length : this.fail(joinField(field, 0), 'an array of numbers', first));
    const out = matrix(arr.length, c);
    for (let i = 0; i < arr.length; i++) {
      const row = this.numbers(arr[i], joinField(field, i), c);
      for (let j = 0; j < c; j++) out.data[i * c + j] = row[j];
    }
    return out;
  }
}

/**
 * JSON text of a result: objects one field per line, arrays of numbers on one line (a matrix one
 * row per line), typed arrays as arrays; NaN and ±Infinity become null (JSON has neither). Numbers
 * are in JavaScript's shortest round-trip form, so the text is the same on every platform.
 */
export function formatJson(value: unknown): string {
  return format(value, '') + '\n';
}

function isPrimitive(v: unknown): boolean {
  return v === null || typeof v !== 'object';
}

function format(value: unknown, indent: string): string {
  const v = ArrayBuffer.isView(value) && !(value instanceof DataView) ? Array.from(value as unknown as ArrayLike<number>) : value;
  if (isPrimitive(v)) return v === undefined ? 'null' : JSON.stringify(v);
  const inner = indent + '  ';
  if (Array.isArray(v)) {
    if (v.length === 0) return '[]';
    if (v.every(isPrimitive)) return JSON.stringify(v);
    return `[\n${v.map((x) => inner + format(x, inner)).join(',\n')}\n${indent}]`;
  }
  const entries = Object.entries(v as Record<string, unknown>).filter(([, x]) => x !== undefined);
  if (entries.length === 0) return '{}';
  return `{\n${entries.map(([k, x]) => `${inner}${JSON.stringify(k)}: ${format(x, inner)}`).join(',\n')}\n${indent}}`;
}
