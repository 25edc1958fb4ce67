/**
 * `priorscope <command> [options]`: the headless command line over the same core as the browser.
 *
 * Exit codes: 0 ok; 1 internal error (a bug: please report it); 2 bad input (one line on stderr
 * naming the file, the field and what was expected); 3 a negative verdict: `check` found the prior
 * not positive definite (also when a posterior or sample fails because a covariance does not
 * factor), `fit` did not converge to a usable optimum, `score` found no plausible prior, `profile`
 * no value that factors; 4 `check`
 * could not decide positive definiteness (neither sign proven at this size; "nextStep" says what to do).
 * JSON goes to stdout unless --out FILE; warnings and progress (on a terminal) go to stderr.
 * Set PRIORSCOPE_DEBUG=1 to see stack traces of internal errors.
 */
import { InputError, NotPositiveDefiniteError } from '../core/errors.ts';
import { FileFormatError } from '../core/io/errors.ts';
import { parseArgs, UsageError } from './args.ts';
import { COMMANDS as CORE_COMMANDS, type Command, type Io } from './commands.ts';
import { STUDY_COMMANDS } from './study/index.ts';
import { report } from './report.ts';

/** Every command, in the order of the help. */
/** Every command, in the order of the main help. */
export const COMMANDS: readonly Command[] = [...CORE_COMMANDS, ...STUDY_COMMANDS, report];
import { FORMATS_HELP } from './formats.ts';

function pad(s: string, n: number): string {
  return s.length >= n ? s + '  ' : s.padEnd(n);
}

export function mainHelp(): string {
  const lines = [
    'priorscope: design and check the Gaussian prior of a linear inverse problem, headless.',
    '',
    'Usage: priorscope <command> [options]      priorscope <command> --help',
    '',
    'Commands:',
    ...COMMANDS.map((c) => `  ${pad(c.name, 13)}${c.summary}`),
    '',
    'Files (all fields, cell order, origin, units, geometry: priorscope --help formats):',
    'problem files are JSON {"kind": "priorscope.problem", "version": 1, "grid", "operator", "data", …};',
    'prior files are JSON {"kind": "priorscope.prior", "version": 1, "mean", "terms", "nugget"?, "stdProfile"?}.',
    'An operator may live in a sibling .csv, .mtx (Matrix Market) or .npy file, read only from the problem',
    "file's folder (symbolic links resolved) unless --read-from FOLDERS allows others; regular files only, up to 512 MiB.",
    '',
    'Output: JSON on stdout unless --out FILE. Exit codes: 0 ok, 2 bad input (one line on stderr naming the',
    'file, the field and what was expected), 3 a negative verdict (check: prior proven not positive definite;',
    'fit: not converged or optimum not usable; score: no prior plausible; profile: no value factors), 4 positive',
    'definiteness not decided (check only), 1 internal error. Heavy studies: --shard K/N, then merge.',
    '',
  ];
  return lines.join('\n');
}

/** The exit codes every command shares (`priorscope COMMAND --help` prints them, with the command's own after them). */
const EXIT_CODES =
  'Exit codes: 0 ok, 1 internal error (a bug: please report it), 2 bad input (one line on stderr naming the file,\n' +
  "the field and what was expected), 3 a negative verdict (a covariance proven not positive definite, or this command's own\n" +
  'negative result described above)';

export function commandHelp(c: Command): string {
  const lines = [`priorscope ${c.name}: ${c.summary}`, '', `Usage: ${c.usage}`, '', c.details, '', 'Options:'];
  for (const o of c.options) {
    const left = `--${o.name}${o.value ? ' ' + o.value : ''}`;
    lines.push(`  ${pad(left, 24)}${o.help}${o.required ? ' (required)' : ''}`);
  }
  lines.push(`  ${pad('--help', 24)}this help`, '', `${EXIT_CODES}${c.exitCodes ? `, ${c.exitCodes}` : ''}.`, '');
  return lines.join('\n');
}

/** The process's stdout/stderr as an Io. */
export function processIo(): Io {
  return {
    stdout: (content) => {
      process.stdout.write(content);
    },
    stderr: (line) => {
      process.stderr.write(line.endsWith('\n') ? line : line + '\n');
    },
    stdoutIsTTY: Boolean(process.stdout.isTTY),
    stderrIsTTY: Boolean(process.stderr.isTTY),
  };
}

/** Run the command line; returns the exit code (never throws). */
export async function main(argv: readonly string[], io: Io = processIo()): Promise<number> {
  const [first, ...rest] = argv;
  if (first === undefined || first === '--help' || first === '-h' || first === 'help') {
    if (rest[0] === 'formats') {
      io.stdout(FORMATS_HELP);
      return 0;
    }
    const topic = first === 'help' ? rest[0] : undefined;
    const c = topic ? COMMANDS.find((x) => x.name === topic) : undefined;
    if (topic && !c) {
      io.stderr(`priorscope: unknown command ${JSON.stringify(topic)}; commands: ${COMMANDS.map((x) => x.name).join(', ')}`);
      return 2;
    }
    if (first === undefined) {
      io.stderr(mainHelp());
      return 2;
    }
    io.stdout(c ? commandHelp(c) : mainHelp());
    return 0;
  }
  const command = COMMANDS.find((c) => c.name === first);
  if (!command) {
    io.stderr(
      `priorscope: unknown command ${JSON.stringify(first)}; commands: ${COMMANDS.map((x) => x.name).join(', ')} (see priorscope --help)`,
    );
    return 2;
  }
  if (rest.includes('--help') || rest.includes('-h')) {
    io.stdout(commandHelp(command));
    return 0;
  }
  try {
    const args = parseArgs(rest, command.options);
    return await command.run(args, io);
  } catch (e) {
    if (e instanceof UsageError) {
      io.stderr(`priorscope ${command.name}: ${e.message} (see priorscope ${command.name} --help)`);
      return 2;
    }
    if (e instanceof FileFormatError) {
      io.stderr(e.message);
      return 2;
    }
    if (e instanceof InputError) {
      io.stderr(`priorscope ${command.name}: ${e.message}`);
      return 2;
    }
    if (e instanceof NotPositiveDefiniteError) {
      io.stderr(`priorscope ${command.name}: ${e.message}`);
      return 3;
    }
    const err = e as Error;
    io.stderr(`priorscope ${command.name}: internal error: ${err?.message ?? String(e)}`);
    if (process.env.PRIORSCOPE_DEBUG) io.stderr(String(err?.stack ?? ''));
    return 1;
  }
}
