/** The last guard of computePosterior (src/core/inverse/compute.ts checkedFinite): no NaN, ±∞ or JSON null leaves the core. */
import { describe, expect, it } from 'vitest';
import { checkedFinite, computePosteriorSerial } from '../../../src/core/inverse/compute.ts';
import { demoById } from '../../../src/core/problems/demos.ts';

describe('checkedFinite', () => {
  const { problem, startPrior } = demoById('borehole-log').build();
  const summary = computePosteriorSerial(problem, startPrior).summary;
  it('passes a finite summary through unchanged', () => {
    expect(checkedFinite(summary)).toBe(summary);
  });
  it.each([
    ['mean', 7, Number.POSITIVE_INFINITY],
    ['std', 0, Number.NaN],
    ['residuals', 3, Number.NEGATIVE_INFINITY],
  ] as const)('a non-finite %s entry is refused with where it came out and what to check', (name, i, v) => {
    const a = Float64Array.from(summary[name]);
    a[i] = v;
    expect(() => checkedFinite({ ...summary, [name]: a })).toThrow(
      new RegExp(
        `^posterior must be finite numbers; ${name}\\[${i}\\] came out ${String(v).replace('+', '\\+')} because the scales .*units`,
      ),
    );
  });
  it('a non-finite log evidence too', () => {
    expect(() => checkedFinite({ ...summary, logEvidence: Number.NaN })).toThrow(/logEvidence came out NaN/);
  });
});
