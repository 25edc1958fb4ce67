/** `priorscope merge`: the partial results of a sharded run (./shard.ts) combined into the unsharded output. */
import { formatJson } from '../../core/io/json.ts';
import { emit, OUT, type Command } from '../commands.ts';
import { UsageError } from '../args.ts';
import { combineCalibration, type CalibrationPartial } from './calibrate.ts';
import { combineProfile, type ProfilePartial } from './profile.ts';
import { combineScores, type ScorePartial } from './score.ts';
import { readPartials } from './shard.ts';
import { combineTune, type TunePartial } from './tuneShard.ts';

/** How each shardable command combines its parts (the same function its unsharded run uses). */
const COMBINE: Readonly<Record<string, (key: unknown, parts: readonly never[]) => unknown>> = {
  calibrate: (key, parts) => combineCalibration(key, parts as readonly CalibrationPartial[]),
  score: (key, parts) => combineScores(key, parts as readonly ScorePartial[]).output,
  profile: (key, parts) => combineProfile(key, parts as readonly ProfilePartial[]),
  tune: (key, parts) => combineTune(key, parts as readonly TunePartial[]).output,
};

export const merge: Command = {
  name: 'merge',
  summary: 'combine the partial results of a sharded run (--shard K/N) into its full output',
  usage: 'priorscope merge PART1.json PART2.json … [--out FILE]',
  details:
    `Reads the N partial files written by one command run with --shard 1/N … N/N (${Object.keys(COMBINE).join(', ')}), in any order,\n` +
    'checks that they come from the same run (same command, problem, priors and options: their "key") and that every\n' +
    'shard is present exactly once, and writes the output the command gives without --shard, byte for byte.\n' +
    'A missing, repeated or foreign part is bad input (exit 2; the message names the file).',
  options: [OUT],
  run(args, io) {
    const parts = readPartials(args.positionals);
    const command = parts[0].command;
    const combine = COMBINE[command];
    if (!combine)
      throw new UsageError(`partial results of \`${command}\` cannot be merged (mergeable: ${Object.keys(COMBINE).join(', ')})`);
    emit(io, args, formatJson(combine(parts[0].key, parts.map((p) => p.data) as never[])));
    return 0;
  },
};
