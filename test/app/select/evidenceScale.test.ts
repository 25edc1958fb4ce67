import { describe, expect, it } from 'vitest';
import { evidenceReadings, freeParameterCount, kassRafteryCategory, priorLine } from '../../../src/app/select/evidenceScale.ts';
import type { PriorSpec } from '../../../src/core/prior/spec.ts';

const grid = { shape: [10, 5], spacing: [1, 1], unit: 'm' };
const iso: PriorSpec = { mean: { constant: 2 }, terms: [{ kernel: 'exponential', variance: 1, length: 3 }], nugget: 0 };
const rich: PriorSpec = {
  mean: { constant: 2 },
  terms: [{ kernel: 'matern', nu: 1.5, variance: 1, lengths: [3, 1], angle: 20 }],
  nugget: 0.01,
};

describe('evidence differences on the Kass & Raftery (1995) scale', () => {
  it('places 2 ln B in the published categories, limits 2, 6 and 10', () => {
    expect(kassRafteryCategory(0)).toBe('not worth more than a bare mention');
    expect(kassRafteryCategory(1.99)).toBe('not worth more than a bare mention');
    expect(kassRafteryCategory(2)).toBe('positive');
    expect(kassRafteryCategory(5.9)).toBe('positive');
    expect(kassRafteryCategory(6)).toBe('strong');
    expect(kassRafteryCategory(10)).toBe('very strong');
  });

  it('reads each candidate against the best: ln Z differences of 0.5, 2 and 7 give 2 ln B = 1, 4, 14', () => {
    const r = evidenceReadings(
      [
        { prior: iso, logEvidence: -100 },
        { prior: iso, logEvidence: -100.5 },
        { prior: iso, logEvidence: -102 },
        { prior: iso, logEvidence: -107 },
        { prior: iso, logEvidence: null },
      ],
      grid,
    );
    expect(r.readings.map((x) => x?.twiceLnB ?? null)).toEqual([0, 1, 4, 14, null]);
    expect(r.readings[0]!.text).toBe('best');
    expect(r.readings[2]!.text).toContain('positive');
    expect(r.readings[3]!.text).toContain('very strong');
    expect(r.caution).toBeNull();
  });

  it('cautions when the candidates have different numbers of hyperparameters', () => {
    // iso: variance, length, mean = 3; rich: variance, 2 lengths, angle, ν, nugget, mean = 7
    expect(freeParameterCount(iso, grid)).toBe(3);
    expect(freeParameterCount(rich, grid)).toBe(7);
    expect(freeParameterCount({ ...iso, mean: { trend: { intercept: 0, slope: [1, 2] } } }, grid)).toBe(5);
    const r = evidenceReadings(
      [
        { prior: iso, logEvidence: -10 },
        { prior: rich, logEvidence: -8 },
      ],
      grid,
    );
    expect(r.caution).toContain('3, 7');
  });

  it('writes the whole prior in one line with units', () => {
    expect(priorLine(rich, 'm', 'kg/m³')).toBe('Matérn ν 1.5, σ² 1, ℓ 3 × 1 m at 20°; nugget 0.01; mean 2 kg/m³');
  });
});
