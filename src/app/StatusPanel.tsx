/** Positive-definiteness status of the current prior covariance, always visible. */
import { assertNever } from '../core/errors.ts';
import type { Diagnostics } from '../core/prior/diagnostics.ts';
import { useWb } from './context.ts';

function fmt(x: number): string {
  if (!Number.isFinite(x)) return x > 0 ? '∞' : String(x);
  if (x === 0) return '0';
  const a = Math.abs(x);
  return a >= 1e4 || a < 1e-3 ? x.toExponential(2) : x.toPrecision(3);
}

export type PdLevel = 'ok' | 'near-singular' | 'not-pd' | 'not-decided' | 'pending' | 'error';

/**
 * Level shown for a diagnosis: the core's verdict (proven, proven not, not decided) and, for a
 * proven one, whether it is near-singular (the core then suggests a jitter).
 */
export function pdLevel(d: Pick<Diagnostics, 'verdict' | 'suggestedJitter' | 'warnings'> | null): PdLevel {
  if (!d) return 'pending';
  if (d.verdict === 'not-positive-definite') return 'not-pd';
  if (d.verdict === 'not-decided') return 'not-decided';
  if (d.suggestedJitter !== null || d.warnings.some((w) => w.code === 'near-singular')) return 'near-singular';
  return 'ok';
}

/**
 * How the numbers were found, in the panel's words: the dense route factors Cm; the FFT route
 * (src/core/prior/structuredDiagnostics.ts) proves or fails to prove positive definiteness from
 * bounds of its circulant embedding and estimates the extreme eigenvalues inside them.
 */
export function eigenvalueMethodText(d: Pick<Diagnostics, 'eigenvalueMethod' | 'eigenvalueBounds' | 'embeddingPadding'>): string {
  switch (d.eigenvalueMethod) {
    case 'exact':
      return 'all eigenvalues of the dense Cm';
    case 'lanczos':
      return 'dense Cm, extreme eigenvalues estimated (Lanczos)';
    case 'fft-bounds': {
      const b = d.eigenvalueBounds;
      const pad = d.embeddingPadding ? ` (embedding ${d.embeddingPadding.join(' × ')})` : '';
      return b
        ? `bounds from the FFT embedding${pad}: λ in [${fmt(b.lower)}, ${fmt(b.upper)}], estimates inside`
        : `bounds from the FFT embedding${pad}`;
    }
    default:
      return assertNever(d.eigenvalueMethod, 'eigenvalue method');
  }
}

/** The headline: the verdict and, when proven, the route that proved it. */
export function pdText(level: PdLevel, decidedBy: Diagnostics['decidedBy'] | null): string {
  const by = decidedBy === null ? '' : ROUTE[level === 'not-pd' ? 'not' : 'yes'][decidedBy];
  return by ? `${TEXT[level]} (${by})` : TEXT[level];
}

const ROUTE: Record<'yes' | 'not', Record<Diagnostics['decidedBy'], string>> = {
  yes: { cholesky: 'Cholesky factorisation', 'fft-bracket': 'bound from the FFT embedding', 'lanczos-ritz': '', none: '' },
  not: { cholesky: 'Cholesky factorisation fails', 'fft-bracket': '', 'lanczos-ritz': 'a direction of negative variance', none: '' },
};

const TEXT: Record<PdLevel, string> = {
  ok: 'Cm proven positive definite',
  'near-singular': 'Cm is near-singular',
  'not-pd': 'Cm is not positive definite',
  'not-decided': 'Positive definiteness not decided',
  pending: 'Checking Cm …',
  error: 'Check failed',
};

export function StatusPanel() {
  const d = useWb((s) => s.diagnostics);
  const error = useWb((s) => s.errors.diagnostics ?? null);
  const busy = useWb((s) => s.busy.diagnostics ?? false);
  const apply = useWb((s) => s.applySuggestedJitter);
  const unit = useWb((s) => s.problem?.quantity.unit ?? '');
  const level: PdLevel = error ? 'error' : pdLevel(d);
  return (
    <section
      className={`pd-status pd-${level}`}
      data-testid="pd-status"
      data-level={level}
      aria-live="polite"
      aria-label="Positive-definiteness status"
    >
      <strong data-testid="pd-text">{pdText(level, d && !error ? d.decidedBy : null)}</strong>
      {busy && <span className="busy-dot" title="recomputing" aria-label="recomputing" />}
      {d && !error && (
        <span className="pd-numbers">
          <span title="Smallest eigenvalue of Cm (λmin); Cm is positive definite when λmin > 0">
            λ<sub>min</sub> = <span data-testid="pd-min-eig">{fmt(d.minEigenvalue)}</span>
            {unit ? ` (${unit})²` : ''}
          </span>
          <span title="Condition number κ = λmax/λmin (∞ when λmin ≤ 0)">
            κ = <span data-testid="pd-condition">{fmt(d.conditionNumber)}</span>
            {d.conditionUpperBound !== undefined && (
              <span title="Certified upper bound on κ from the FFT embedding">
                {' '}
                (≤ <span data-testid="pd-condition-bound">{fmt(d.conditionUpperBound)}</span>)
              </span>
            )}
          </span>
          <span className="pd-method" data-testid="pd-method" title="How the eigenvalues were found">
            {eigenvalueMethodText(d)}
          </span>
          <span className="pd-basis" data-testid="pd-basis" title="What the verdict rests on">
            {d.basis}
            {d.nextStep ? ` Next step: ${d.nextStep}` : ''}
          </span>
          {d.suggestedJitter !== null && (
            <>
              <span title="Smallest diagonal jitter that lets Cm factor safely; adding it to the nugget applies it">
                suggested jitter <span data-testid="pd-jitter">{fmt(d.suggestedJitter)}</span>
                {unit ? ` (${unit})²` : ''}
              </span>
              <button type="button" data-testid="apply-jitter" onClick={apply} title="nugget ← nugget + suggested jitter">
                Apply jitter
              </button>
            </>
          )}
        </span>
      )}
      {error && <span className="pd-warning">{error}</span>}
      {d && !error && d.warnings.length > 0 && (
        <ul className="pd-warnings" data-testid="pd-warnings">
          {d.warnings.map((w) => (
            <li key={w.code}>{w.message}</li>
          ))}
        </ul>
      )}
    </section>
  );
}
