/** The status panel's wording for each eigenvalue method (pure functions of src/app/StatusPanel.tsx). */
import { describe, expect, it } from 'vitest';
import { eigenvalueMethodText, pdLevel, pdText } from '../../src/app/StatusPanel.tsx';

describe('StatusPanel wording', () => {
  it('names the method; the FFT route shows its bracket and embedding', () => {
    expect(eigenvalueMethodText({ eigenvalueMethod: 'exact' })).toBe('all eigenvalues of the dense Cm');
    expect(eigenvalueMethodText({ eigenvalueMethod: 'lanczos' })).toMatch(/Lanczos/);
    const t = eigenvalueMethodText({
      eigenvalueMethod: 'fft-bounds',
      eigenvalueBounds: { lower: 0.0123, upper: 402.1 },
      embeddingPadding: [128, 128],
    });
    expect(t).toBe('bounds from the FFT embedding (embedding 128 × 128): λ in [0.0123, 402], estimates inside');
  });
  it('three outcomes, each with the route that decided it', () => {
    expect(pdText('ok', 'cholesky')).toBe('Cm proven positive definite (Cholesky factorisation)');
    expect(pdText('ok', 'fft-bracket')).toBe('Cm proven positive definite (bound from the FFT embedding)');
    expect(pdText('not-pd', 'cholesky')).toBe('Cm is not positive definite (Cholesky factorisation fails)');
    expect(pdText('not-pd', 'lanczos-ritz')).toBe('Cm is not positive definite (a direction of negative variance)');
    // "Could not prove" is never "not positive definite".
    expect(pdText('not-decided', 'none')).toBe('Positive definiteness not decided');
    expect(pdText('near-singular', 'fft-bracket')).toMatch(/^Cm is near-singular/);
    expect(pdText('pending', null)).toBe('Checking Cm …');
  });
  it('the level follows the verdict, not a boolean', () => {
    const base = { suggestedJitter: null, warnings: [] };
    expect(pdLevel({ ...base, verdict: 'positive-definite' })).toBe('ok');
    expect(pdLevel({ ...base, verdict: 'not-positive-definite' })).toBe('not-pd');
    expect(pdLevel({ ...base, verdict: 'not-decided' })).toBe('not-decided');
    expect(pdLevel({ ...base, verdict: 'positive-definite', suggestedJitter: 1e-6 })).toBe('near-singular');
  });
});
