/** The status panel's wording for each eigenvalue method (pure functions of src/app/StatusPanel.tsx). */
import { describe, expect, it } from 'vitest';
import { eigenvalueMethodText, pdText } from '../../src/app/StatusPanel.tsx';

describe('StatusPanel wording', () => {
  it('names the method; the FFT route shows its bracket and embedding', () => {
    expect(eigenvalueMethodText({ eigenvalueMethod: 'exact' })).toBe('all eigenvalues of the dense Cm');
    expect(eigenvalueMethodText({ eigenvalueMethod: 'lanczos' })).toMatch(/Lanczos/);
    const t = eigenvalueMethodText({ eigenvalueMethod: 'fft-bounds', eigenvalueBounds: { lower: 0.0123, upper: 402.1 }, embeddingPadding: [128, 128] });
    expect(t).toBe('bounds from the FFT embedding (embedding 128 × 128): λ in [0.0123, 402], estimates inside');
  });
  it('says "proven" on the FFT route, "factors" on the dense one', () => {
    expect(pdText('ok', 'exact')).toBe('Cm factors (positive definite)');
    expect(pdText('ok', 'fft-bounds')).toMatch(/^Cm proven positive definite/);
    expect(pdText('not-pd', 'fft-bounds')).toBe('Cm not proven positive definite');
    expect(pdText('near-singular', 'fft-bounds')).toBe('Cm is near-singular');
    expect(pdText('pending', null)).toBe('Checking Cm …');
  });
});
