/**
 * The export files read by numpy (np.load, np.loadtxt): shapes, dtype and every value, for a 2-D
 * grid (x, y columns) — plus the prior export reading back to the same spec through priorFile.ts.
 */
import { describe, expect, it } from 'vitest';
import {
  covarianceNpy,
  drawsCsv,
  drawsGridFile,
  gridFile,
  drawsName,
  drawsNpy,
  joinParts,
  fileStem,
  plotFileName,
  posteriorCsv,
  posteriorNpy,
  priorExport,
} from '../../src/app/session/exports.ts';
import { parsePriorFile } from '../../src/core/io/priorFile.ts';
import { writeNpy } from '../../src/core/io/npy.ts';
import { writeCsv } from '../../src/core/io/csv.ts';
import { matrix } from '../../src/core/linalg/matrix.ts';
import type { PosteriorSummary } from '../../src/core/inverse/types.ts';
import { runPython } from './python.ts';

const grid = { shape: [3, 2], spacing: [2, 0.5], origin: [10, -1] };
const mean = Float64Array.from([1.25, -2, 3e-7, 4, 5.5, 1 / 3]);
const std = Float64Array.from([0.1, 0.2, 0.3, 0.4, 0.5, 0.6]);
const summary = { mean, std } as unknown as PosteriorSummary;
const draws = matrix(2, 6, Float64Array.from([1, 2, 3, 4, 5, 6, -1, -2, -3, -4, -5, Math.PI]));

describe('exports read by numpy', () => {
  it('posterior and draws as .npy and .csv', () => {
    const b64 = (u: Uint8Array) => Buffer.from(u).toString('base64');
    const txt = (u: Uint8Array) => new TextDecoder().decode(u);
    const ref = runPython<{
      npy: Record<string, { shape: number[]; dtype: string; values: number[] }>;
      csv: Record<string, { header: string[]; shape: number[]; values: number[] }>;
    }>('exports_reference.py', {
      npy: { post: b64(posteriorNpy(summary).bytes), draws: b64(joinParts(drawsNpy(draws, 'base', 5))) },
      csv: { post: txt(posteriorCsv(grid, summary).bytes), draws: txt(joinParts(drawsCsv(draws, 'base', 5))) },
    });
    // cell k sits at x = 10 + 2·(k mod 3), y = −1 + 0.5·floor(k / 3) (x fastest)
    const xs = [10, 12, 14, 10, 12, 14];
    const ys = [-1, -1, -1, -0.5, -0.5, -0.5];
    expect(ref.npy.post).toEqual({ shape: [6, 2], dtype: 'float64', values: Array.from(mean).flatMap((m, k) => [m, std[k]]) });
    // Realisations as the command line writes them: draws × cells (K × N), row k = draw k.
    expect(ref.npy.draws).toEqual({ shape: [2, 6], dtype: 'float64', values: Array.from(draws.data) });
    expect(ref.csv.post!.header).toEqual(['x', 'y', 'mean', 'std']);
    expect(ref.csv.post!.values).toEqual(xs.flatMap((x, k) => [x, ys[k], mean[k], std[k]]));
    expect(ref.csv.draws).toEqual({ header: [], shape: [2, 6], values: Array.from(draws.data) });
  });

  it("realisations are written in parts of whole rows that join to the one-piece writers' bytes", () => {
    const big = matrix(
      7,
      5,
      Float64Array.from({ length: 35 }, (_, k) => Math.sin(k) * 10 ** (k % 9)),
    );
    for (const per of [1, 5, 12, 35, 1000]) {
      const npy = drawsNpy(big, 'b', per);
      const csv = drawsCsv(big, 'b', per);
      const rowsPer = Math.max(1, Math.floor(per / 5));
      expect(npy.parts.length).toBe(1 + Math.ceil(7 / rowsPer));
      expect(csv.parts.length).toBe(Math.ceil(7 / rowsPer));
      expect(joinParts(npy)).toEqual(writeNpy([7, 5], big.data));
      expect(new TextDecoder().decode(joinParts(csv))).toBe(writeCsv(big));
    }
  });

  it('the realisations carry the grid, seed and layout beside them, under names from the problem title', () => {
    const base = drawsName('Gravity profile over a buried basin', 'prior', 2);
    expect(base).toBe('gravity-profile-over-a-buried-basin-prior-realisations-2');
    const f = drawsGridFile({ ...grid, unit: 'm', axes: ['x', 'depth'] }, draws, 'prior', 7, base, 'Gravity profile');
    expect(f.name).toBe(`${base}.grid.json`);
    const rec = JSON.parse(new TextDecoder().decode(f.bytes));
    expect(rec).toMatchObject({
      kind: 'priorscope.realisations',
      which: 'prior',
      count: 2,
      seed: 7,
      files: [`${base}.npy`, `${base}.csv`],
    });
    expect(rec.grid).toEqual({ shape: [3, 2], spacing: [2, 0.5], origin: [10, -1], unit: 'm', axes: ['x', 'depth'] });
    expect(rec.layout).toContain('x fastest');
    expect(() => drawsGridFile({ shape: [5], spacing: [1] }, draws, 'prior', 7, base, 't')).toThrow(RangeError);
  });

  it('file names come from titles, never internal ids, and repeat-safe on one screen', () => {
    expect(fileStem('Crosshole travel-time tomography')).toBe('crosshole-travel-time-tomography');
    expect(fileStem('Température à 3 m — été')).toBe('temperature-a-3-m-ete');
    expect(fileStem('∑∑∑')).toBe('problem');
    const used = new Set<string>();
    expect(plotFileName('Borehole log', 'Normalised residuals (d − G m̃)/σ', used)).toBe('borehole-log--normalised-residuals-d-g-m');
    expect(plotFileName('Borehole log', 'Normalised residuals (d − G m̃)/σ', used)).toBe('borehole-log--normalised-residuals-d-g-m-2');
    expect(plotFileName('', 'Data<br><sub>x</sub>', used)).toBe('problem--data-x');
  });

  it('the prior file reads back to the same spec', () => {
    const prior = {
      mean: { constant: 0.5 },
      terms: [{ kernel: 'matern' as const, variance: 2, lengths: [3, 1] as const, angle: 15, nu: 0.5 }],
      nugget: 1e-6,
    };
    const f = priorExport(prior);
    expect(f.name).toBe('prior.json');
    expect(parsePriorFile('prior.json', f.bytes).prior).toEqual(prior);
  });

  it('the dense Cm and its Cholesky factor as .npy: numpy reads them, numpy.linalg.cholesky agrees, the grid beside them', async () => {
    const { covarianceMatrix } = await import('../../src/core/prior/covariance.ts');
    const { cholesky } = await import('../../src/core/linalg/cholesky.ts');
    const g = { shape: [6, 5], spacing: [1, 2], origin: [0.5, 1], unit: 'm' };
    const prior = { mean: { constant: 0 }, terms: [{ kernel: 'exponential' as const, variance: 2, length: 3 }], nugget: 1e-3 };
    const cm = covarianceMatrix(g, prior);
    const f = cholesky(cm);
    if (!f.ok) throw new Error('test prior must factor');
    const a = covarianceNpy(cm, 'covariance', 'Trench (invented)');
    const b = covarianceNpy(f.factor, 'cholesky', 'Trench (invented)');
    expect([a.name, b.name]).toEqual(['trench-invented-prior-covariance-30.npy', 'trench-invented-prior-cholesky-factor-30.npy']);
    const b64 = (u: Uint8Array) => Buffer.from(u).toString('base64');
    const ref = runPython<{ shapes: number[][]; dtype: string; factorDiff: number; productDiff: number; upperMax: number }>(
      'covariance_export.py',
      { cm: b64(a.bytes), L: b64(b.bytes) },
    );
    expect(ref.shapes).toEqual([
      [30, 30],
      [30, 30],
    ]);
    expect(ref.dtype).toBe('float64');
    // Both factorisations in double precision of a matrix with κ ≈ 1e3: agreement far below 1e-10 (round-off, common practice, no source).
    expect(ref.factorDiff).toBeLessThan(1e-12);
    expect(ref.productDiff).toBeLessThan(1e-13);
    expect(ref.upperMax).toBe(0);
    const side = JSON.parse(new TextDecoder().decode(gridFile(g, b.name, 'Trench').bytes));
    expect(side).toMatchObject({
      kind: 'priorscope.grid',
      file: b.name,
      grid: { shape: [6, 5], spacing: [1, 2], origin: [0.5, 1], unit: 'm' },
    });
    expect(gridFile(g, b.name, 'Trench').name).toBe('trench-invented-prior-cholesky-factor-30.grid.json');
  });
});
