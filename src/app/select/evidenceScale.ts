/** Re-exported for the candidate table: the scale itself lives with the report (src/core/report/evidenceScale.ts). */
export { evidenceReadings, freeParameterCount, kassRafteryCategory, priorLine } from '../../core/report/evidenceScale.ts';
