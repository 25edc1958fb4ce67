/**
 * The per-cell prior fields in Chromium: a std profile and an explicit mean read from files change
 * the posterior to the core's numbers for that prior; a wrong file changes nothing and says why.
 */
import { expect, test } from '@playwright/test';
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { DEMOS } from '../src/core/problems/demos.ts';
import { posteriorSummary, preparePosterior } from '../src/core/inverse/posterior.ts';
import { maxRelDiff, open, screenshot, settle, state, traceValues, watch } from './helpers.ts';

const TOL = 1e-9;
const ORIGIN = 'http://127.0.0.1:' + (process.env.PRIORSCOPE_E2E_PORT ?? 4317);

test('a std profile and a per-cell mean from files reach the posterior; a short file is refused by name', async ({ page }, info) => {
  const w = watch(page, ORIGIN);
  const before = await open(page, 'borehole-log');
  const demo = DEMOS.find((d) => d.id === 'borehole-log')!.build();
  const dir = mkdtempSync(join(tmpdir(), 'percell-'));
  // Invented: the std doubles with depth over the 200 cells; the mean follows a 0.03 °C/m gradient.
  writeFileSync(join(dir, 'std.csv'), 'std\n' + Array.from({ length: 200 }, (_, i) => (1 + i / 199).toFixed(6)).join('\n') + '\n');
  writeFileSync(join(dir, 'mean.csv'), Array.from({ length: 200 }, (_, i) => (10 + 0.03 * (0.25 + 0.5 * i)).toFixed(6)).join('\n') + '\n');
  writeFileSync(join(dir, 'short.csv'), '1.5\n2.5\n');
  await page.getByTestId('tab-posterior').click();
  await page.getByTestId('std-profile-input').setInputFiles(join(dir, 'std.csv'));
  await expect(page.getByTestId('std-profile-state')).toContainText('1 to 2');
  await page.getByTestId('mean-file-input').setInputFiles(join(dir, 'mean.csv'));
  const s = await settle(page);
  expect(s.prior.stdProfile).toHaveLength(200);
  expect('values' in s.prior.mean && s.prior.mean.values.length).toBe(200);
  expect(s.priorRevision).toBeGreaterThan(before.priorRevision);
  await expect(page.getByTestId('mean-kind')).toHaveValue('values');
  const expected = posteriorSummary(preparePosterior(demo.problem, s.prior)).mean;
  await expect
    .poll(async () => maxRelDiff((await traceValues(page, 'plot-posterior', 'posterior mean')) as number[], expected))
    .toBeLessThan(TOL);
  await screenshot(page, info, 'per-cell-prior');
  // A file of 2 values for 200 cells: refused, the prior stays as it was.
  await page.getByTestId('std-profile-input').setInputFiles(join(dir, 'short.csv'));
  await expect(page.getByTestId('load-error')).toContainText('short.csv: must have 200 rows of values');
  expect((await state(page)).prior).toEqual(s.prior);
  await page.getByTestId('std-profile-clear').click();
  await expect.poll(async () => (await state(page)).prior.stdProfile).toBeUndefined();
  expect(w.problems).toEqual([]);
});
