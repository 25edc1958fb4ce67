/**
 * Benchmark (not a timed test): the FFT routes against the dense ones.
 *   - diagnostics: dense (src/core/prior/diagnostics.ts diagnosePrior: Cholesky + eigenvalues +
 *     jitter search) vs FFT bounds (src/core/prior/structuredDiagnostics.ts) from N = 256 up;
 *   - one posterior draw and one resolution row on the FFT path (src/core/inverse/structuredDraws.ts)
 *     at 64² and 128² with M = 400 ray data (the problem and prior of ./cases/fft.ts), after the
 *     factorisation (prepareStructuredPosterior, timed separately).
 * Run: npx tsx test/bench/structuredDiagnostics.ts [--no-dense]. Prints JSON (median of `reps` runs,
 * milliseconds). The dense diagnostics stop at 48² (2.9 s measured; 128² would need a 2 GB matrix).
 */
import { diagnosePrior } from '../../src/core/prior/diagnostics.ts';
import { diagnoseStructured } from '../../src/core/prior/structuredDiagnostics.ts';
import { prepareStructuredPosterior } from '../../src/core/inverse/structured.ts';
import { structuredPosteriorDraws, structuredResolutionRow } from '../../src/core/inverse/structuredDraws.ts';
import type { Grid } from '../../src/core/grid/grid.ts';
import { benchPrior, benchProblem } from './cases/fft.ts';

function median(f: () => void, reps: number): number {
  const t: number[] = [];
  for (let r = 0; r < reps; r++) {
    const t0 = performance.now();
    f();
    t.push(performance.now() - t0);
  }
  t.sort((a, b) => a - b);
  return t[Math.floor(t.length / 2)];
}

const noDense = process.argv.includes('--no-dense');
const out: Record<string, unknown>[] = [];
for (const side of [16, 20, 24, 32, 48, 64, 128]) {
  const grid: Grid = { shape: [side, side], spacing: [1, 1] };
  const prior = { ...benchPrior(side), nugget: 1e-4 };
  const row: Record<string, unknown> = { diagnostics: `${side}²`, n: side * side };
  row.fftMs = median(() => diagnoseStructured(grid, prior), side >= 64 ? 3 : 5);
  const d = diagnoseStructured(grid, prior);
  row.fftPositiveDefinite = d.positiveDefinite;
  row.fftBounds = d.eigenvalueBounds;
  row.padding = d.embeddingPadding;
  if (!noDense && side <= 48) {
    row.denseMs = median(() => diagnosePrior(grid, prior), side >= 32 ? 1 : 3);
    row.densePositiveDefinite = diagnosePrior(grid, prior).positiveDefinite;
  }
  out.push(row);
}
for (const side of [64, 128]) {
  const problem = benchProblem(side);
  const prior = benchPrior(side);
  const t0 = performance.now();
  const st = prepareStructuredPosterior(problem, prior);
  const prepareMs = performance.now() - t0;
  out.push({
    posterior: `${side}²`,
    m: problem.data.values.length,
    prepareMs,
    oneDrawMs: median(() => structuredPosteriorDraws(st, 1, 1), 5),
    oneResolutionRowMs: median(() => structuredResolutionRow(st, (side * side) >> 1), 5),
  });
}
console.log(JSON.stringify(out, null, 1));
