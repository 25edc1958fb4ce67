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
import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { parseProblemFile } from '../src/core/io/problemFile.ts';
import { prepareStructuredPosterior, structuredPosteriorStd } from '../src/core/inverse/structured.ts';
import { structuredResolutionRow } from '../src/core/inverse/structuredDraws.ts';
import { maxRelDiff, open, settle, state, traceValues, watch } from './helpers.ts';

const ORIGIN = 'http://127.0.0.1:' + (process.env.PRIORSCOPE_E2E_PORT ?? 4317);
const N = 128;
const M = 400;
const SEG = 32;

/** An invented field seen through M averages over 32-cell segments along x or y (seeded). */
function writeProblem(dir: string): { json: string; mtx: string } {
  let seed = 977;
  const rnd = () => (seed = (Math.imul(seed, 1103515245) + 12345) >>> 0) / 2 ** 32;
  const truth = (i: number, j: number) => Math.sin(i / 9) * Math.cos(j / 13) + 0.2 * Math.sin((i + 2 * j) / 7);
  const lines: string[] = [];
  const values: number[] = [];
  for (let k = 0; k < M; k++) {
    const alongX = k % 2 === 0;
    const i0 = Math.floor(rnd() * (N - (alongX ? SEG : 0)));
    const j0 = Math.floor(rnd() * (N - (alongX ? 0 : SEG)));
    let d = 0;
    for (let t = 0; t < SEG; t++) {
      const i = alongX ? i0 + t : i0;
      const j = alongX ? j0 : j0 + t;
      lines.push(`${k + 1} ${j * N + i + 1} ${1 / SEG}`);
      d += truth(i, j) / SEG;
    }
    values.push(Number((d + 0.02 * (rnd() - 0.5)).toFixed(6)));
  }
  const mtx = join(dir, 'Glarge.mtx');
  writeFileSync(mtx, `%%MatrixMarket matrix coordinate real general\n% invented segment averages\n${M} ${N * N} ${lines.length}\n${lines.join('\n')}\n`);
  const json = join(dir, 'large.json');
  writeFileSync(
    json,
    JSON.stringify({
      kind: 'priorscope.problem',
      version: 1,
      title: 'Segment averages over an invented 128 × 128 field',
      grid: { shape: [N, N], spacing: [1, 1], unit: 'm' },
      operator: { file: 'Glarge.mtx' },
      data: { values, sigma: values.map(() => 0.02) },
    }),
  );
  return { json, mtx };
}

test('a 128 × 128 grid stays live: posterior, proven positive definite, realisations and an averaging kernel, all matrix-free', async ({ page }, info) => {
  test.setTimeout(240_000);
  const w = watch(page, ORIGIN);
  const dir = mkdtempSync(join(tmpdir(), 'priorscope-large-'));
  const files = writeProblem(dir);
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
  const problem = parseProblemFile('large.json', text, { readSibling: () => readFileSync(files.mtx) }).problem;
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
  await expect.poll(async () => ((await traceValues(page, 'plot-prior-draws', 'draw 6', 'z')) as number[][]).length, { timeout: 90_000 }).toBe(N);
  await expect.poll(async () => ((await traceValues(page, 'plot-posterior-draws', 'draw 6', 'z')) as number[][]).length, { timeout: 90_000 }).toBe(N);
  const tDraws = Date.now() - t1;
  expect((await state(page)).errors).toEqual({});

  info.annotations.push({ type: 'timing', description: `posterior ${tPosterior} ms, diagnostics by ${tDiagnostics} ms, realisations ${tDraws} ms after the tab opened` });
  expect(w.problems).toEqual([]);
  expect(w.foreign).toEqual([]);
});
