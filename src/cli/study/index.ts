/** The prior-selection and batch commands, registered after the core commands by ../main.ts. */
import type { Command } from '../commands.ts';
import { fit } from './fit.ts';

export const STUDY_COMMANDS: readonly Command[] = [fit];
