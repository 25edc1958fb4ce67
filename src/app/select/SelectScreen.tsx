/**
 * The "Choose prior" screen: the data's verdict on the prior. Three views — the evidence
 * map with profiles and the type-II fit, the criteria of the current prior with calibration, and
 * the pinned candidates side by side. The pin button sits in the screen's header next to a
 * summary of the current prior.
 */
import { termSmoothness } from '../../core/kernels/table.ts';
import { useState } from 'react';
import { useWb } from '../context.ts';
import type { PriorSpec } from '../../core/prior/spec.ts';
import { CandidatesPanel } from './CandidatesPanel.tsx';
import { MAX_PINNED, fmt } from './candidates.ts';
import { CriteriaPanel } from './CriteriaPanel.tsx';
import { EvidencePanel } from './EvidencePanel.tsx';
import { AveragedPanel } from './AveragedPanel.tsx';
import './select.css';

type View = 'evidence' | 'criteria' | 'candidates';
const VIEWS: readonly { id: View; label: string }[] = [
  { id: 'evidence', label: 'Evidence' },
  { id: 'criteria', label: 'Criteria & calibration' },
  { id: 'candidates', label: 'Candidates' },
];

/** One line describing a prior: its terms (kernel, ℓ, σ²) and the nugget. */
export function describePrior(prior: PriorSpec): string {
  const terms = prior.terms.map((t) => {
    const l = t.lengths ? `ℓ = ${fmt(t.lengths[0])}×${fmt(t.lengths[1])} at ${fmt(t.angle ?? 0)}°` : `ℓ = ${fmt(t.length)}`;
    const nu = termSmoothness(t);
    return `${t.kernel}${nu !== undefined ? ` ν = ${fmt(nu)}` : ''}, ${l}, σ² = ${fmt(t.variance)}`;
  });
  return `${terms.join(' + ')}${prior.nugget ? `; nugget ${fmt(prior.nugget)}` : ''}`;
}

export function SelectScreen() {
  const prior = useWb((s) => s.prior);
  const problem = useWb((s) => s.problem);
  const count = useWb((s) => s.candidates.length);
  const pin = useWb((s) => s.pinPrior);
  const candidatesNote = useWb((s) => s.candidatesNote);
  const [view, setView] = useState<View>('evidence');
  if (!prior || !problem) return null;
  return (
    <div className="screen sel" data-testid="screen-select">
      <div className="sel-head">
        <span className="note">Current prior:</span> <span data-testid="select-prior">{describePrior(prior)}</span>
        <button
          type="button"
          className="pin"
          data-testid="select-pin"
          onClick={pin}
          disabled={count >= MAX_PINNED}
          title={
            count >= MAX_PINNED ? `At most ${MAX_PINNED} candidates; remove one first` : 'Keep this prior as a candidate for comparison'
          }
        >
          Pin current prior ({count}/{MAX_PINNED})
        </button>
        <span className="sel-views" role="group" aria-label="Prior selection views">
          {VIEWS.map((v) => (
            <button key={v.id} type="button" data-testid={`select-view-${v.id}`} aria-pressed={view === v.id} onClick={() => setView(v.id)}>
              {v.label}
              {v.id === 'candidates' && count > 0 ? ` (${count})` : ''}
            </button>
          ))}
        </span>
      </div>
      {candidatesNote && (
        <p className="note" role="status" data-testid="candidates-note">
          {candidatesNote}
        </p>
      )}
      {view === 'evidence' && <EvidencePanel />}
      {view === 'evidence' && <AveragedPanel />}
      {view === 'criteria' && <CriteriaPanel />}
      {view === 'candidates' && <CandidatesPanel />}
    </div>
  );
}
