/**
 * The report's plain-language prior. Exponential ρ = e^{−h} falls to 0.05 at h = ln 20 =
 * ln 2 + ln 10 = 2.995732 (logarithm values as tabulated in Abramowitz & Stegun ch. 4; from
 * memory, recomputed here with Math.log), so a length of 10 m gives 29.96 m. For the other kernels
 * the stated distance is checked by evaluating the core's correlation there (ρ = 0.05 to the
 * rounding of four significant digits).
 */
import { describe, expect, it } from 'vitest';
import { candidateTable, priorInWords, termInWords } from '../../../src/app/session/report.ts';
import { correlationFunction } from '../../../src/core/kernels/correlation.ts';

describe('prior in words', () => {
  it('states the exponential practical range as 3 × length (ln 20 = 2.995732, A&S 4.2)', () => {
    const s = termInWords({ kernel: 'exponential', variance: 4, length: 10 }, 'm', '°C');
    expect(s).toContain('standard deviation 2 °C');
    expect(s).toContain('length 10 m');
    expect(s).toContain(`correlation falls to 0.05 at ${Number((10 * (Math.log(2) + Math.log(10))).toPrecision(4))} m`);
    expect(s).toContain('at 29.96 m');
  });
  it.each(['gaussian', 'spherical', 'matern'] as const)('the stated %s range is where the correlation is 0.05', (kernel) => {
    const s = termInWords({ kernel, variance: 1, length: 2, ...(kernel === 'matern' ? { nu: 2.5 } : {}) }, 'm', '');
    const stated = Number(/falls to 0\.05 at ([0-9.]+) m/.exec(s)![1]);
    const rho = correlationFunction(kernel, 2.5);
    // 4 significant digits in the sentence: ρ at the stated distance is 0.05 to about 1e-3 relative slope error
    expect(Math.abs(rho(stated / 2) - 0.05)).toBeLessThan(2e-3);
  });
  it('lists mean, each term and the nugget', () => {
    const w = priorInWords(
      {
        mean: { constant: 3 },
        terms: [
          { kernel: 'exponential', variance: 1, length: 1 },
          { kernel: 'gaussian', variance: 1, lengths: [2, 1], angle: 30 },
        ],
        nugget: 0.5,
      },
      'm',
      'K',
    );
    expect(w).toHaveLength(4);
    expect(w[0]).toBe('Mean: constant 3 K.');
    expect(w[2]).toContain('lengths 2 m and 1 m at 30°');
    expect(w[3]).toBe('Nugget (uncorrelated variance): 0.5.');
  });
});

describe('candidate table of the report', () => {
  it('gives the data-fit statistic with its reference interval, and a dash where a candidate has no score', () => {
    const prior = { mean: { constant: 0 }, terms: [{ kernel: 'exponential' as const, variance: 1, length: 10 }] };
    const t = candidateTable(
      [
        { name: 'A', prior, logEvidence: -10, chi2OverExpected: 0.93, chi2Interval95OverExpected: [0.46, 1.79], loo: -11 },
        { name: 'B', prior, logEvidence: null, chi2OverExpected: null, loo: null },
      ],
      { shape: [20], spacing: [1] },
      'm',
      '',
    );
    const col = t.header.indexOf('χ² / (M − tr R)');
    expect(col).toBeGreaterThan(0);
    expect(t.rows[0][col]).toBe('0.93 (95%: 0.46–1.79)');
    expect(t.rows[1][col]).toBe('—');
  });
});
