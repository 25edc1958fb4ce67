/**
 * The data-fit verdict of the fit screen and the report: χ² against the central 95%
 * interval of its own distribution under the model (src/core/inverse/fitReference.ts), not against
 * χ²_M. The borehole demo's χ² = 7.2 with M = 50 was called "over-fitted or errors overstated"
 * before; it is as expected (9.6 = M − 40.4 resolved parameters).
 */
import { describe, expect, it } from 'vitest';
import { fitVerdict, formatTail } from '../../src/app/posteriorView.ts';
import { fitReferenceRows } from '../../src/app/session/report.ts';
import { computePosteriorSerial } from '../../src/core/inverse/compute.ts';
import { demoById } from '../../src/core/problems/demos.ts';

const { problem, startPrior } = demoById('borehole-log').build();
const s = computePosteriorSerial(problem, startPrior).summary;
const ref = s.fitReference!;

describe('fit verdict', () => {
  it('the borehole demo is inside, not flagged as over-fitted', () => {
    const v = fitVerdict(s.chi2, ref);
    expect(v.position).toBe('inside');
    expect(v.text).not.toMatch(/over-fitted|overstated/);
  });
  it('below and above the interval say which way, each naming both possible causes', () => {
    expect(fitVerdict(0.5 * ref.interval95[0], ref).position).toBe('below');
    expect(fitVerdict(0.5 * ref.interval95[0], ref).text).toMatch(/errors overstated, or a prior wider/);
    expect(fitVerdict(2 * ref.interval95[1], ref).position).toBe('above');
    expect(fitVerdict(2 * ref.interval95[1], ref).text).toMatch(/errors understated, or a prior too stiff/);
  });
  it('the report rows carry the expected χ², the interval, the tail probability, the verdict and its basis', () => {
    const rows = Object.fromEntries(fitReferenceRows(s.chi2, ref));
    const line = rows['Reference for χ²'];
    expect(Number(/^expected ([^ ]+) \(M − tr R/.exec(line)![1])).toBeCloseTo(50 - s.resolutionTrace, 2);
    expect(line).toContain(`95% interval ${Number(ref.interval95[0].toPrecision(4))} – ${Number(ref.interval95[1].toPrecision(4))}`);
    expect(line).toContain(`P(χ² ≥ observed) = ${formatTail(ref.upperTail)}`);
    expect(rows.Fit).toMatch(/^inside/);
    expect(line).toMatch(/L⁻¹ Cd L⁻ᵀ.*Imhof/);
    expect(fitReferenceRows(1, null)).toEqual([['Reference for χ²', 'not available (no data)']]);
  });
  it('tail probabilities: 3 digits, exponent below 1e-3, "< 1e-8" and "> 1 − 1e-8" beyond the quadrature accuracy', () => {
    expect(formatTail(0.75693)).toBe('0.757');
    expect(formatTail(2.345e-5)).toBe('2.35e-5');
    expect(formatTail(1e-12)).toBe('< 1e-8');
    expect(formatTail(1 - 3e-14)).toBe('> 1 − 1e-8');
  });
});
