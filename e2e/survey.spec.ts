/**
 * The survey in place, in Chromium: data against where they were measured, rays coloured by
 * residual, and the Problem screen's grid overlay. Expected numbers come from the same core in Node
 * (tolerance as in workbench.spec.ts: 1e-9 relative, round-off between two V8 builds).
 */
import { expect, type Page, test } from '@playwright/test';
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { DEMOS } from '../src/core/problems/demos.ts';
import { posteriorSummary, preparePosterior } from '../src/core/inverse/posterior.ts';
import { type Ray, rayOperator } from '../src/core/problems/rays.ts';
import { operatorToDense } from '../src/core/linalg/operator.ts';
import { writeCsv } from '../src/core/io/csv.ts';
import { maxRelDiff, open, screenshot, settle, state, watch } from './helpers.ts';

const TOL = 1e-9;
const ORIGIN = 'http://127.0.0.1:' + (process.env.PRIORSCOPE_E2E_PORT ?? 4317);

/** A field of a named trace of a plotly figure (e.g. 'x', 'y', 'marker.color'). */
async function traceField(page: Page, plotId: string, traceName: string, path: string): Promise<unknown[]> {
  return page.evaluate(
    ([id, name, p]) => {
      const gd = document.getElementById(id!) as unknown as { data?: Record<string, unknown>[] } | null;
      const t = gd?.data?.find((d) => d.name === name);
      if (!t) return [];
      let v: unknown = t;
      for (const k of p!.split('.')) v = (v as Record<string, unknown>)[k];
      return Array.from(v as ArrayLike<unknown>);
    },
    [plotId, traceName, path] as const,
  );
}

async function traceNamesOf(page: Page, plotId: string): Promise<string[]> {
  return page.evaluate(
    (id) => ((document.getElementById(id) as unknown as { data?: { name?: string }[] })?.data ?? []).map((d) => String(d.name)),
    plotId,
  );
}

function built(id: string) {
  return DEMOS.find((d) => d.id === id)!.build();
}

test('point data: the gravity stations are plotted at their positions, data and prediction along the profile', async ({ page }, info) => {
  const w = watch(page, ORIGIN);
  const s = await open(page, 'potential-field');
  const demo = built('potential-field');
  const stations = Array.from({ length: 40 }, (_, k) => 25 + 50 * k);
  // Problem screen: data against station position, the grid outline and the stations over the sensitivity map.
  await page.getByTestId('tab-problem').click();
  await expect.poll(() => traceField(page, 'plot-data', 'observed ±1σ', 'x')).toEqual(stations);
  await expect(page.locator('#plot-data .xtitle')).toHaveText('x (m), where each datum was measured');
  await expect.poll(() => traceNamesOf(page, 'plot-coverage')).toContain('data positions (40)');
  const overlay = await traceNamesOf(page, 'plot-coverage');
  expect(overlay).toContain('grid 40 × 20 cells of 50 × 25 m');
  expect(overlay).toContain('first cell centre (25, 12.5) m');
  expect(overlay).toContain('data positions (40)');
  expect(await traceField(page, 'plot-coverage', 'grid 40 × 20 cells of 50 × 25 m', 'x')).toEqual([0, 2000, 2000, 0, 0]);
  await screenshot(page, info, 'survey-problem-gravity');

  await page.getByTestId('tab-fit').click();
  await expect.poll(() => traceField(page, 'plot-profile', 'predicted G m̃', 'x')).toHaveLength(40);
  const expected = posteriorSummary(preparePosterior(demo.problem, s.prior));
  expect(await traceField(page, 'plot-profile', 'predicted G m̃', 'x')).toEqual(stations);
  expect(maxRelDiff((await traceField(page, 'plot-profile', 'predicted G m̃', 'y')) as number[], expected.predicted)).toBeLessThan(TOL);
  expect(
    maxRelDiff((await traceField(page, 'plot-profile-residuals', 'normalised residual', 'y')) as number[], expected.residuals),
  ).toBeLessThan(TOL);
  await screenshot(page, info, 'survey-fit-gravity');
  expect(w.problems).toEqual([]);
});

test('1-D point data: the borehole sensors are plotted at their depths, the grid as a segment with the sensors on it', async ({
  page,
}, info) => {
  const w = watch(page, ORIGIN);
  await open(page, 'borehole-log');
  await page.getByTestId('tab-problem').click();
  const depths = Array.from({ length: 50 }, (_, k) => 1 + 2 * k);
  await expect.poll(() => traceField(page, 'plot-data', 'observed ±1σ', 'x')).toEqual(depths);
  await expect
    .poll(() => traceNamesOf(page, 'plot-coverage'))
    .toEqual(expect.arrayContaining(['grid 200 cells of 0.5 m', 'first cell centre (0.25) m', 'data positions (50)']));
  expect(await traceField(page, 'plot-coverage', 'grid 200 cells of 0.5 m', 'x')).toEqual([0, 100]);
  await screenshot(page, info, 'survey-problem-borehole');
  expect(w.problems).toEqual([]);
});

test('path data: the crosshole rays are drawn over the section coloured by their normalised residuals', async ({ page }, info) => {
  const w = watch(page, ORIGIN);
  const s = await open(page, 'crosshole-tomography');
  const demo = built('crosshole-tomography');
  await page.getByTestId('tab-problem').click();
  await expect
    .poll(() => traceNamesOf(page, 'plot-coverage'))
    .toEqual(expect.arrayContaining(['grid 32 × 32 cells of 0.5 × 0.5 m', '256 rays', 'sources (16)', 'receivers (16)']));
  await screenshot(page, info, 'survey-problem-crosshole');
  await page.getByTestId('tab-fit').click();
  await expect.poll(() => traceField(page, 'plot-rays', 'normalised residual per ray', 'marker.color')).toHaveLength(256);
  const expected = posteriorSummary(preparePosterior(demo.problem, s.prior));
  const colours = (await traceField(page, 'plot-rays', 'normalised residual per ray', 'marker.color')) as number[];
  expect(colours).toHaveLength(256);
  expect(maxRelDiff(colours, expected.residuals)).toBeLessThan(TOL);
  // Every ray is drawn exactly once across the colour classes (two points and a gap each).
  const lines = await page.evaluate(() =>
    ((document.getElementById('plot-rays') as unknown as { data: { name: string; x: unknown[] }[] }).data ?? [])
      .filter((d) => d.name.startsWith('residual '))
      .reduce((a, d) => a + d.x.length / 3, 0),
  );
  expect(lines).toBe(256);
  const misfit = (await traceField(page, 'plot-misfit', 'misfit r²', 'y')) as number[];
  expect(
    maxRelDiff(
      misfit,
      Array.from(expected.residuals, (r) => r * r),
    ),
  ).toBeLessThan(TOL);
  await screenshot(page, info, 'survey-fit-crosshole');
  expect(w.problems).toEqual([]);
});

test('a problem loaded from pieces with a geometry CSV of sources and receivers draws its rays, with the data unit', async ({
  page,
}, info) => {
  const w = watch(page, ORIGIN);
  await open(page);
  // An invented 12 × 6 section of 1 m cells with 18 straight rays from a left hole to a right one, and
  // three rays given with a wrong origin (they pass 30 m below the section): the warning names them.
  const grid = { shape: [12, 6], spacing: [1, 1], origin: [0.5, 0.5] };
  const rays: Ray[] = [];
  for (let a = 0; a < 6; a++) for (let b = 0; b < 3; b++) rays.push({ from: [0, 0.5 + a], to: [12, 1 + 2 * b] });
  rays.push({ from: [0, 36], to: [12, 37] }, { from: [0, 38], to: [12, 36] }, { from: [0, 40], to: [12, 40] });
  const G = operatorToDense(rayOperator(grid, rays));
  const dir = mkdtempSync(join(tmpdir(), 'survey-'));
  writeFileSync(join(dir, 'G.csv'), writeCsv(G));
  writeFileSync(join(dir, 'd.csv'), 'value,sigma\n' + rays.map((_, k) => `${(0.1 * Math.sin(k)).toFixed(4)},0.05`).join('\n') + '\n');
  writeFileSync(join(dir, 'rays.csv'), 'sx,sy,rx,ry\n' + rays.map((r) => [...r.from, ...r.to].join(',')).join('\n') + '\n');
  await page.getByTestId('pieces-toggle').click();
  await page.getByTestId('pieces-operator').setInputFiles(join(dir, 'G.csv'));
  await page.getByTestId('pieces-data').setInputFiles(join(dir, 'd.csv'));
  await page.getByTestId('pieces-geometry').setInputFiles(join(dir, 'rays.csv'));
  await page.getByTestId('pieces-data-unit').fill('ms');
  await page.getByTestId('pieces-nx').fill('12');
  await page.getByTestId('pieces-ny').fill('6');
  await page.getByTestId('pieces-dx').fill('1');
  await page.getByTestId('pieces-dy').fill('1');
  await page.locator('input[name=x0]').fill('0.5');
  await page.locator('input[name=y0]').fill('0.5');
  await page.getByTestId('pieces-unit').fill('m');
  await page.getByTestId('pieces-title').fill('Small crosshole');
  await page.getByTestId('pieces-load').click();
  await expect(page.getByTestId('problem-source')).toContainText('Small crosshole', { timeout: 30_000 });
  await expect(page.getByText('3 of 21 paths (sx,sy → rx,ry, rows 18, 19 and 20) miss the grid entirely').first()).toBeVisible();
  await settle(page);
  await page.getByTestId('tab-problem').click();
  await expect.poll(() => traceNamesOf(page, 'plot-coverage')).toEqual(expect.arrayContaining(['grid 12 × 6 cells of 1 × 1 m', '21 rays']));
  await page.getByTestId('tab-fit').click();
  await expect.poll(() => traceField(page, 'plot-rays', 'normalised residual per ray', 'marker.color')).toHaveLength(21);
  await expect(page.locator('#plot-fit .ytitle')).toHaveText('d (ms)');
  await screenshot(page, info, 'survey-pieces-rays');
  expect((await state(page)).errors).toEqual({});
  expect(w.problems).toEqual([]);
});
