/**
 * Progressive posterior in the browser: for a problem whose bands take a while (a generated 2-D
 * problem, 40 × 36 cells and 700 segment averages, FFT path: about 0.3 s for the mean and 0.5 s
 * more for the bands in Node), the posterior mean map is drawn while the status still says the
 * bands are computing, and the standard-deviation map follows. The drawn partial mean must equal
 * the final one exactly and match the core's posterior computed here in Node.
 * e2e/large-grid.spec.ts runs the whole workbench on a 128 × 128 grid.
 */
import { expect, test, type Page } from '@playwright/test';
import { mkdtempSync, readFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { parseProblemFile } from '../src/core/io/problemFile.ts';
import { gridProblem } from '../src/core/problems/spec.ts';
import { prepareStructuredPosterior } from '../src/core/inverse/structured.ts';
import { maxRelDiff, open, settle, state, traceValues, watch, writeSegmentProblem } from './helpers.ts';

const ORIGIN = 'http://127.0.0.1:' + (process.env.PRIORSCOPE_E2E_PORT ?? 4317);
const NX = 40;
const NY = 36;
const M = 700;
const SEG = 8;
const COMPUTING = 'Uncertainty bands: computing…';

/**
 * Resolves (polling every animation frame) with the mean map's rows once it is drawn, differs
 * from `previous` and the bands status says "computing" with no standard-deviation map on screen.
 */
function meanWhileComputing(page: Page, previous: number[][] | null) {
  return page.waitForFunction(
    ([text, prev]) => {
      const status = document.querySelector('[data-testid="bands-status"]');
      if (status?.textContent !== text || document.getElementById('plot-posterior-std')) return null;
      // Checked in the same frame as the mean: on a fast machine the bands may follow a frame later.
      if (!document.querySelector('[data-testid="bands-pending"]')?.textContent?.includes(text)) return null;
      const gd = document.getElementById('plot-posterior-mean') as unknown as {
        data?: { name?: string; z?: ArrayLike<number>[] }[];
      } | null;
      const z = gd?.data?.find((d) => d.name === 'mean')?.z;
      if (!z || z.length === 0) return null;
      const rows = Array.from(z, (r) => Array.from(r));
      if (prev && JSON.stringify(rows) === JSON.stringify(prev)) return null;
      return rows;
    },
    [COMPUTING, previous] as const,
    { polling: 'raf', timeout: 45_000 },
  );
}

test('the posterior mean is drawn while the bands are computing, and the bands follow', async ({ page }) => {
  test.setTimeout(120_000);
  const w = watch(page, ORIGIN);
  const dir = mkdtempSync(join(tmpdir(), 'priorscope-progressive-'));
  const files = writeSegmentProblem(dir, {
    name: 'progressive',
    title: 'Segment averages over an invented field',
    nx: NX,
    ny: NY,
    m: M,
    seg: SEG,
    seed: 20240611,
    noise: 0.05,
    sigma: 0.05,
    truth: (i, j) => Math.sin(i / 5) * Math.cos(j / 7) + 0.3 * Math.sin((i + j) / 3),
  });
  await open(page);

  // 1. A new problem: no earlier result on this grid, so a mean drawn now is the partial one.
  const seen = meanWhileComputing(page, null);
  await page.getByTestId('load-files-input').setInputFiles([files.json, files.mtx]);
  const partialZ = (await (await seen).jsonValue()) as number[][];
  expect(partialZ).toHaveLength(NY);
  expect(partialZ[0]).toHaveLength(NX);

  // The bands arrive: the status goes, the std map is drawn, the mean is the one already shown.
  const done = await settle(page);
  await expect(page.getByTestId('bands-status')).toHaveCount(0);
  await expect.poll(async () => (await traceValues(page, 'plot-posterior-std', 'std', 'z')).length, { timeout: 20_000 }).toBe(NY);
  const finalZ = (await traceValues(page, 'plot-posterior-mean', 'mean', 'z')) as number[][];
  expect(finalZ).toEqual(partialZ);
  expect(done.errors).toEqual({});

  // Independent of the worker: the core's FFT-path posterior mean of the same file and prior, in Node.
  const text = readFileSync(files.json, 'utf8');
  const problem = gridProblem(
    parseProblemFile('progressive.json', text, { readSibling: () => readFileSync(files.mtx) }).problem,
    'this test',
  );
  const mean = prepareStructuredPosterior(problem, done.prior).mean;
  expect(maxRelDiff(partialZ.flat(), mean)).toBeLessThan(1e-9);

  // 2. A prior edit: the earlier complete result is on screen; the new mean replaces it before its bands.
  const seen2 = meanWhileComputing(page, finalZ);
  const input = page.getByTestId('term-0-length-input');
  await input.fill('2.5');
  await input.press('Enter');
  const partialZ2 = (await (await seen2).jsonValue()) as number[][];
  const after = await settle(page);
  expect(after.prior.terms[0].length).toBe(2.5);
  await expect(page.getByTestId('bands-status')).toHaveCount(0);
  await expect.poll(async () => (await traceValues(page, 'plot-posterior-std', 'std', 'z')).length, { timeout: 20_000 }).toBe(NY);
  expect(await traceValues(page, 'plot-posterior-mean', 'mean', 'z')).toEqual(partialZ2);
  expect((await state(page)).errors).toEqual({});
  expect(w.problems).toEqual([]);
  expect(w.foreign).toEqual([]);
});
