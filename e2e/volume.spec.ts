/**
 * A 3-D problem in the workbench: an invented survey of 18 stations on the surface above a block of 12 × 10 × 6
 * cells (a smooth, made-up sensitivity that decays with distance from each station), loaded from a problem file;
 * the volume screen shows three sections, the sliders move them, and the field list switches what they show.
 */
import { execFileSync } from 'node:child_process';
import { mkdirSync, readFileSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import { expect, test } from '@playwright/test';
import { screenshot, settle, state } from './helpers.ts';

const [NX, NY, NZ] = [12, 10, 6];
const N = NX * NY * NZ;

function volumeProblem(dir: string): string {
  const stations: number[][] = [];
  for (let a = 0; a < 6; a++) for (let b = 0; b < 3; b++) stations.push([2 + a * 4, 3 + b * 7, -1]);
  const dense = stations.map(([sx, sy, sz]) =>
    Array.from({ length: N }, (_, i) => {
      const x = 1 + 2 * (i % NX);
      const y = 1 + 2 * (Math.floor(i / NX) % NY);
      const z = 1 + 2 * Math.floor(i / (NX * NY));
      const r2 = (x - sx) ** 2 + (y - sy) ** 2 + (z - sz) ** 2;
      return Number(((z - sz) / r2 ** 1.5).toPrecision(6));
    }),
  );
  const problem = {
    kind: 'priorscope.problem',
    version: 1,
    title: 'Invented block under 18 stations',
    grid: { shape: [NX, NY, NZ], spacing: [2, 2, 2], origin: [1, 1, 1], unit: 'm', axes: ['east', 'north', 'depth'] },
    operator: { dense },
    data: {
      values: stations.map((_, k) => Number((0.02 * Math.sin(k) + 0.03).toPrecision(6))),
      sigma: stations.map(() => 0.002),
      unit: 'mGal',
      positions: stations,
    },
    quantity: { name: 'density contrast', unit: 'g/cm³' },
  };
  mkdirSync(dir, { recursive: true });
  const path = join(dir, 'block3d.json');
  writeFileSync(path, JSON.stringify(problem));
  return path;
}

test('a 3-D problem loads and shows three sections that follow the sliders', async ({ page }, info) => {
  test.setTimeout(120_000);
  const file = volumeProblem(info.outputPath('files'));
  await page.goto('/');
  await expect(page.getByTestId('activity')).toHaveText('Up to date', { timeout: 45_000 });
  await page.getByTestId('load-files-input').setInputFiles([file]);
  await expect(page.getByTestId('screen-volume')).toBeVisible({ timeout: 45_000 });
  await settle(page);
  const zOf = (id: string) =>
    page.evaluate((plot) => {
      const el = document.querySelector(`[data-testid="${plot}"] .js-plotly-plot`) ?? document.getElementById(plot);
      const d = (el as unknown as { data?: { z?: number[][] }[] })?.data;
      return d?.[0]?.z ?? null;
    }, id);
  await expect.poll(async () => (await zOf('plot-section-xy'))?.length ?? 0, { timeout: 30_000 }).toBe(NY);
  const xz = await zOf('plot-section-xz');
  expect(xz).toHaveLength(NZ);
  expect(xz![0]).toHaveLength(NX);
  const yz = await zOf('plot-section-yz');
  expect(yz).toHaveLength(NZ);
  expect(yz![0]).toHaveLength(NY);
  // Moving the depth slider moves the x–y section to another depth: its values and title change.
  const before = await zOf('plot-section-xy');
  await page.getByTestId('volume-slider-2').fill('4');
  await expect.poll(async () => JSON.stringify(await zOf('plot-section-xy'))).not.toBe(JSON.stringify(before));
  // The screen starts at the middle cell (6, 5, 3); the slider keeps its x and y.
  expect((await state(page)).selectedCell).toBe(6 + NX * (5 + NY * 4));
  await expect(page.getByText(/east–north at depth = 9 m/)).toBeVisible();
  await page.getByTestId('volume-slider-0').fill('7');
  await expect(page.getByText(/north–depth at east = 15 m/)).toBeVisible();
  await screenshot(page, info, 'volume-mean');
  // Another field: the standard deviation on the sequential scale from 0.
  await page.getByTestId('volume-field').selectOption('std');
  await expect.poll(async () => Math.min(...((await zOf('plot-section-xy')) ?? [[-1]]).flat())).toBeGreaterThan(0);
  // The prior correlation with the chosen cell: 1 at that cell (it lies on every section), below 1 elsewhere.
  await page.getByTestId('volume-field').selectOption('correlation');
  await expect.poll(async () => Math.max(...((await zOf('plot-section-yz')) ?? [[0]]).flat())).toBeCloseTo(1, 12);
  const chosen = (await state(page)).selectedCell!;
  const yzCorr = (await zOf('plot-section-yz'))!;
  // y–z at the chosen ix: row iz, column iy.
  expect(yzCorr[Math.floor(chosen / (NX * NY))][Math.floor(chosen / NX) % NY]).toBeCloseTo(1, 12);
  await screenshot(page, info, 'volume-correlation');
  await page.getByTestId('volume-field').selectOption('kernel');
  await expect.poll(async () => (await zOf('plot-section-xy'))?.length ?? 0, { timeout: 30_000 }).toBe(NY);
  await screenshot(page, info, 'volume-kernel');
  // Export .vti: read back by Python's xml.etree + numpy (test/reference/read_vti.py), the posterior mean equal to the store's.
  const [download] = await Promise.all([page.waitForEvent('download'), page.getByTestId('export-vti').click()]);
  expect(download.suggestedFilename()).toBe('invented-block-under-18-stations-volume.vti');
  const saved = info.outputPath('volume.vti');
  await download.saveAs(saved);
  const read = JSON.parse(
    execFileSync('/usr/bin/python3', [join('test', 'reference', 'vti_reference.py')], {
      input: JSON.stringify({ text: readFileSync(saved, 'utf8') }),
      encoding: 'utf8',
    }),
  ) as { extent: number[]; origin: number[]; fields: Record<string, number[][][]> };
  expect(read.extent).toEqual([0, NX, 0, NY, 0, NZ]);
  expect(read.origin).toEqual([0, 0, 0]);
  // The shown x–y section of the posterior mean (at depth index 4) equals numpy's slice [4] of the exported volume.
  await page.getByTestId('volume-field').selectOption('mean');
  await expect.poll(async () => JSON.stringify(await zOf('plot-section-xy'))).toBe(JSON.stringify(read.fields['posterior mean'][4]));
  expect(Object.keys(read.fields)).toEqual([
    'posterior mean',
    'posterior std',
    'prior std',
    'variance reduction',
    'prior realisation 1',
    'posterior realisation 1',
  ]);
});

test('the built-in 3-D demo opens on the volume screen with its rays projected onto every section', async ({ page }, info) => {
  test.setTimeout(120_000);
  await page.goto('/?demo=three-boreholes');
  await expect(page.getByTestId('screen-volume')).toBeVisible({ timeout: 45_000 });
  const s = await settle(page);
  expect(s.demoId).toBe('three-boreholes');
  const traces = (id: string) =>
    page.evaluate((plot) => {
      const el = document.querySelector(`[data-testid="${plot}"] .js-plotly-plot`) ?? document.getElementById(plot);
      return ((el as unknown as { data?: { name?: string; x?: unknown[]; z?: number[][] }[] })?.data ?? []).map((t) => ({
        name: t.name ?? '',
        points: t.x?.length ?? 0,
        rows: t.z?.length ?? 0,
      }));
    }, id);
  // 16 × 12 × 10 cells; 192 rays drawn as 3 points each (two ends and a break) on every plane.
  await expect.poll(async () => (await traces('plot-section-xy'))[0]?.rows ?? 0, { timeout: 30_000 }).toBe(12);
  for (const [plane, rows] of [
    ['xy', 12],
    ['xz', 10],
    ['yz', 10],
  ] as const) {
    const t = await traces(`plot-section-${plane}`);
    expect(t[0].rows).toBe(rows);
    expect(t.find((x) => x.name === 'paths')?.points).toBe(3 * 192);
  }
  await screenshot(page, info, 'volume-demo');
});
