/**
 * Cell-list problems (the user's own mesh, by its cell centres) in the workbench. Two invented surveys:
 *   - 2-D: 160 cells of an irregular, locally refined plan-view mesh of an aquifer, 12 head wells, each datum a weighted average of
 *     the cells near its well; centres inline in the problem file;
 *   - 3-D: 360 cells of a made-up refined mesh under 10 surface stations, centres in a sibling .npy written by numpy.
 * The cells screen shows a map of centres (2-D) or three slabs through the cloud (3-D) whose colours equal the core's
 * dense posterior (computed here in Node from the same files and the page's prior); sliders move the slabs and choose
 * the nearest cell; the CSV export reads back in numpy with the centres in file order.
 */
import { execFileSync } from 'node:child_process';
import { mkdirSync, readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { expect, type Page, test } from '@playwright/test';
import { computePosteriorSerial } from '../src/core/inverse/compute.ts';
import { parseProblemFile } from '../src/core/io/problemFile.ts';
import { meanVector } from '../src/core/prior/covariance.ts';
import { maxRelDiff, screenshot, settle, state } from './helpers.ts';

/**
 * A deterministic irregular mesh's centres: a lattice of `counts` cells over `size`, each centre moved by up to 30 %
 * of its cell (a sine hash, no randomness), and the cells of the first axis's first third split in two along it
 * (a locally refined mesh). Rounded to 4 decimals.
 */
function cloud(counts: number[], size: number[]): number[][] {
  const out: number[][] = [];
  const total = counts.reduce((a, b) => a * b, 1);
  for (let i = 0; i < total; i++) {
    const idx = counts.map((_, k) => Math.floor(i / counts.slice(0, k).reduce((a, b) => a * b, 1)) % counts[k]);
    const h = size.map((s, k) => s / counts[k]);
    const at = (shift: number) =>
      idx.map((j, k) =>
        Number(((j + 0.5 + shift * (k === 0 ? 1 : 0)) * h[k] + 0.3 * h[k] * Math.sin(12.9898 * i + 78.233 * k)).toFixed(4)),
      );
    if (idx[0] < counts[0] / 3) out.push(at(-0.25), at(0.25));
    else out.push(at(0));
  }
  return out;
}

function survey(centres: number[][], stations: number[][], reach: number) {
  const dense = stations.map((s) =>
    centres.map((c) => Number(Math.exp(-c.reduce((a, v, k) => a + (v - s[k]) ** 2, 0) / (reach * reach)).toPrecision(6))),
  );
  const values = stations.map((_, k) => Number((2 + 0.8 * Math.sin(0.9 * k)).toFixed(4)));
  return { dense, values };
}

function writeProblems(dir: string) {
  mkdirSync(dir, { recursive: true });
  const c2 = cloud([12, 10], [2000, 1200]);
  const wells = Array.from({ length: 12 }, (_, k) => [150 + ((k * 331) % 1700), 100 + ((k * 457) % 1000)]);
  const s2 = survey(c2, wells, 150);
  const p2 = {
    kind: 'priorscope.problem',
    version: 1,
    title: 'Invented aquifer mesh, 12 head wells',
    cells: { centres: c2, unit: 'm', axes: ['east', 'north'] },
    operator: { dense: s2.dense },
    data: { values: s2.values, sigma: wells.map(() => 0.05), unit: 'm', positions: wells },
    quantity: { name: 'head', unit: 'm' },
  };
  writeFileSync(join(dir, 'aquifer.json'), JSON.stringify(p2));
  const c3 = cloud([9, 6, 5], [40, 30, 20]);
  const stations = Array.from({ length: 10 }, (_, k) => [4 + ((k * 13) % 34), 3 + ((k * 7) % 25), -2]);
  const s3 = survey(c3, stations, 12);
  const p3 = {
    kind: 'priorscope.problem',
    version: 1,
    title: 'Invented refined mesh under 10 stations',
    cells: { centres: 'mesh-centres.npy', unit: 'm', axes: ['east', 'north', 'depth'] },
    operator: { dense: s3.dense },
    data: { values: s3.values, sigma: stations.map(() => 0.05), positions: stations },
  };
  writeFileSync(join(dir, 'mesh3d.json'), JSON.stringify(p3));
  execFileSync('/usr/bin/python3', [
    '-c',
    'import json, sys, numpy as np; np.save(sys.argv[1], np.asarray(json.loads(sys.argv[2]), dtype="<f8"))',
    join(dir, 'mesh-centres.npy'),
    JSON.stringify(c3),
  ]);
  return { two: join(dir, 'aquifer.json'), three: [join(dir, 'mesh3d.json'), join(dir, 'mesh-centres.npy')], n2: c2.length, n3: c3.length };
}

/** The first trace of a plot: marker colours and the cell of each marker. */
function markers(page: Page, id: string) {
  return page.evaluate((plot) => {
    const el = document.querySelector(`[data-testid="${plot}"] .js-plotly-plot`) ?? document.getElementById(plot);
    const d = (el as unknown as { data?: { marker?: { color?: number[] }; customdata?: number[] }[] })?.data?.[0];
    return d ? { colour: d.marker?.color ?? [], cell: d.customdata ?? [] } : null;
  }, id);
}

/**
 * The core's dense posterior mean as shown, from the same files and prior: as it is under a constant prior mean,
 * else minus the prior mean (the workbench's rule for signed fields, src/app/colourScales.ts signedView).
 */
function expectedPerturbation(files: string[], prior: Parameters<typeof meanVector>[1]): Float64Array {
  const byName = new Map(files.map((f) => [f.split('/').pop()!, f]));
  const main = files[0];
  const problem = parseProblemFile(main, readFileSync(main, 'utf8'), { readSibling: (n) => readFileSync(byName.get(n)!) }).problem;
  const r = computePosteriorSerial(problem, prior);
  expect(r.decision.path).toBe('dense');
  const m0 = meanVector(problem.grid, prior);
  const constant = m0.every((v) => v === m0[0]);
  return r.summary.mean.map((v, i) => (constant ? v : v - m0[i]));
}

test('a 2-D cell list loads as a map of its centres coloured by the posterior, equal to the core', async ({ page }, info) => {
  test.setTimeout(120_000);
  const files = writeProblems(info.outputPath('files'));
  await page.goto('/');
  await expect(page.getByTestId('activity')).toHaveText('Up to date', { timeout: 45_000 });
  await page.getByTestId('load-files-input').setInputFiles([files.two]);
  await expect(page.getByTestId('screen-cells')).toBeVisible({ timeout: 45_000 });
  const s = await settle(page);
  await expect.poll(async () => (await markers(page, 'plot-cells-xy'))?.colour.length ?? 0, { timeout: 30_000 }).toBe(files.n2);
  const shown = (await markers(page, 'plot-cells-xy'))!;
  const want = expectedPerturbation([files.two], s.prior);
  expect(
    maxRelDiff(
      shown.colour,
      shown.cell.map((i) => want[i]),
    ),
  ).toBeLessThan(1e-9);
  await expect(page.getByText(`east–north (${files.n2} cells)`)).toBeVisible();
  await screenshot(page, info, 'cells-2d-mean');
  // The correlation with the chosen cell is 1 at that cell and below 1 elsewhere.
  await page.getByTestId('cells-field').selectOption('correlation');
  await expect.poll(async () => Math.max(...((await markers(page, 'plot-cells-xy'))?.colour ?? [0]))).toBeCloseTo(1, 12);
  const corr = (await markers(page, 'plot-cells-xy'))!;
  const chosen = Number((await page.getByTestId('cells-chosen').textContent())?.match(/chosen cell (\d+)/)?.[1]);
  expect(corr.colour[corr.cell.indexOf(chosen)]).toBeCloseTo(1, 12);
  await screenshot(page, info, 'cells-2d-correlation');
  // The report is drawn on a grid: its buttons are disabled for a cell list, and say why.
  await expect(page.getByTestId('report-open')).toBeDisabled();
  await expect(page.getByTestId('report-open')).toHaveAttribute('title', /regular grid/);
  // Export CSV: numpy reads the centres back in file order, with the posterior mean beside them.
  const [download] = await Promise.all([page.waitForEvent('download'), page.getByTestId('export-cells-csv').click()]);
  const saved = info.outputPath('cells.csv');
  await download.saveAs(saved);
  const back = JSON.parse(
    execFileSync(
      '/usr/bin/python3',
      ['-c', 'import sys, json, numpy as np; print(json.dumps(np.loadtxt(sys.argv[1], delimiter=",", skiprows=1).tolist()))', saved],
      {
        encoding: 'utf8',
      },
    ),
  ) as number[][];
  const file = JSON.parse(readFileSync(files.two, 'utf8')) as { cells: { centres: number[][] } };
  expect(back.map((r) => [r[0], r[1]])).toEqual(file.cells.centres);
});

test('a 3-D cell list (centres in a .npy) shows three slabs that follow the sliders', async ({ page }, info) => {
  test.setTimeout(120_000);
  const files = writeProblems(info.outputPath('files'));
  await page.goto('/');
  await expect(page.getByTestId('activity')).toHaveText('Up to date', { timeout: 45_000 });
  await page.getByTestId('load-files-input').setInputFiles(files.three);
  await expect(page.getByTestId('screen-cells')).toBeVisible({ timeout: 45_000 });
  const s = await settle(page);
  await expect.poll(async () => (await markers(page, 'plot-cells-xy'))?.colour.length ?? 0, { timeout: 30_000 }).toBeGreaterThan(0);
  const want = expectedPerturbation(files.three, s.prior);
  for (const plane of ['xy', 'xz', 'yz']) {
    const shown = (await markers(page, `plot-cells-${plane}`))!;
    expect(shown.colour.length).toBeGreaterThan(0);
    expect(shown.colour.length).toBeLessThan(files.n3);
    expect(
      maxRelDiff(
        shown.colour,
        shown.cell.map((i) => want[i]),
      ),
    ).toBeLessThan(1e-9);
  }
  // Moving the depth slider moves the x–y slab: other cells, and the chosen cell is the one nearest the new crossing.
  const before = (await markers(page, 'plot-cells-xy'))!.cell;
  await page.getByTestId('cells-slider-2').fill('250');
  await expect.poll(async () => JSON.stringify((await markers(page, 'plot-cells-xy'))?.cell)).not.toBe(JSON.stringify(before));
  const after = (await markers(page, 'plot-cells-xy'))!.cell;
  const chosen = (await state(page)).selectedCell!;
  expect(after).toContain(chosen);
  await expect(page.getByTestId('cells-chosen')).toContainText(`chosen cell ${chosen} at`);
  await screenshot(page, info, 'cells-3d-mean');
  await page.getByTestId('cells-field').selectOption('kernel');
  await expect.poll(async () => (await markers(page, 'plot-cells-xy'))?.colour.length ?? 0, { timeout: 30_000 }).toBeGreaterThan(0);
  await screenshot(page, info, 'cells-3d-kernel');
});
