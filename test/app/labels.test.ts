import { describe, expect, it } from 'vitest';
import { axisLabel, axisNames, offsetLabel, orientationNote, parameterLabel, withUnit } from '../../src/app/labels.ts';
import { fieldText } from '../../src/app/controls.tsx';
import { hyperParameters } from '../../src/core/tuning/typeII.ts';

describe('parameter labels in words', () => {
  it.each([
    ['terms[0].variance', 'term 1 variance'],
    ['terms[0].length', 'term 1 length'],
    ['terms[0].lengths[0]', 'term 1 length along the first axis'],
    ['terms[1].lengths[1]', 'term 2 length across the first axis'],
    ['terms[2].angle', 'term 3 angle'],
    ['terms[0].nu', 'term 1 smoothness ν'],
    ['nugget', 'nugget'],
  ])('%s → %s', (name, label) => expect(parameterLabel(name)).toBe(label));

  it('gives words for every name the optimiser uses', () => {
    const prior = {
      mean: { constant: 0 },
      terms: [
        { kernel: 'matern' as const, variance: 1, lengths: [3, 1] as const, angle: 20, nu: 1.5 },
        { kernel: 'exponential' as const, variance: 0.1, length: 2 },
      ],
      nugget: 0.01,
    };
    for (const h of hyperParameters(prior)) expect(parameterLabel(h.name)).not.toMatch(/\[|\]|\./);
  });
});

describe('axis names and units', () => {
  const g2 = { shape: [4, 3], spacing: [1, 1], unit: 'm' };
  it('uses the problem names, else x and y (x in 1-D)', () => {
    expect(axisNames({ ...g2, axes: ['easting', 'northing'] })).toEqual(['easting', 'northing']);
    expect(axisNames(g2)).toEqual(['x', 'y']);
    expect(axisNames({ shape: [5], spacing: [1] })).toEqual(['x']);
    expect(axisLabel({ ...g2, axes: ['easting', 'northing'] }, 1)).toBe('northing (m)');
    expect(offsetLabel({ ...g2, axes: ['x', 'depth'] }, 1)).toBe('Δdepth (m)');
    expect(orientationNote({ ...g2, axes: ['x', 'depth'] })).toBe('x to the right, depth increasing downwards');
  });
  it('never writes an empty "()"', () => {
    expect(withUnit('posterior mean', '')).toBe('posterior mean');
    expect(withUnit('posterior mean', undefined)).toBe('posterior mean');
    expect(axisLabel({ shape: [5], spacing: [1] })).toBe('x');
    expect(withUnit('d', 'ms')).toBe('d (ms)');
  });
});

describe('number fields', () => {
  it('show 4 significant digits and keep the exponent; integers in full', () => {
    expect(fieldText(6.895288123456789e-10)).toBe('6.895e-10');
    expect(fieldText(0.30000000000000004)).toBe('0.3');
    expect(fieldText(20240611)).toBe('20240611');
    expect(fieldText(1234.5678)).toBe('1235');
  });
});
