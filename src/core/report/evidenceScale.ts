/**
 * Reading differences of log evidence, and the candidate's prior in one line (pure; tested in
 * test/app/select/evidenceScale.test.ts).
 *
 * Scale: Kass & Raftery (1995), "Bayes factors", J. Am. Stat. Assoc. 90:773–795, §3.2: the Bayes
 * factor B between two models read on 2 ln B: 0–2 "not worth more than a bare mention", 2–6
 * "positive", 6–10 "strong", above 10 "very strong" (category limits and words as we recall them
 * from that table; quoted from memory). With natural-log evidences, 2 ln B = 2 (ln Z₁ − ln Z₂).
 */
import type { Term } from '../kernels/spec.ts';
import { kernelDefinition, termSmoothness } from '../kernels/table.ts';
import type { PriorSpec } from '../prior/spec.ts';
import { gridDimension, type Grid } from '../grid/grid.ts';

/** The category of 2 ln B on the Kass & Raftery (1995) scale, for B ≥ 1 (the better model over the other). */
export function kassRafteryCategory(twiceLnB: number): string {
  const v = Math.abs(twiceLnB);
  if (v < 2) return 'not worth more than a bare mention';
  if (v < 6) return 'positive';
  if (v < 10) return 'strong';
  return 'very strong';
}

/** Hyperparameters of a prior: per term its variance, length(s), angle, ν (Matérn); the nugget when non-zero; the mean's coefficients. */
export function freeParameterCount(prior: PriorSpec, grid: Grid): number {
  let n = 0;
  for (const t of prior.terms) n += termParameterCount(t);
  if ((prior.nugget ?? 0) > 0) n += 1;
  const m = prior.mean;
  if ('constant' in m) n += 1;
  else if ('trend' in m) n += 1 + gridDimension(grid);
  return n;
}

function termParameterCount(t: Term): number {
  // variance, the length(s) and angle, and the kernel's own fields (ν for Matérn)
  return 1 + (t.lengths ? 3 : 1) + Object.keys(kernelDefinition(t.kernel).fields).length;
}

/** One row of the evidence comparison against the candidate with the highest log evidence. */
export interface EvidenceReading {
  /** ln Z_best − ln Z of this candidate (≥ 0; 0 for the best). */
  readonly deficit: number;
  /** 2 ln B of the best over this candidate. */
  readonly twiceLnB: number;
  /** Words: "best", or the Kass & Raftery category for the best against this one. */
  readonly text: string;
  readonly parameters: number;
}

/**
 * Each candidate against the best by log evidence, with a caution when the candidates have
 * different numbers of hyperparameters: the evidence at hyperparameters tuned on these data
 * favours the richer prior more than a fixed-prior Bayes factor would, so the scale reads too
 * strong for it. Candidates without a finite log evidence get null.
 */
export function evidenceReadings(
  candidates: readonly { prior: PriorSpec; logEvidence: number | null }[],
  grid: Grid,
): { readings: (EvidenceReading | null)[]; caution: string | null } {
  const finite = candidates.map((c) => (c.logEvidence !== null && Number.isFinite(c.logEvidence) ? c.logEvidence : null));
  const best = Math.max(...finite.map((v) => v ?? -Infinity));
  const counts = candidates.map((c) => freeParameterCount(c.prior, grid));
  const readings = candidates.map((_c, k) => {
    const v = finite[k];
    if (v === null || v === undefined || !Number.isFinite(best)) return null;
    const deficit = best - v;
    const twice = 2 * deficit;
    const text = deficit === 0 ? 'best' : `2 ln B = ${twice.toPrecision(3)}: best over this one ${kassRafteryCategory(twice)}`;
    return { deficit, twiceLnB: twice, text, parameters: counts[k] };
  });
  const shown = counts.filter((_, k) => readings[k] !== null);
  const caution =
    new Set(shown).size > 1
      ? `The candidates have different numbers of hyperparameters (${[...new Set(shown)].sort((a, b) => a - b).join(', ')}). When they were tuned on these data, the richer prior's evidence is flattered and the scale reads too strong in its favour; prefer the simpler prior unless the difference is clear.`
      : null;
  return { readings, caution };
}

const g3 = (x: number) => String(Number(x.toPrecision(3)));

/** The whole prior in one line: "Matérn ν 1.5, σ² 0.25, ℓ 10 m; nugget 1e-6; mean 11.5 °C". */
export function priorLine(prior: PriorSpec, lengthUnit: string, valueUnit: string): string {
  const u = lengthUnit ? ` ${lengthUnit}` : '';
  const terms = prior.terms.map((t) => {
    const nu = termSmoothness(t);
    const k = nu !== undefined ? `${kernelDefinition(t.kernel).label} ν ${g3(nu)}` : t.kernel;
    const l = t.lengths ? `ℓ ${g3(t.lengths[0])} × ${g3(t.lengths[1])}${u} at ${g3(t.angle ?? 0)}°` : `ℓ ${g3(t.length)}${u}`;
    return `${k}, σ² ${g3(t.variance)}, ${l}`;
  });
  const m = prior.mean;
  const mean =
    'constant' in m
      ? `mean ${g3(m.constant)}${valueUnit ? ` ${valueUnit}` : ''}`
      : 'values' in m
        ? 'mean given per cell'
        : `mean trend ${g3(m.trend.intercept)} + slope (${Array.from(m.trend.slope, g3).join(', ')})`;
  return [...terms, `nugget ${g3(prior.nugget ?? 0)}`, mean].join('; ');
}
