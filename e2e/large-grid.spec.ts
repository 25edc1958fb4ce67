/**
 * The workbench on a grid the dense route cannot hold in a browser: 128 × 128 = 16 384 cells (a
 * dense Cm alone would be 2 GB) with 400 invented segment averages, loaded through the file picker.
 * Everything must arrive on the matrix-free routes: the posterior mean and bands (FFT path), the
 * positive-definiteness verdict from the certified spectrum bracket ('fft-bounds'), prior and
 * posterior realisations (circulant embedding, perturbation update) and an averaging kernel. The
 * drawn mean and std equal the core's FFT-path posterior computed here in Node. Times are reported
 * as annotations, not asserted (speed is checked by the benchmarks).
 */
import { expect, test } from '@playwright/test';
import { mkdtempSync, readFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { parseProblemFile } from '../src/core/io/problemFile.ts';
import { gridProblem } from '../src/core/problems/spec.ts';
import { prepareStructuredPosterior, structuredPosteriorStd } from '../src/core/inverse/structured.ts';
import { structuredResolutionRow } from '../src/core/inverse/structuredDraws.ts';
import { maxRelDiff, open, settle, state, traceValues, watch, writeSegmentProblem } from './helpers.ts';

const ORIGIN = 'http://127.0.0.1:' + (process.env.PRIORSCOPE_E2E_PORT ?? 4317);
const N = 128;
const M = 400;
const SEG = 32;

test('a 128 × 128 grid stays live: posterior, proven positive definite, realisations and an averaging kernel, all matrix-free', async ({
  page,
}, info) => {
  test.setTimeout(240_000);
  const w = watch(page, ORIGIN);
  const dir = mkdtempSync(join(tmpdir(), 'priorscope-large-'));
  const files = writeSegmentProblem(dir, {
    name: 'large',
    title: 'Segment averages over an invented 128 × 128 field',
    nx: N,
    ny: N,
    m: M,
    seg: SEG,
    seed: 977,
    noise: 0.02,
    sigma: 0.02,
    truth: (i, j) => Math.sin(i / 9) * Math.cos(j / 13) + 0.2 * Math.sin((i + 2 * j) / 7),
  });
  await open(page);

  const t0 = Date.now();
  await page.getByTestId('load-files-input').setInputFiles([files.json, files.mtx]);
  await expect.poll(async () => (await state(page)).problemVersion, { timeout: 60_000 }).toBeGreaterThan(1);
  const s = await settle(page);
  const tPosterior = Date.now() - t0;
  expect(s.errors).toEqual({});

  // Posterior maps: the mean and std the core computes on the FFT path for the same file and prior.
  await expect.poll(async () => (await traceValues(page, 'plot-posterior-std', 'std', 'z')).length, { timeout: 60_000 }).toBe(N);
  const meanZ = (await traceValues(page, 'plot-posterior-mean', 'mean', 'z')) as number[][];
  const stdZ = (await traceValues(page, 'plot-posterior-std', 'std', 'z')) as number[][];
  const text = readFileSync(files.json, 'utf8');
  const problem = gridProblem(parseProblemFile('large.json', text, { readSibling: () => readFileSync(files.mtx) }).problem, 'this test');
  const st = prepareStructuredPosterior(problem, s.prior);
  expect(maxRelDiff(meanZ.flat(), st.mean)).toBeLessThan(1e-9);
  expect(maxRelDiff(stdZ.flat(), structuredPosteriorStd(st))).toBeLessThan(1e-9);

  // An averaging kernel: click inside the mean map; the row equals the core's FFT-path row.
  const drag = page.locator('#plot-posterior-mean .nsewdrag').first();
  const box = (await drag.boundingBox())!;
  await page.mouse.click(box.x + box.width * 0.5, box.y + box.height * 0.5);
  await expect(page.getByTestId('plot-kernel')).toBeVisible({ timeout: 60_000 });
  await expect.poll(async () => (await state(page)).busy.resolution ?? true, { timeout: 60_000 }).toBe(false);
  const cell = (await state(page)).selectedCell!;
  await expect.poll(async () => ((await traceValues(page, 'plot-kernel', 'R row', 'z')) as number[][]).length, { timeout: 30_000 }).toBe(N);
  const kernel = (await traceValues(page, 'plot-kernel', 'R row', 'z')) as number[][];
  expect(maxRelDiff(kernel.flat(), structuredResolutionRow(st, cell))).toBeLessThan(1e-9);

  // Positive definiteness from the FFT embedding's certified bracket (no Cholesky of a 2 GB matrix).
  await expect.poll(async () => (await state(page)).diagnostics !== null, { timeout: 60_000 }).toBe(true);
  const diag = (await state(page)).diagnostics as unknown as { positiveDefinite: boolean; eigenvalueMethod: string };
  expect(diag.eigenvalueMethod).toBe('fft-bounds');
  expect(diag.positiveDefinite).toBe(true);
  await expect(page.getByTestId('pd-status')).toContainText('proven positive definite');
  const tDiagnostics = Date.now() - t0;

  // Realisations: six prior and six posterior draws on the full grid.
  const t1 = Date.now();
  await page.getByTestId('tab-realisations').click();
  await expect
    .poll(async () => ((await traceValues(page, 'plot-prior-draws', 'draw 6', 'z')) as number[][]).length, { timeout: 90_000 })
    .toBe(N);
  await expect
    .poll(async () => ((await traceValues(page, 'plot-posterior-draws', 'draw 6', 'z')) as number[][]).length, { timeout: 90_000 })
    .toBe(N);
  const tDraws = Date.now() - t1;
  expect((await state(page)).errors).toEqual({});

  info.annotations.push({
    type: 'timing',
    description: `posterior ${tPosterior} ms, diagnostics by ${tDiagnostics} ms, realisations ${tDraws} ms after the tab opened`,
  });
  expect(w.problems).toEqual([]);
  expect(w.foreign).toEqual([]);
});
