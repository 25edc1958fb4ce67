/** chiSquareQuantile against scipy.stats.chi2.ppf (Debian python3-scipy). */
import { expect, it } from 'vitest';
import { chiSquareQuantile } from '../../src/core/inverse/chisquare.ts';
import { runPython } from './python.ts';

const cases: [number, number][] = [];
for (const df of [0.3, 1, 2, 3, 5, 10, 17.5, 50, 100, 400, 1000, 20000]) {
  for (const p of [1e-8, 0.001, 0.025, 0.05, 0.16, 0.5, 0.84, 0.95, 0.975, 0.999]) cases.push([p, df]);
}
const ref = runPython<{ ppf: number[] }>('posterior_chi2.py', { cases });

it('chiSquareQuantile agrees with scipy.stats.chi2.ppf to 1e-10 relative over 120 (p, df) cases', () => {
  cases.forEach(([p, df], k) => {
    const want = ref.ppf[k];
    expect(Math.abs(chiSquareQuantile(p, df) - want)).toBeLessThanOrEqual(1e-10 * want);
  });
});
