/** The hyperparameter-averaged posterior on the Choose prior screen, checked against the core, and in the report. */
import { readFileSync } from 'node:fs';
import { expect, test } from '@playwright/test';
import { DEMOS } from '../src/core/problems/demos.ts';
import { averagedPosterior } from '../src/core/tuning/averaged.ts';
import { evidenceMap, termLength } from '../src/core/tuning/index.ts';
import { open, traceValues, watch } from './helpers.ts';

const ORIGIN = `http://127.0.0.1:${process.env.PRIORSCOPE_E2E_PORT ?? 4173}`;
const borehole = DEMOS.find((d) => d.id === 'borehole-log')!.build();

test('averaged over the evidence map: drawn beside this prior, equal to the core, and in the report', async ({ page }, info) => {
  const w = watch(page, ORIGIN);
  const s0 = await open(page);
  await page.getByTestId('tab-select').click();
  await page.getByTestId('map-run').click();
  await expect(page.getByTestId('evidenceMap-status')).toHaveAttribute('data-status', 'done', { timeout: 60_000 });
  await page.getByTestId('averaged-run').click();
  await expect(page.getByTestId('averaged-status')).toHaveAttribute('data-status', 'done', { timeout: 60_000 });
  const t = s0.prior.terms[0];
  const l = termLength(t);
  const map = evidenceMap(borehole.problem, s0.prior, {
    term: 0,
    lengths: { min: l / 5, max: l * 5, count: 16 },
    variances: { min: t.variance / 100, max: t.variance * 100, count: 16 },
  });
  const core = averagedPosterior(borehole.problem, s0.prior, map);
  const drawn = (await traceValues(page, 'plot-averaged', 'averaged mean')) as number[];
  expect(drawn).toHaveLength(core.mean.length);
  let worst = 0;
  drawn.forEach((v, i) => (worst = Math.max(worst, Math.abs(v - core.mean[i]))));
  expect(worst).toBeLessThan(1e-9 * Math.max(1, ...Array.from(core.mean, Math.abs)));
  await page.screenshot({ path: info.outputPath('averaged.png'), fullPage: true });
  await page.getByTestId('export-menu').click();
  const [dl] = await Promise.all([page.waitForEvent('download'), page.getByTestId('report-download').click()]);
  const html = readFileSync(await dl.path(), 'utf8');
  const report = await page.context().newPage();
  await report.setContent(html);
  await expect(report.locator('#averaged svg')).toHaveCount(1);
  await expect(report.locator('#evidence svg')).toHaveCount(1);
  await report.pdf({ path: info.outputPath('report.pdf'), format: 'A4', preferCSSPageSize: true });
  expect(w.problems).toEqual([]);
});
