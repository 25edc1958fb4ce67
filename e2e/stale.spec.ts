/**
 * Results belong to the prior and problem they were computed for, in Chromium:
 * after a kernel change the earlier fit and evidence map are marked out of date and cannot be
 * applied; pinned candidates stay with their problem; the Problem selector names what is loaded.
 */
import { expect, test } from '@playwright/test';
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { open, screenshot, settle, state, watch } from './helpers.ts';

const ORIGIN = 'http://127.0.0.1:' + (process.env.PRIORSCOPE_E2E_PORT ?? 4317);

test('after a kernel change the earlier optimum and map are out of date and cannot be applied', async ({ page }, info) => {
  const w = watch(page, ORIGIN);
  const s0 = await open(page);
  await page.getByTestId('tab-select').click();
  await page.getByTestId('fit-run').click();
  await expect(page.getByTestId('typeII-status')).toHaveAttribute('data-status', 'done', { timeout: 45_000 });
  await page.getByTestId('map-run').click();
  await expect(page.getByTestId('evidenceMap-status')).toHaveAttribute('data-status', 'done', { timeout: 45_000 });
  await expect(page.getByTestId('fit-apply')).toBeEnabled();
  await page.getByTestId('profile-run').click();
  await expect(page.getByTestId('evidenceProfile-status')).toHaveAttribute('data-status', 'done', { timeout: 45_000 });
  await expect(page.getByTestId('map-apply-best')).toBeEnabled();
  await expect(page.getByTestId('fit-stale')).toHaveCount(0);
  await expect(page.getByTestId('profile-stale')).toHaveCount(0);

  const kernel = s0.prior.terms[0].kernel === 'gaussian' ? 'exponential' : 'gaussian';
  await page.getByTestId('term-0-kernel').selectOption(kernel);
  const s1 = await settle(page);
  expect(s1.prior.terms[0].kernel).toBe(kernel);
  await expect(page.getByTestId('fit-result')).toHaveAttribute('data-freshness', 'other-structure');
  await expect(page.getByTestId('fit-stale')).toContainText('Out of date');
  await expect(page.getByTestId('fit-apply')).toBeDisabled();
  await expect(page.getByTestId('fit-apply')).toHaveAttribute('title', /other kernels or terms/);
  await expect(page.getByTestId('fit-stale')).toContainText(
    `other kernels or terms (1 term: ${s0.prior.terms[0].kernel}; the current prior has 1 term: ${kernel}`,
  );
  await expect(page.getByTestId('map-stale')).toContainText('cannot be applied');
  await expect(page.getByTestId('map-apply-best')).toBeDisabled();
  // The nugget profile was computed with the earlier kernel held fixed: shown as out of date.
  await expect(page.getByTestId('profile-result')).toHaveAttribute('data-freshness', 'other-structure');
  await expect(page.getByTestId('profile-stale')).toContainText('Out of date');
  await page.getByTestId('fit-result').scrollIntoViewIfNeeded();
  await screenshot(page, info, 'stale-fit-after-kernel-change');
  // Even a forced click does not bring the old kernel back.
  await page.getByTestId('fit-apply').click({ force: true });
  await page.getByTestId('map-apply-best').click({ force: true });
  expect((await state(page)).prior.terms[0].kernel).toBe(kernel);

  // Back to the kernel it was computed for, with another length: out of date but applicable.
  await page.getByTestId('term-0-kernel').selectOption(s0.prior.terms[0].kernel);
  await settle(page);
  await expect(page.getByTestId('fit-result')).toHaveAttribute('data-freshness', 'earlier-prior');
  await expect(page.getByTestId('fit-apply')).toBeEnabled();
  expect(w.problems).toEqual([]);
});

test('candidates stay with their problem; the selector names the loaded problem', async ({ page }, info) => {
  const w = watch(page, ORIGIN);
  await open(page);
  await page.getByTestId('tab-select').click();
  await page.getByTestId('select-pin').click();
  await page.getByTestId('select-pin').click();
  const candidates = async () => ((await state(page)) as unknown as { candidates: unknown[] }).candidates.length;
  expect(await candidates()).toBe(2);

  // An invented problem: 6 cells of 2 m, 3 averages of temperature (K).
  const dir = mkdtempSync(join(tmpdir(), 'priorscope-stale-'));
  const file = join(dir, 'pond.json');
  const problem = {
    kind: 'priorscope.problem',
    version: 1,
    title: 'Pond bed temperatures',
    grid: { shape: [6], spacing: [2], unit: 'm' },
    operator: {
      dense: [
        [0.5, 0.5, 0, 0, 0, 0],
        [0, 0, 0.5, 0.5, 0, 0],
        [0, 0, 0, 0, 0.5, 0.5],
      ],
    },
    data: { values: [281.2, 282.9, 281.7], sigma: [0.3, 0.3, 0.3], unit: 'K' },
    quantity: { name: 'temperature', unit: 'K' },
  };
  writeFileSync(file, JSON.stringify(problem));
  const v0 = (await state(page)).problemVersion;
  await page.getByTestId('load-files-input').setInputFiles(file);
  await expect.poll(async () => (await state(page)).problemVersion !== v0, { timeout: 30_000 }).toBe(true);
  await settle(page);
  expect(await candidates()).toBe(0);
  await expect(page.getByTestId('select-pin')).toContainText('(0/');
  await expect(page.getByTestId('candidates-note')).toContainText(
    'The 2 pinned candidates of “Borehole temperature log” are kept for that problem',
  );
  const select = page.getByTestId('demo-select');
  await expect(select.locator('option:checked')).toHaveText(/Your problem: Pond bed temperatures/);
  await screenshot(page, info, 'stale-selector-user-problem');

  // Back to the demo: its two candidates return.
  await select.selectOption('borehole-log');
  await expect.poll(candidates, { timeout: 30_000 }).toBe(2);
  await expect(select.locator('option:checked')).not.toHaveText(/Your problem/);
  await expect(page.getByTestId('candidates-note')).toContainText('The 2 pinned candidates of this problem are back.');
  expect(w.problems).toEqual([]);
});
