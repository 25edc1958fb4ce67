/**
 * The workbench's calibration (chunked in the worker) and the command line's `calibrate` draw the same
 * replicates for the same seed: replicate r from the stream replicateSeed(seed, r). The per-replicate
 * coverages agree exactly, the overall coverages to round-off (the worker merges chunk averages), and the
 * rank histograms exactly; the cross-calibration table equals `calibrate`'s coverage tables.
 */
import { describe, expect, it } from 'vitest';
import { writeProblemFile } from '../../src/core/io/problemFile.ts';
import { writePriorFile } from '../../src/core/io/priorFile.ts';
import type { PriorSpec } from '../../src/core/prior/spec.ts';
import { runTuning } from '../../src/worker/tuning.ts';
import { runCommand, tempDir, writeFiles } from '../cli/run.ts';
import { smallProblem } from '../core/tuning/helpers.ts';

const prior: PriorSpec = { mean: { constant: 0 }, terms: [{ kernel: 'exponential', variance: 0.4, length: 5 }], nugget: 1e-4 };
const other: PriorSpec = { mean: { constant: 0 }, terms: [{ kernel: 'gaussian', variance: 0.2, length: 3 }], nugget: 1e-3 };
const problem = smallProblem(77, prior, 25, 10, 0.1);

describe('workbench and command line: the same calibration for the same seed', () => {
  const dir = tempDir();
  writeFiles(dir, { 'p.json': writeProblemFile(problem, 'inline').json, 'q.json': writePriorFile(prior), 'o.json': writePriorFile(other) });

  it("self-calibration: 23 replicates in the worker's chunks vs calibrate --replicates 23", async () => {
    const w = await runTuning<'calibration'>(
      problem,
      { id: 1, kind: 'calibration', problemVersion: 0, prior, replicates: 23, draws: 5, seed: 31 },
      () => {},
      { aborted: false },
    );
    const r = await runCommand(
      ['calibrate', '--problem', 'p.json', '--prior', 'q.json', '--replicates', '23', '--seed', '31', '--draws', '5'],
      dir,
    );
    expect(r.code, r.err).toBe(0);
    const c = (
      JSON.parse(r.out) as {
        results: {
          coverage68: number;
          coverage95: number;
          replicateCoverage68: number[];
          replicateCoverage95: number[];
          rankHistogram: number[];
        }[];
      }
    ).results[0];
    expect(Array.from(w.replicateCoverage68)).toEqual(c.replicateCoverage68);
    expect(Array.from(w.replicateCoverage95)).toEqual(c.replicateCoverage95);
    expect(Array.from(w.rankHistogram)).toEqual(c.rankHistogram);
    expect(w.coverage68).toBeCloseTo(c.coverage68, 12);
    expect(w.coverage95).toBeCloseTo(c.coverage95, 12);
  });

  it('cross-calibration of two priors vs calibrate with two prior files', async () => {
    const w = await runTuning<'crossCalibration'>(
      problem,
      { id: 2, kind: 'crossCalibration', problemVersion: 0, priors: [prior, other], replicates: 6, draws: 3, seed: 8 },
      () => {},
      { aborted: false },
    );
    const r = await runCommand(
      ['calibrate', '--problem', 'p.json', '--prior', 'q.json', 'o.json', '--replicates', '6', '--seed', '8', '--draws', '3'],
      dir,
    );
    expect(r.code, r.err).toBe(0);
    const j = JSON.parse(r.out) as { coverage68Table: number[][]; coverage95Table: number[][] };
    expect(Array.from(w.coverage68)).toEqual(j.coverage68Table.flat());
    expect(Array.from(w.coverage95)).toEqual(j.coverage95Table.flat());
  });
});
