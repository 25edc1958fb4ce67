/**
 * A loaded problem starts from the prior fitted to its data (src/core/tuning/startPrior.ts), names
 * its axes and units as its file says, and warns when the data are implausible under the prior.
 * The expected prior is computed here in Node from the same file.
 */
import { expect, test } from '@playwright/test';
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { parseProblemFile } from '../src/core/io/problemFile.ts';
import { gridProblem } from '../src/core/problems/spec.ts';
import { startPriorRule } from '../src/core/tuning/startPrior.ts';
import { open, screenshot, settle, state, watch } from './helpers.ts';

const ORIGIN = 'http://127.0.0.1:' + (process.env.PRIORSCOPE_E2E_PORT ?? 4317);

/** An invented trench survey: 12 × 8 cells of 1 m, 30 travel times (ms) over random cell sets, σ 0.4 ms. */
function trench(): string {
  let seed = 12345;
  const rnd = () => (seed = (Math.imul(seed, 1103515245) + 12345) >>> 0) / 2 ** 32;
  const n = 96;
  const dense: number[][] = [];
  const values: number[] = [];
  for (let k = 0; k < 30; k++) {
    const row = Array.from({ length: n }, () => (rnd() < 0.2 ? Number((0.5 + rnd()).toFixed(3)) : 0));
    dense.push(row);
    const sum = row.reduce((a, b) => a + b, 0);
    values.push(Number((0.03 * 1000 * sum * (0.9 + 0.2 * rnd())).toFixed(3)));
  }
  return JSON.stringify({
    kind: 'priorscope.problem',
    version: 1,
    title: 'Trench travel times',
    grid: { shape: [12, 8], spacing: [1, 1], unit: 'm', axes: ['easting', 'northing'] },
    operator: { dense },
    data: { values, sigma: values.map(() => 0.4), unit: 'ms' },
    quantity: { name: 'slowness', unit: 'ms/m' },
  });
}

test('a loaded problem starts from the fitted prior, uses its axis names and units, and warns on implausible data', async ({
  page,
}, info) => {
  const w = watch(page, ORIGIN);
  await open(page);
  const dir = mkdtempSync(join(tmpdir(), 'priorscope-start-'));
  const text = trench();
  const file = join(dir, 'trench.json');
  writeFileSync(file, text);
  await page.getByTestId('load-files-input').setInputFiles(file);
  await expect
    .poll(async () => (await state(page)).demoId === 'borehole-log' && (await state(page)).problemVersion, { timeout: 30_000 })
    .toBeTruthy();
  await expect(page.getByTestId('start-rule')).toBeVisible({ timeout: 30_000 });
  const s = await settle(page);
  const expected = startPriorRule(gridProblem(parseProblemFile('trench.json', text).problem, 'this test')).prior;
  expect(s.prior).toEqual(expected);
  // On the data's scale: not mean 0 and variance 1.
  expect(s.prior.terms[0].variance).not.toBe(1);
  expect((s.prior.mean as { constant: number }).constant).not.toBe(0);
  await expect(page.getByTestId('plausibility-warning')).toHaveCount(0);

  await page.getByTestId('tab-prior').click();
  await expect(page.locator('#plot-correlation-map .ytitle')).toHaveText('Δnorthing (m) ↓');
  await expect(page.locator('#plot-correlation-map .xtitle')).toHaveText('Δeasting (m)');
  await page.getByTestId('start-rule').locator('summary').click();
  await screenshot(page, info, 'start-prior-loaded');

  await page.getByTestId('tab-problem').click();
  await expect(page.locator('#plot-data .ytitle')).toHaveText('d (ms)');
  await expect(page.getByTestId('screen-problem')).not.toContainText('data units');
  await expect(page.getByTestId('screen-problem')).not.toContainText('()');

  // A prior a thousand times too narrow: the data are implausible, and the panel says so.
  const v = page.getByTestId('term-0-variance-input');
  await v.fill(String(expected.terms[0].variance / 1000));
  await v.press('Enter');
  await settle(page);
  await expect(page.getByTestId('plausibility-warning')).toContainText('vary more than the prior');
  await expect(page.getByTestId('plausibility-warning')).toContainText('q follows χ²_M');
  await page.getByTestId('tab-prior').click();
  await screenshot(page, info, 'start-prior-implausible');
  expect(w.problems).toEqual([]);
});
