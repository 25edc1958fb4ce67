/**
 * Names and colours of pinned candidates (our own set), and the pure table rows of the candidate
 * comparison. Unit-tested in test/app/select/traces.test.ts.
 */
import type { CandidateScores } from '../../worker/tuningProtocol.ts';

export const MAX_PINNED = 4;

/** Four mineral-named styles of our own; colours chosen to stay apart from the posterior teal. */
export const CANDIDATE_STYLES: readonly { readonly name: string; readonly colour: string }[] = [
  { name: 'Garnet', colour: '#a8324a' },
  { name: 'Ochre', colour: '#c4841d' },
  { name: 'Slate', colour: '#4a5d8c' },
  { name: 'Moss', colour: '#5f7f2f' },
];

/** The first style whose colour is not taken (cycling if all are). */
export function nextCandidateStyle(taken: readonly string[]): { name: string; colour: string } {
  return CANDIDATE_STYLES.find((s) => !taken.includes(s.colour)) ?? CANDIDATE_STYLES[taken.length % CANDIDATE_STYLES.length];
}

/** Number formatting shared by the tables: 4 significant digits, exponent outside [1e-3, 1e5). */
export function fmt(x: number | null | undefined, digits = 4): string {
  if (x === null || x === undefined) return '—';
  if (Number.isNaN(x)) return 'NaN';
  if (!Number.isFinite(x)) return x > 0 ? '∞' : '−∞';
  const a = Math.abs(x);
  if (a !== 0 && (a >= 1e5 || a < 1e-3)) return x.toExponential(digits - 1);
  return String(Number(x.toPrecision(digits)));
}

export interface ScoreColumn {
  readonly id: string;
  readonly label: string;
  /** Meaning, shown as a tooltip. */
  readonly tip: string;
  /** Which way is better, when there is one. */
  readonly better: 'higher' | 'lower' | 'closer to 1' | null;
}

export const SCORE_COLUMNS: readonly ScoreColumn[] = [
  { id: 'logEvidence', label: 'log evidence', tip: 'log N(d; G m0, G Cm Gᵀ + Cd), natural log', better: 'higher' },
  { id: 'loo', label: 'LOO log score', tip: 'Σᵢ log p(dᵢ | d₋ᵢ): how well each datum is predicted from the others', better: 'higher' },
  {
    id: 'chi2',
    label: 'χ² / expected',
    tip: 'χ² of the posterior mean divided by its expected value under this candidate, M − tr R (not M: the mean also fits part of the noise); a correct prior gives 1 on average, and 95% of data sets fall in the bracketed interval (the same division applied to the 2.5% and 97.5% quantiles of χ²)',
    better: 'closer to 1',
  },
  { id: 'ppp', label: 'prior predictive p', tip: 'two-sided p-value of q = rᵀK⁻¹r against χ²_M', better: null },
  {
    id: 'coverage',
    label: 'coverage 68% / 95%',
    tip: 'self-calibration: truth drawn from this candidate, inverted with it (run the cross-table)',
    better: null,
  },
  {
    id: 'condition',
    label: 'cond(Cm)',
    tip: 'condition number of the prior covariance (a lower estimate on large grids)',
    better: 'lower',
  },
];

export interface ScoreCell {
  readonly column: string;
  /** Full-precision value (or null) for tests and tooltips. */
  readonly value: number | null;
  readonly text: string;
}

export interface ScoreRow {
  readonly id: string;
  readonly name: string;
  readonly colour: string;
  readonly error: string | null;
  readonly cells: readonly ScoreCell[];
}

/**
 * One table row per candidate. `coverage` is the diagonal (i, i) of the cross-table when it is
 * known (68% value; the text shows both), else null.
 */
export function scoreRows(
  candidates: readonly { id: string; name: string; colour: string }[],
  scores: readonly CandidateScores[] | null,
  coverage: { readonly size: number; readonly coverage68: ArrayLike<number>; readonly coverage95: ArrayLike<number> } | null,
): ScoreRow[] {
  return candidates.map((c, k) => {
    const s = scores?.[k];
    const cov68 = coverage && coverage.size === candidates.length ? coverage.coverage68[k * coverage.size + k] : null;
    const cov95 = coverage && coverage.size === candidates.length ? coverage.coverage95[k * coverage.size + k] : null;
    const covCell: ScoreCell = { column: 'coverage', value: cov68, text: cov68 === null ? '—' : `${fmt(cov68, 3)} / ${fmt(cov95, 3)}` };
    if (!s?.ok) {
      return {
        id: c.id,
        name: c.name,
        colour: c.colour,
        error: s && !s.ok ? s.error : null,
        cells: SCORE_COLUMNS.map((col) => (col.id === 'coverage' ? covCell : { column: col.id, value: null, text: '—' })),
      };
    }
    const v: Record<string, number> = {
      logEvidence: s.logEvidence,
      loo: s.looLogScore,
      chi2: s.chi2OverExpected,
      ppp: s.predictiveP,
      condition: s.conditionNumber,
    };
    return {
      id: c.id,
      name: c.name,
      colour: c.colour,
      error: null,
      cells: SCORE_COLUMNS.map((col) => {
        if (col.id === 'coverage') return covCell;
        if (col.id === 'chi2') {
          const [lo, hi] = s.chi2Interval95OverExpected;
          return { column: col.id, value: v[col.id], text: `${fmt(v[col.id])} (95%: ${fmt(lo, 3)}–${fmt(hi, 3)})` };
        }
        return { column: col.id, value: v[col.id], text: fmt(v[col.id]) };
      }),
    };
  });
}

/** Index of the best row for a column (highest or lowest, or closest to 1), null when none is known. */
export function bestRow(rows: readonly ScoreRow[], column: ScoreColumn): number | null {
  if (!column.better) return null;
  let best: number | null = null;
  let bestScore = -Infinity;
  rows.forEach((r, k) => {
    const v = r.cells.find((c) => c.column === column.id)?.value;
    if (v === null || v === undefined || !Number.isFinite(v)) return;
    const score = column.better === 'higher' ? v : column.better === 'lower' ? -v : -Math.abs(v - 1);
    if (score > bestScore) {
      bestScore = score;
      best = k;
    }
  });
  return rows.length > 1 ? best : null;
}
