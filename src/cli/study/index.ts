/** The prior-selection and batch commands, registered after the core commands by ../main.ts. */
import type { Command } from '../commands.ts';
import { calibrateCommand } from './calibrate.ts';
import { fit } from './fit.ts';
import { merge } from './merge.ts';
import { profile } from './profile.ts';
import { score } from './score.ts';

export const STUDY_COMMANDS: readonly Command[] = [fit, profile, score, calibrateCommand, merge];
