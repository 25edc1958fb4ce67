/**
 * The report's candidate comparison table, shared by the workbench (src/app/session/report.ts, scores from the
 * worker) and the command line (src/cli/report.ts, scores computed there): name, whole prior, log evidence, its
 * reading against the best on the Kass & Raftery (1995) scale, leave-one-out score, the data-fit statistic with its
 * reference interval, and the number of hyperparameters.
 */
import type { Grid } from '../grid/grid.ts';
import type { PriorSpec } from '../prior/spec.ts';
import type { DefenceInput } from './defence.ts';
import { evidenceReadings, priorLine } from './evidenceScale.ts';
import { g4 } from './words.ts';

/** Candidate rows for the report: name, whole prior, log evidence, reading against the best, χ²/expected. */
export function candidateTable(
  cands: readonly {
    name: string;
    prior: PriorSpec;
    logEvidence: number | null;
    chi2OverExpected: number | null;
    /** The 95% interval of χ² under the candidate on the same scale (its reference); omitted when not known. */
    chi2Interval95OverExpected?: readonly [number, number] | null;
    loo: number | null;
    /** Why the candidate could not be scored (shown beside the dash). */
    error?: string;
  }[],
  grid: Grid,
  lengthUnit: string,
  valueUnit: string,
): NonNullable<DefenceInput['candidates']> {
  const ev = evidenceReadings(cands, grid);
  return {
    header: [
      'candidate',
      'prior',
      'log evidence',
      'against the best (Kass & Raftery 1995)',
      'LOO log score',
      'χ² / (M − tr R)',
      'hyper-parameters',
    ],
    rows: cands.map((c, k) => [
      c.name,
      priorLine(c.prior, lengthUnit, valueUnit),
      c.logEvidence === null ? (c.error ? `— (${c.error})` : '—') : g4(c.logEvidence),
      ev.readings[k]?.text ?? '—',
      c.loo === null ? '—' : g4(c.loo),
      c.chi2OverExpected === null
        ? '—'
        : g4(c.chi2OverExpected) +
          (c.chi2Interval95OverExpected ? ` (95%: ${g4(c.chi2Interval95OverExpected[0])}–${g4(c.chi2Interval95OverExpected[1])})` : ''),
      String(ev.readings[k]?.parameters ?? '—'),
    ]),
    caution: ev.caution,
  };
}
