/**
 * Benchmark cases for src/core/tuning (not timed tests). Targets: a 16 × 16 evidence map
 * (term 0 of the demo's start prior, lengths ×0.2 … ×5, variances ×0.01 … ×100) ≤ 2 s on the 1-D
 * demo and ≤ 20 s on the 2-D demos, medians on the project machine. Also one type-II maximum
 * likelihood fit on the 1-D demo (reported, no target). No scipy counterpart: the shortcut has none.
 * With 16 variances 'auto' factors per cell (src/core/tuning/evidenceMap.ts, EIGEN_BREAK_EVEN); the
 * forced-eigen crosshole case shows the shortcut's cost at that size for comparison.
 *
 * Picked up by test/bench/run.ts; `npx tsx test/bench/cases/tuning.ts` runs the list by itself
 * (one run each) and prints JSON.
 */
import { demoById } from '../../../src/core/problems/demos.ts';
import { evidenceMap, termLength } from '../../../src/core/tuning/evidenceMap.ts';
import { maximiseEvidence } from '../../../src/core/tuning/typeII.ts';
import type { BenchCase } from '../types.ts';

function mapCase(id: string, method: 'auto' | 'eigen' = 'auto'): BenchCase {
  return {
    name: `tuning evidence map 16×16, ${id}${method === 'eigen' ? ' (eigen shortcut forced)' : ''}`,
    runs: 5,
    warmup: 0,
    setup: () => {
      const { problem, startPrior } = demoById(id).build();
      const t = startPrior.terms[0];
      const l = termLength(t);
      return () =>
        evidenceMap(problem, startPrior, {
          term: 0,
          method,
          lengths: { min: 0.2 * l, max: 5 * l, count: 16 },
          variances: { min: 0.01 * t.variance, max: 100 * t.variance, count: 16 },
        });
    },
  };
}

export const cases: BenchCase[] = [
  mapCase('borehole-log'),
  mapCase('crosshole-tomography'),
  mapCase('potential-field'),
  mapCase('crosshole-tomography', 'eigen'),
  {
    name: 'tuning type-II ML fit, borehole-log (start prior, all hyperparameters)',
    runs: 5,
    warmup: 0,
    setup: () => {
      const { problem, startPrior } = demoById('borehole-log').build();
      return () => maximiseEvidence(problem, startPrior);
    },
  },
];

if (import.meta.url === `file://${process.argv[1]}`) {
  const out = cases.map((c) => {
    const fn = c.setup!();
    const t0 = performance.now();
    const r = fn() as {
      method?: string;
      best?: unknown;
      iterations?: number;
      converged?: boolean;
      logEvidence?: number;
      parameters?: { name: string; value: number; standardError: number }[];
    };
    const ms = performance.now() - t0;
    const parameters = r.parameters?.map((p) => ({ name: p.name, value: p.value, standardError: p.standardError }));
    return {
      name: c.name,
      ms: +ms.toFixed(1),
      method: r.method,
      best: r.best,
      iterations: r.iterations,
      converged: r.converged,
      logEvidence: typeof r.logEvidence === 'number' ? r.logEvidence : undefined,
      parameters,
    };
  });
  console.log(JSON.stringify(out, null, 1));
}
