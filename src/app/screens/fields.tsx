/**
 * The fields of the one-screen views (the volume screen of a 3-D grid, the cells screen of a cell list): the list,
 * its picker, and the values of the chosen field, one per cell, from the store.
 */
import { useMemo } from 'react';
import type { Geometry } from '../../core/grid/grid.ts';
import { useWb } from '../context.ts';
import { correlationWith } from '../figures/correlation.ts';
import { varianceReduction } from '../figures/sections.ts';

export type FieldId = 'mean' | 'std' | 'reduction' | 'correlation' | 'prior-draw' | 'posterior-draw' | 'kernel';
export const FIELDS: readonly { id: FieldId; label: string }[] = [
  { id: 'mean', label: 'Posterior mean' },
  { id: 'std', label: 'Posterior standard deviation' },
  { id: 'reduction', label: 'Variance reduction 1 − σ²post/σ²prior' },
  { id: 'correlation', label: 'Prior correlation with the chosen cell' },
  { id: 'prior-draw', label: 'Prior realisation 1' },
  { id: 'posterior-draw', label: 'Posterior realisation 1' },
  { id: 'kernel', label: 'Averaging kernel' },
];

export function fieldLabel(field: FieldId): string {
  return FIELDS.find((f) => f.id === field)!.label;
}

/**
 * The chosen field's values (one per cell), whether it is signed, and the centre of its scale when that is 0
 * rather than the prior mean (correlations, averaging kernels); null while it is being computed.
 */
export interface FieldValues {
  readonly v: ArrayLike<number>;
  readonly signed: boolean;
  readonly centre?: number;
  /** The prior mean a signed field is drawn against (../figures/sections.ts volumeColour). */
  readonly priorMean: ArrayLike<number>;
}

export function useFieldValues(g: Geometry | null, field: FieldId, cell: number): FieldValues | null {
  const prior = useWb((s) => s.prior);
  const post = useWb((s) => s.posterior);
  // On the FFT route the mean arrives first (a partial result) and the bands after it: the mean is drawn at once.
  const partial = useWb((s) => s.posteriorPartial);
  const priorDraws = useWb((s) => s.priorDraws);
  const postDraws = useWb((s) => s.posteriorDraws);
  const resolution = useWb((s) => s.resolution);
  return useMemo((): FieldValues | null => {
    if (!g) return null;
    if (!post) return field === 'mean' && partial ? { v: partial.mean, signed: true, priorMean: partial.priorMean } : null;
    const s = post.summary;
    const m0 = post.priorMean;
    switch (field) {
      case 'mean':
        return { v: s.mean, signed: true, priorMean: m0 };
      case 'std':
        return { v: s.std, signed: false, priorMean: m0 };
      case 'reduction':
        return { v: varianceReduction(s.std, s.priorStd), signed: false, priorMean: m0 };
      case 'correlation': {
        const c = prior ? correlationWith(g, prior, cell) : null;
        return c ? { v: c, signed: true, centre: 0, priorMean: m0 } : null;
      }
      case 'prior-draw':
        return priorDraws ? { v: priorDraws.data.subarray(0, priorDraws.cols), signed: true, priorMean: m0 } : null;
      case 'posterior-draw':
        return postDraws ? { v: postDraws.data.subarray(0, postDraws.cols), signed: true, priorMean: m0 } : null;
      case 'kernel':
        // A resolution row is signed about 0 (not about the prior mean): the diverging scale centred on 0.
        return resolution && resolution.cell === cell ? { v: resolution.row, signed: true, centre: 0, priorMean: m0 } : null;
    }
  }, [g, prior, post, partial, priorDraws, postDraws, resolution, field, cell]);
}

/** The field list of a one-screen view. */
export function FieldPicker({ testId, field, onChange }: { testId: string; field: FieldId; onChange: (f: FieldId) => void }) {
  return (
    <label>
      Field{' '}
      <select data-testid={testId} value={field} onChange={(e) => onChange(e.target.value as FieldId)}>
        {FIELDS.map((f) => (
          <option key={f.id} value={f.id}>
            {f.label}
          </option>
        ))}
      </select>
    </label>
  );
}
