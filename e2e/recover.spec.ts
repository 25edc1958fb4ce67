/**
 * Nothing lost (src/app/session/restore.ts, start.ts, ErrorBoundary.tsx) in Chromium: a damaged
 * autosave opens to a usable page; a ?demo= address and a link that cannot be applied leave the
 * saved session recoverable or untouched; an edit followed at once by a reload survives.
 */
import { expect, test, type Page } from '@playwright/test';
import { mkdtempSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { open, settle, state, writeSegmentProblem } from './helpers.ts';
import { encodeShare } from '../src/app/session/share.ts';

/** Writes a record into the page's IndexedDB store "session" (as a damaged database would hold it). */
async function putRecord(page: Page, key: string, value: unknown) {
  await page.evaluate(
    ([k, v]) =>
      new Promise<void>((resolve, reject) => {
        const r = indexedDB.open('priorscope', 1);
        r.onupgradeneeded = () => r.result.createObjectStore('session');
        r.onsuccess = () => {
          const tx = r.result.transaction('session', 'readwrite');
          tx.objectStore('session').put(v, k as string);
          tx.oncomplete = () => resolve();
          tx.onerror = () => reject(tx.error);
        };
        r.onerror = () => reject(r.error);
      }),
    [key, value] as const,
  );
}

const RAW_JS = /Cannot (use|read)|undefined is not|is not a function|is not iterable|TypeError|RangeError/;

async function setLength(page: Page, value: string) {
  const input = page.getByTestId('term-0-length-input');
  await input.fill(value);
  await input.press('Enter');
}

test('a damaged autosave opens to a usable page, in our words', async ({ page }) => {
  await open(page);
  const prior = (await state(page)).prior;
  await putRecord(page, 'session', {
    format: 1,
    source: { kind: 'demo', demoId: 'borehole-log' },
    prior: { ...prior, terms: [{ kernel: 'wobbly', variance: 1, length: 2 }] },
    seed: 'x',
    tab: 'no-such-screen',
    selectedCell: -3,
    extra: { candidates: [1, { id: 2 }] },
    savedAt: 0,
  });
  await page.reload();
  await expect(page.getByTestId('activity')).toHaveText('Up to date', { timeout: 45_000 });
  await expect(page.getByTestId('recover')).toHaveCount(0);
  const s = await settle(page);
  expect(s.prior.terms[0].kernel).not.toBe('wobbly');
  const text = await page.locator('body').textContent();
  expect(text ?? '').not.toMatch(RAW_JS);
  // A second reload opens as well (nothing damaged persists).
  await page.reload();
  await expect(page.getByTestId('activity')).toHaveText('Up to date', { timeout: 45_000 });
});

test('an edit followed at once by a reload survives', async ({ page }) => {
  await open(page);
  await setLength(page, '7.25');
  await page.reload(); // no wait for the debounced save: pagehide writes it
  await expect(page.getByTestId('activity')).toHaveText('Up to date', { timeout: 45_000 });
  expect((await state(page)).prior.terms[0].length).toBe(7.25);
});

test('a ?demo= address keeps the earlier session, and it can be restored', async ({ page }) => {
  await open(page);
  await setLength(page, '6.5');
  await expect(page.getByTestId('autosave-status')).toHaveText('Saved', { timeout: 30_000 });
  await page.goto('/?demo=potential-field');
  await expect(page.getByTestId('activity')).toHaveText('Up to date', { timeout: 45_000 });
  await expect(page.getByTestId('restore-previous')).toBeVisible();
  await expect(page.getByTestId('autosave-status')).toHaveText('Saved', { timeout: 30_000 });
  await page.getByTestId('restore-previous').click();
  await expect(page).toHaveURL(/\/$/);
  await expect(page.getByTestId('activity')).toHaveText('Up to date', { timeout: 45_000 });
  const s = await settle(page);
  expect(s.demoId).toBe('borehole-log');
  expect(s.prior.terms[0].length).toBe(6.5);
});

test('a link that cannot be applied changes nothing and says why', async ({ page }) => {
  await open(page);
  await setLength(page, '5.75');
  await expect(page.getByTestId('autosave-status')).toHaveText('Saved', { timeout: 30_000 });
  // A damaged link: the saved session is shown as it was.
  await page.goto('/#share=not-a-share-code');
  await page.reload(); // a hash change alone does not reopen the page
  await expect(page.getByTestId('activity')).toHaveText('Up to date', { timeout: 45_000 });
  await expect(page.getByText(/Nothing was changed/)).toBeVisible();
  expect((await settle(page)).prior.terms[0].length).toBe(5.75);
});

test('a share link with 20,000 terms is refused at once and the saved session is kept', async ({ page }) => {
  await open(page);
  await setLength(page, '4.5');
  await expect(page.getByTestId('autosave-status')).toHaveText('Saved', { timeout: 30_000 });
  const term = { kernel: 'exponential' as const, variance: 1, length: 2 };
  const hash = await encodeShare({
    problem: 'borehole-log',
    prior: { mean: { constant: 0 }, terms: Array.from({ length: 20_000 }, () => term) },
  });
  // Before the cap such a link froze the page for about two minutes and then persisted in the autosave.
  await page.goto(`/${hash}`);
  await page.reload();
  const t0 = Date.now();
  await expect(page.getByTestId('load-error')).toContainText(/at most 16/, { timeout: 10_000 });
  // Page load, the demo and the refusal together; the refusal itself takes about 0.15 s in Node.
  expect(Date.now() - t0).toBeLessThan(5_000);
  await expect(page.getByTestId('activity')).toHaveText('Up to date', { timeout: 45_000 });
  expect((await settle(page)).prior.terms).toHaveLength(1);
  expect((await state(page)).prior.terms[0].length).toBe(4.5);
});

test('a share link made on a loaded problem, opened in a fresh browser, names what is missing and applies once it is loaded', async ({
  page,
  browser,
}) => {
  const dir = mkdtempSync(join(tmpdir(), 'priorscope-share-'));
  const files = writeSegmentProblem(dir, {
    name: 'share',
    title: 'Invented pond section',
    nx: 12,
    ny: 8,
    m: 30,
    seg: 4,
    seed: 7,
    noise: 0.05,
    sigma: 0.05,
    truth: (i, j) => Math.sin(i / 3) + Math.cos(j / 2),
  });
  await open(page);
  await page.getByTestId('load-files-input').setInputFiles([files.json, files.mtx]);
  await expect(page.getByTestId('demo-select')).toContainText('Invented pond section', { timeout: 30_000 });
  await settle(page);
  await setLength(page, '3.25');
  const sent = await settle(page);
  await page.getByTestId('share').click();
  const link = await page.getByTestId('share-link').inputValue();

  // A fresh browser context (no saved session): the demo opens, the message names the problem.
  const fresh = await browser.newContext();
  const other = await fresh.newPage();
  await other.goto(link);
  await expect(other.getByTestId('load-error')).toContainText(
    /made for the problem titled "Invented pond section" \(fingerprint [0-9a-f]{16}\)/,
    { timeout: 45_000 },
  );
  expect((await state(other)).prior).not.toEqual(sent.prior);
  // Loading that problem applies the shared prior.
  await other.getByTestId('load-files-input').setInputFiles([files.json, files.mtx]);
  await expect(other.getByRole('status').filter({ hasText: 'Applied the prior from the shared link' })).toBeVisible({ timeout: 45_000 });
  expect((await settle(other)).prior).toEqual(sent.prior);
  await fresh.close();
});
