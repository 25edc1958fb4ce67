/**
 * Benchmark (not a timed test) of prior selection on large grids: `npx tsx test/bench/tuningScale.ts
 * [n …] [--runs k] [--dense]`. For each n: the bench problem of test/bench/cases/fft.ts
 * (benchProblem(n), M = 400 straight rays; benchPrior(n), Matérn ν = 1.5, length n/8) and
 *   - P = G Cm Gᵀ on both routes (cold and with cached spectra);
 *   - a 16 × 16 evidence map (term 0, lengths ×0.2 … ×5, variances ×0.01 … ×100; 'auto' method);
 *   - one type-II evaluation (log evidence + gradient in variance and length, ν held fixed) and,
 *     on the FFT route, the whole fit from benchPrior (at most 100 iterations);
 *   - candidate scoring of 2 candidates with 6 draws (src/worker/tuning.ts scoreCandidates);
 *   - a calibration of 20 replicates × 9 draws.
 * Prints JSON with wall-clock medians (ms) of `runs` runs (default 3; 1 for the slow cases). With
 * --dense the dense route is timed too where it fits (n ≤ 64: 134 MB per Cm).
 */
import { benchPrior, benchProblem } from './cases/fft.ts';
import { patchTerm } from '../../src/core/kernels/spec.ts';
import { structuredProblem } from '../../src/core/inverse/structured.ts';
import type { PriorSpec } from '../../src/core/prior/spec.ts';
import type { Problem } from '../../src/core/problems/spec.ts';
import { calibrate } from '../../src/core/tuning/calibration.ts';
import { prepareDataSide, projectedPriorCovariance, type TuningRoute } from '../../src/core/tuning/dataSpace.ts';
import { evidenceMap } from '../../src/core/tuning/evidenceMap.ts';
import { evidenceGradient, hyperParameters, logEvidence, maximiseEvidence } from '../../src/core/tuning/typeII.ts';
import { leaveOneOut, priorPredictiveCheck } from '../../src/core/tuning/criteria.ts';
import { posteriorRealisations, posteriorSummary, preparePosterior } from '../../src/core/inverse/posterior.ts';
import { scoreCandidates } from '../../src/worker/tuning.ts';

/** ν held fixed when the kernel module offers it as a parameter. */
function fixedNu(prior: PriorSpec): string[] {
  return hyperParameters(prior).some((h) => h.name === 'terms[0].nu') ? ['terms[0].nu'] : [];
}

function median(xs: number[]): number {
  const s = [...xs].sort((a, b) => a - b);
  return s[Math.floor(s.length / 2)];
}

async function time(runs: number, f: () => unknown): Promise<number> {
  const t: number[] = [];
  for (let r = 0; r < runs; r++) {
    const t0 = performance.now();
    await f();
    t.push(performance.now() - t0);
  }
  return +median(t).toFixed(1);
}

async function measure(n: number, runs: number, routes: TuningRoute[]): Promise<Record<string, unknown>> {
  const problem: Problem = benchProblem(n);
  const prior: PriorSpec = benchPrior(n);
  const out: Record<string, unknown> = { n, cells: n * n, data: problem.data.values.length };
  const l = n / 8;
  for (const route of routes) {
    const r: Record<string, number | string | boolean> = {};
    r.projectionCold = await time(runs, () => projectedPriorCovariance(problem, prior, { route }));
    const holder = structuredProblem(problem);
    projectedPriorCovariance(problem, prior, { route, structured: holder });
    r.projectionCached = await time(runs, () => projectedPriorCovariance(problem, prior, { route, structured: holder }));
    let best = '';
    r.evidenceMap16x16 = await time(1, () => {
      const m = evidenceMap(problem, prior, {
        term: 0,
        route,
        lengths: { min: 0.2 * l, max: 5 * l, count: 16 },
        variances: { min: 0.01, max: 100, count: 16 },
      });
      best = `length ${m.best!.length.toFixed(3)}, variance ${m.best!.variance.toFixed(4)}`;
    });
    r.evidenceMapBest = best;
    const params = hyperParameters(prior, { fixed: fixedNu(prior) });
    const side = prepareDataSide(problem, { route });
    r.typeIIPerEvaluation = await time(runs, () => evidenceGradient(problem, prior, params, side));
    let fit = '';
    // The full fit on the dense route at 64² would take minutes (see typeIIPerEvaluation).
    if (route === 'fft')
      r.typeII = await time(1, () => {
        const f = maximiseEvidence(problem, prior, { route, fixed: fixedNu(prior), maxIterations: 100 });
        fit = `${f.iterations} iterations, ${f.evaluations} evaluations, converged ${f.converged}`;
      });
    if (fit !== '') r.typeIIDetail = fit;
    process.stderr.write(`${n} ${route}: map and type-II done\n`);
    const other: PriorSpec = { ...prior, terms: [patchTerm(prior.terms[0], { length: l / 2 })] };
    if (route === 'fft') {
      r.candidates2x6draws = await time(1, () => scoreCandidates(problem, [prior, other], 6, 1, () => {}, { aborted: false }));
    } else {
      // The dense recipe scoreCandidates ran before the FFT route (without the condition number).
      r.candidates2x6draws = await time(1, () => {
        for (const c of [prior, other]) {
          const state = preparePosterior(problem, c);
          posteriorSummary(state);
          priorPredictiveCheck(problem, c, { route });
          logEvidence(problem, c, { route });
          leaveOneOut(problem, c, { route });
          posteriorRealisations(state, 6, 1);
        }
      });
    }
    r.calibration20x9 = await time(1, () =>
      calibrate(problem, { ...prior, nugget: 1e-6 }, { ...prior, nugget: 1e-6 }, { replicates: 20, draws: 9, seed: 3, route }),
    );
    out[route] = r;
  }
  return out;
}

async function main(): Promise<void> {
  const args = process.argv.slice(2);
  const k = args.indexOf('--runs');
  const runs = k >= 0 ? Number(args[k + 1]) : 3;
  const dense = args.includes('--dense');
  const sizes = args.filter((a, i) => /^\d+$/.test(a) && args[i - 1] !== '--runs').map(Number);
  const res = [];
  for (const n of sizes.length > 0 ? sizes : [64, 128]) res.push(await measure(n, runs, dense && n <= 64 ? ['fft', 'dense'] : ['fft']));
  console.log(JSON.stringify({ date: new Date().toISOString(), node: process.version, results: res }, null, 1));
}

void main();
