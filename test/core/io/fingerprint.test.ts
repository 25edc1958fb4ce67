/** The problem fingerprint (src/core/io/fingerprint.ts): equal numbers, equal fingerprint; any change, another. */
import { describe, expect, it } from 'vitest';
import { problemFingerprint } from '../../../src/core/io/fingerprint.ts';
import { parseProblemFile, writeProblemFile } from '../../../src/core/io/problemFile.ts';
import { demoById } from '../../../src/core/problems/demos.ts';

describe('problemFingerprint', () => {
  const p = demoById('crosshole-tomography').build().problem;
  it('survives a write and read of the problem file (same numbers, new arrays)', () => {
    const back = parseProblemFile('p.json', writeProblemFile(p).json).problem;
    expect(problemFingerprint(back)).toBe(problemFingerprint(p));
  });
  it('changes with one datum, one σ, the spacing or the operator', () => {
    const f = problemFingerprint(p);
    const values = Float64Array.from(p.data.values);
    values[3] = values[3] + 1e-12;
    expect(problemFingerprint({ ...p, data: { ...p.data, values } })).not.toBe(f);
    const sigma = Float64Array.from(p.data.sigma!);
    sigma[0] = sigma[0] * 2;
    expect(problemFingerprint({ ...p, data: { ...p.data, sigma } })).not.toBe(f);
    expect(problemFingerprint({ ...p, grid: { ...p.grid, spacing: p.grid.spacing.map((s) => s * 2) } })).not.toBe(f);
    const other = demoById('potential-field').build().problem;
    expect(problemFingerprint(other)).not.toBe(f);
  });
});
