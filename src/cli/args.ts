/**
 * Command-line options: `--name value`, `--name=value` and bare flags, checked against the options a
 * command declares (an unknown or repeated option, or a missing value, is a usage error).
 */
import { formatValue } from '../core/errors.ts';

/** Bad command-line input: printed as "priorscope <command>: <message>", exit code 2. */
export class UsageError extends Error {
  constructor(message: string) {
    super(message);
    this.name = 'UsageError';
  }
}

export interface OptionSpec {
  readonly name: string;
  /** Placeholder of the value (e.g. "FILE"); absent for a flag. */
  readonly value?: string;
  readonly help: string;
  readonly required?: boolean;
}

export interface ParsedArgs {
  readonly options: ReadonlyMap<string, string | true>;
  readonly positionals: readonly string[];
}

export function parseArgs(argv: readonly string[], specs: readonly OptionSpec[]): ParsedArgs {
  const options = new Map<string, string | true>();
  const positionals: string[] = [];
  for (let k = 0; k < argv.length; k++) {
    const a = argv[k];
    if (a === '--') {
      positionals.push(...argv.slice(k + 1));
      break;
    }
    if (!a.startsWith('--') || a === '--') {
      if (a.startsWith('-') && a.length > 1 && !/^-\d|^-\./.test(a)) {
        throw new UsageError(`unknown option ${a} (options are spelled --name)`);
      }
      positionals.push(a);
      continue;
    }
    const eq = a.indexOf('=');
    const name = eq < 0 ? a.slice(2) : a.slice(2, eq);
    const spec = specs.find((s) => s.name === name);
    if (!spec) throw new UsageError(`unknown option --${name}`);
    if (options.has(name)) throw new UsageError(`option --${name} given twice`);
    if (spec.value === undefined) {
      if (eq >= 0) throw new UsageError(`option --${name} takes no value, got ${formatValue(a.slice(eq + 1))}`);
      options.set(name, true);
      continue;
    }
    let v: string | undefined;
    if (eq >= 0) v = a.slice(eq + 1);
    else {
      v = argv[k + 1];
      if (v === undefined || (v.startsWith('--') && v.length > 2)) throw new UsageError(`option --${name} needs a value ${spec.value}`);
      k++;
    }
    options.set(name, v);
  }
  for (const s of specs) {
    if (s.required && !options.has(s.name)) throw new UsageError(`option --${s.name} ${s.value ?? ''} is required`.replace(/ +is/, ' is'));
  }
  return { options, positionals };
}

export function optionString(args: ParsedArgs, name: string): string | undefined {
  const v = args.options.get(name);
  return typeof v === 'string' ? v : undefined;
}

export function optionFlag(args: ParsedArgs, name: string): boolean {
  return args.options.get(name) === true;
}

/** A decimal number option (finite); `rule` as in the file readers. */
export function parseNumberOption(
  name: string,
  text: string,
  rule: { integer?: boolean; gt?: number; ge?: number; le?: number } = {},
): number {
  const t = text.trim();
  const v = /^[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?$/.test(t) ? Number(t) : NaN;
  const ok =
    Number.isFinite(v) &&
    (!rule.integer || Number.isInteger(v)) &&
    (rule.gt === undefined || v > rule.gt) &&
    (rule.ge === undefined || v >= rule.ge) &&
    (rule.le === undefined || v <= rule.le);
  if (!ok) {
    const parts = [rule.integer ? 'an integer' : 'a finite number'];
    if (rule.ge !== undefined && rule.le !== undefined) parts.push(`from ${rule.ge} to ${rule.le}`);
    else {
      if (rule.gt !== undefined) parts.push(`> ${rule.gt}`);
      if (rule.ge !== undefined) parts.push(`≥ ${rule.ge}`);
      if (rule.le !== undefined) parts.push(`≤ ${rule.le}`);
    }
    throw new UsageError(`--${name} must be ${parts.join(' ')}, got ${formatValue(text)}`);
  }
  return v;
}

/** A comma-separated list of numbers, e.g. "0,0.5,1". */
export function parseNumberListOption(name: string, text: string, rule: { ge?: number } = {}): number[] {
  const items = text.split(',');
  if (text.trim() === '') throw new UsageError(`--${name} must be a comma-separated list of numbers, got ""`);
  return items.map((item, k) => {
    try {
      return parseNumberOption(name, item, rule);
    } catch (e) {
      throw new UsageError(`--${name} item ${k + 1} ${(e as Error).message.replace(`--${name} `, '')}`);
    }
  });
}
