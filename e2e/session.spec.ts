/**
 * Acceptance in Chromium: the user's own problem from CSV + Matrix Market pieces, a broken
 * file leaving the session exactly as it was, prior export / re-import, reload restoring the
 * session, undo / redo, the share link, hostile text, worker death, CSP and no foreign requests.
 * Expected numbers come from the core run here in Node on the same inputs (see workbench.spec.ts
 * for the 1e-9 page-against-Node tolerance; common practice, no source).
 */
import { expect, test, type Page } from '@playwright/test';
import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { patchTerm } from '../src/core/kernels/spec.ts';
import { posteriorSummary, preparePosterior } from '../src/core/inverse/posterior.ts';
import { assembleProblem } from '../src/core/io/pieces.ts';
import { parsePriorFile } from '../src/core/io/priorFile.ts';
import { maxRelDiff, open, settle, state, traceValues, watch } from './helpers.ts';

const ORIGIN = 'http://127.0.0.1:' + (process.env.PRIORSCOPE_E2E_PORT ?? 4317);
const TOL = 1e-9;
const dir = mkdtempSync(join(tmpdir(), 'priorscope-e2e-'));

/** An invented 1-D problem: 30 cells of 2 m, 12 overlapping three-cell window averages. */
function pieces() {
  const n = 30;
  const m = 12;
  const lines: string[] = [];
  for (let i = 0; i < m; i++) for (let k = 0; k < 3; k++) lines.push(`${i + 1} ${2 * i + k + 1} ${1 / 3}`);
  const mtx = `%%MatrixMarket matrix coordinate real general\n% invented window averages\n${m} ${n} ${lines.length}\n${lines.join('\n')}\n`;
  const rows = Array.from({ length: m }, (_, i) => `${(Math.sin(i / 2) * 3 + 10).toFixed(3)},${(0.2 + 0.01 * i).toFixed(2)}`);
  const csv = `value,sigma\n${rows.join('\n')}\n`;
  const g = join(dir, 'G.mtx');
  const d = join(dir, 'data.csv');
  writeFileSync(g, mtx);
  writeFileSync(d, csv);
  const problem = assembleProblem({
    grid: { shape: [n], spacing: [2], unit: 'm' },
    operator: { name: 'G.mtx', bytes: new TextEncoder().encode(mtx) },
    data: { name: 'data.csv', bytes: new TextEncoder().encode(csv) },
    title: 'Trench test',
  });
  return { g, d, problem, csv };
}
const P = pieces();

async function loadPieces(page: Page, data = P.d, title = 'Trench test') {
  await page.getByTestId('pieces-toggle').click();
  await page.getByTestId('pieces-operator').setInputFiles(P.g);
  await page.getByTestId('pieces-data').setInputFiles(data);
  await page.getByTestId('pieces-nx').fill('30');
  await page.getByTestId('pieces-dx').fill('2');
  await page.getByTestId('pieces-unit').fill('m');
  await page.getByTestId('pieces-title').fill(title);
  await page.getByTestId('pieces-load').click();
}

/** Collects CSP violations reported to the page. */
async function cspWatch(page: Page) {
  await page.addInitScript(() => {
    (window as unknown as { __csp: string[] }).__csp = [];
    document.addEventListener('securitypolicyviolation', (e) =>
      (window as unknown as { __csp: string[] }).__csp.push(`${e.violatedDirective} ${e.blockedURI}`),
    );
  });
  return () => page.evaluate(() => (window as unknown as { __csp: string[] }).__csp);
}

async function setLength(page: Page, v: string) {
  const input = page.getByTestId('term-0-length-input');
  await input.fill(v);
  await input.press('Enter');
  return settle(page);
}

test('loads a user problem from CSV + Matrix Market pieces and shows its posterior (no CSP violations, no foreign requests)', async ({
  page,
}) => {
  const w = watch(page, ORIGIN);
  const csp = await cspWatch(page);
  await open(page);
  await loadPieces(page);
  await expect(page.getByTestId('problem-source')).toContainText('Your problem: Trench test (G.mtx + data.csv)', { timeout: 30_000 });
  const s = await settle(page);
  expect(s.demoId).toBe('borehole-log'); // the demo picker is unchanged; the problem is the user's
  const mean = (await traceValues(page, 'plot-posterior', 'posterior mean')) as number[];
  expect(mean).toHaveLength(30);
  const expected = posteriorSummary(preparePosterior(P.problem, s.prior));
  expect(maxRelDiff(mean, expected.mean)).toBeLessThan(TOL);
  // and the exports of the same posterior (CSV) hold the same numbers
  await page.getByTestId('export-menu').click();
  const [dl] = await Promise.all([page.waitForEvent('download'), page.getByTestId('export-posterior-csv').click()]);
  const text = readFileSync(await dl.path(), 'utf8')
    .trim()
    .split('\n');
  expect(text[0]).toBe('x,mean,std');
  expect(
    maxRelDiff(
      text.slice(1).map((l) => Number(l.split(',')[1])),
      expected.mean,
    ),
  ).toBeLessThan(1e-15);
  expect(await csp()).toEqual([]);
  expect(w.problems).toEqual([]);
  expect(w.foreign).toEqual([]);
});

test('a broken file shows the precise message and leaves the session exactly as it was', async ({ page }) => {
  const w = watch(page, ORIGIN);
  await open(page);
  await setLength(page, '3.5');
  const before = await state(page);
  const plotted = await traceValues(page, 'plot-posterior', 'posterior mean');
  const bad = join(dir, 'data-bad.csv');
  writeFileSync(bad, P.csv.replace(/\n([^\n]*),0\.22\n/, '\n$1,-0.22\n')); // datum 3 (line 4) gets sigma -0.22
  await loadPieces(page, bad);
  await expect(page.getByTestId('load-error')).toContainText('data-bad.csv: line 4, column 2 (sigma) must be > 0, got -0.22');
  // a problem file whose operator file has a broken Matrix Market banner
  const json = join(dir, 'p.json');
  const mtx = join(dir, 'Gbad.mtx');
  writeFileSync(mtx, '%%MatrixMarket matrix coordinate complex general\n1 1 1\n1 1 1 0\n');
  writeFileSync(
    json,
    JSON.stringify({
      kind: 'priorscope.problem',
      version: 1,
      grid: { shape: [1], spacing: [1] },
      operator: { file: 'Gbad.mtx' },
      data: { values: [1], sigma: [1] },
    }),
  );
  await page.getByTestId('load-files-input').setInputFiles([json, mtx]);
  await expect(page.getByTestId('load-error')).toContainText('Gbad.mtx: ');
  await expect(page.getByTestId('load-error')).toContainText('complex');
  const after = await state(page);
  expect(after).toEqual(before);
  expect(await traceValues(page, 'plot-posterior', 'posterior mean')).toEqual(plotted);
  expect(w.problems).toEqual([]);
  expect(w.foreign).toEqual([]);
});

test('the exported prior re-imports identically; undo and redo (buttons and keys) step through edits, a slider drag is one step', async ({
  page,
}) => {
  const w = watch(page, ORIGIN);
  const start = await open(page);
  const edited = await setLength(page, '4.25');
  await page.getByTestId('export-menu').click();
  const [dl] = await Promise.all([page.waitForEvent('download'), page.getByTestId('export-prior').click()]);
  const file = await dl.path();
  expect(parsePriorFile('prior.json', readFileSync(file)).prior).toEqual(edited.prior);
  await setLength(page, '1.5');
  await page.getByTestId('import-prior-input').setInputFiles(file);
  await expect.poll(async () => (await state(page)).prior).toEqual(edited.prior);

  // undo the import, then the 1.5, then the 4.25 edit: back at the start
  await page.getByTestId('undo').click();
  await expect.poll(async () => (await state(page)).prior.terms[0].length).toBe(1.5);
  await page.locator('body').press('Control+z');
  await expect.poll(async () => (await state(page)).prior.terms[0].length).toBe(4.25);
  await page.locator('body').press('Control+z');
  await expect.poll(async () => (await state(page)).prior).toEqual(start.prior);
  await expect(page.getByTestId('undo')).toBeDisabled();
  await page.locator('body').press('Control+Shift+z');
  await expect.poll(async () => (await state(page)).prior.terms[0].length).toBe(4.25);
  await page.getByTestId('redo').click();
  await expect.poll(async () => (await state(page)).prior.terms[0].length).toBe(1.5);

  // a drag of the variance slider (many edits of one field) undoes in one step
  const beforeDrag = (await settle(page)).prior;
  const slider = page.getByTestId('term-0-variance-slider');
  await slider.focus();
  for (let k = 0; k < 12; k++) await slider.press('ArrowRight');
  await expect.poll(async () => (await state(page)).prior.terms[0].variance).not.toBe(beforeDrag.terms[0].variance);
  await page.getByTestId('undo').click();
  await expect.poll(async () => (await state(page)).prior).toEqual(beforeDrag);
  await settle(page);
  expect(w.problems).toEqual([]);
});

test('a reload restores the session (user problem, prior, tab); start over returns to the demo', async ({ page }) => {
  const w = watch(page, ORIGIN);
  await open(page);
  await loadPieces(page);
  await expect(page.getByTestId('problem-source')).toContainText('Trench test', { timeout: 30_000 });
  await settle(page);
  const edited = await setLength(page, '7.5');
  await page.getByTestId('tab-fit').click();
  await expect(page.getByTestId('autosave-status')).toHaveText('Saved', { timeout: 30_000 });
  const plotted = await traceValues(page, 'plot-fit', 'predicted G m̃');
  await page.reload();
  await expect(page.getByTestId('problem-source')).toContainText('Your problem: Trench test', { timeout: 30_000 });
  const s = await settle(page);
  expect(s.prior).toEqual(edited.prior);
  expect(s.tab).toBe('fit');
  await expect.poll(async () => traceValues(page, 'plot-fit', 'predicted G m̃')).toEqual(plotted);

  await page.getByTestId('start-over').click();
  await expect(page.getByTestId('problem-source')).toHaveText('', { timeout: 30_000 });
  const d = await settle(page);
  expect(d.demoId).toBe('borehole-log');
  await expect(page.getByTestId('autosave-status')).toHaveText('Saved', { timeout: 30_000 });
  await page.reload();
  await expect(page.getByTestId('problem-source')).toHaveText('', { timeout: 30_000 });
  expect((await settle(page)).prior).toEqual(d.prior);
  expect(w.problems).toEqual([]);
  expect(w.foreign).toEqual([]);
});

test('a shared link restores the prior on its built-in problem and takes precedence over the autosave', async ({ page, context }) => {
  await open(page, 'crosshole-tomography');
  const shared = await setLength(page, '12');
  await page.getByTestId('share').click();
  const link = await page.getByTestId('share-link').inputValue();
  expect(link).toMatch(/#share=[A-Za-z0-9_-]+$/);
  expect(link.length).toBeLessThan(400);
  // edit further (autosaved), then open the link in the same browser profile
  await page.getByTestId('demo-select').selectOption('borehole-log');
  await settle(page);
  await expect(page.getByTestId('autosave-status')).toHaveText('Saved', { timeout: 30_000 });
  const other = await context.newPage();
  const w = watch(other, ORIGIN);
  await other.goto(link);
  await expect(other.getByRole('status')).toContainText('shared link');
  const s = await settle(other);
  expect(s.demoId).toBe('crosshole-tomography');
  expect(s.prior).toEqual(shared.prior);
  expect(new URL(other.url()).hash).toBe('');
  // a damaged link says so and opens normally
  await other.goto('about:blank');
  await other.goto(link.slice(0, -12) + '!!');
  await expect(other.getByTestId('load-error')).toContainText('shared link');
  expect(w.problems).toEqual([]);
});

test('hostile text from a problem file is shown as text (page and report)', async ({ page }) => {
  const w = watch(page, ORIGIN);
  let dialogs = 0;
  page.on('dialog', (d) => {
    dialogs++;
    void d.dismiss();
  });
  await open(page);
  const hostile = '<img src=x onerror=alert(1)>';
  const json = join(dir, 'hostile.json');
  writeFileSync(
    json,
    JSON.stringify({
      kind: 'priorscope.problem',
      version: 1,
      title: hostile,
      grid: { shape: [4], spacing: [1] },
      operator: {
        dense: [
          [1, 0, 0, 0],
          [0, 0, 1, 1],
        ],
      },
      data: { values: [1, 2], sigma: [0.5, 0.5] },
      quantity: { name: '<b onmouseover=alert(2)>q</b>', unit: '<a href="javascript:alert(4)">u</a>' },
    }),
  );
  await page.getByTestId('load-files-input').setInputFiles(json);
  await expect(page.getByTestId('problem-source')).toContainText(hostile, { timeout: 30_000 });
  await settle(page);
  await page.getByTestId('tab-problem').click();
  await expect(page.getByTestId('screen-problem').getByRole('heading', { level: 2 })).toHaveText(hostile);
  expect(await page.locator('img[src="x"], [onerror], [onmouseover], a[href^="javascript"], [*|href^="javascript"]').count()).toBe(0);
  for (const tab of ['posterior', 'fit', 'prior']) {
    await page.getByTestId(`tab-${tab}`).click();
    await page.waitForTimeout(300);
    expect(await page.locator('img[src="x"], [onerror], [onmouseover], a[href^="javascript"], [*|href^="javascript"]').count(), tab).toBe(
      0,
    );
  }
  // Plotly reads a subset of HTML in labels: the quantity name must show as typed in the axis title.
  await page.getByTestId('tab-posterior').click();
  await expect(page.locator('.ytitle').first()).toContainText('<b onmouseover=alert(2)>q</b> (<a href="javascript:alert(4)">u</a>)');
  await page.getByTestId('export-menu').click();
  const [dl] = await Promise.all([page.waitForEvent('download'), page.getByTestId('report-download').click()]);
  const html = readFileSync(await dl.path(), 'utf8');
  expect(html).toContain('&lt;img src=x onerror=alert(1)&gt;');
  expect(html).not.toContain(hostile);
  expect(html).not.toContain('<script');
  expect(html).not.toContain('<a href');
  expect(html).toContain('qualified professional');
  const report = await page.context().newPage();
  await report.setContent(html);
  expect(await report.locator('img[src="x"], script').count()).toBe(0);
  expect(await report.locator('h1').textContent()).toBe(hostile);
  expect(await report.locator('section svg').count()).toBeGreaterThanOrEqual(4); // coverage, realisations, posterior, data fit
  await page.waitForTimeout(300);
  expect(dialogs).toBe(0);
  expect(w.problems).toEqual([]);
  expect(w.foreign).toEqual([]);
});

test('if a numerics worker dies, the page says so, restarts it and keeps the user problem', async ({ page }) => {
  const w = watch(page, ORIGIN);
  await open(page);
  await loadPieces(page);
  await expect(page.getByTestId('problem-source')).toContainText('Trench test', { timeout: 30_000 });
  const before = await setLength(page, '5');
  const workers = page.workers().filter((x) => !x.url().includes('parseWorker'));
  expect(workers.length).toBeGreaterThanOrEqual(1);
  // test-only: an uncaught error inside the worker, as an out-of-memory abort would give
  await workers[0].evaluate(() => {
    setTimeout(() => {
      throw new Error('simulated worker crash');
    }, 0);
  });
  await expect(page.getByRole('status')).toContainText('numerics worker stopped');
  await expect.poll(async () => (await state(page)).restarts).toBeGreaterThanOrEqual(1);
  await setLength(page, '6');
  const s = await settle(page);
  expect(s.prior.terms[0].length).toBe(6);
  await expect(page.getByTestId('problem-source')).toContainText('Trench test', { timeout: 30_000 });
  const mean = (await traceValues(page, 'plot-posterior', 'posterior mean')) as number[];
  expect(
    maxRelDiff(
      mean,
      posteriorSummary(preparePosterior(P.problem, { ...before.prior, terms: [patchTerm(before.prior.terms[0], { length: 6 })] })).mean,
    ),
  ).toBeLessThan(TOL);
  expect(w.foreign).toEqual([]);
  // the crash itself is the only page-level error allowed
  expect(w.problems.filter((p) => !p.includes('simulated worker crash'))).toEqual([]);
});

test('the template problem loads by drag-and-drop; plots, realisations and the report export; no foreign requests', async ({ page }) => {
  const w = watch(page, ORIGIN);
  const csp = await cspWatch(page);
  await open(page);
  const files = ['problem.json', 'G.mtx'].map((f) => ({ name: f, text: readFileSync(join('public/templates', f), 'utf8') }));
  // drop both files on the page, as a user dragging them from a file manager would
  await page.evaluate((fs) => {
    const dt = new DataTransfer();
    for (const f of fs) dt.items.add(new File([f.text], f.name));
    window.dispatchEvent(new DragEvent('dragover', { dataTransfer: dt, cancelable: true }));
    window.dispatchEvent(new DragEvent('drop', { dataTransfer: dt, cancelable: true }));
  }, files);
  await expect(page.getByTestId('problem-source')).toContainText('Template: soil moisture along a trench (invented)', { timeout: 30_000 });
  const s = await settle(page);
  const { parseProblemFile } = await import('../src/core/io/problemFile.ts');
  const problem = parseProblemFile('problem.json', files[0].text, { readSibling: () => new TextEncoder().encode(files[1].text) }).problem;
  const mean = (await traceValues(page, 'plot-posterior', 'posterior mean')) as number[];
  expect(maxRelDiff(mean, posteriorSummary(preparePosterior(problem, s.prior)).mean)).toBeLessThan(TOL);

  await page.getByTestId('export-menu').click();
  const stem = 'template-soil-moisture-along-a-trench-invented';
  const downloads: import('@playwright/test').Download[] = [];
  page.on('download', (d) => downloads.push(d));
  const plots = await page.evaluate(() =>
    [...document.querySelectorAll<HTMLElement>('.plot')].filter((el) => el.id && el.querySelector('.main-svg')).map((el) => el.clientWidth),
  );
  expect(plots.length).toBeGreaterThan(0);
  for (const f of ['png', 'svg'] as const) {
    downloads.length = 0;
    await page.getByTestId(`export-plots-${f}`).click();
    await expect.poll(() => downloads.length).toBe(plots.length);
    const names = downloads.map((d) => d.suggestedFilename());
    // Named after the problem and the plot's title, never an element id; one name per plot.
    for (const n of names) expect(n).toMatch(new RegExp(`^${stem}--[a-z0-9-]+\\.${f}$`));
    expect(new Set(names).size).toBe(names.length);
    const head = readFileSync((await downloads[0]!.path())!);
    if (f === 'png') {
      expect(Array.from(head.subarray(0, 4))).toEqual([0x89, 0x50, 0x4e, 0x47]);
      // PNG width (bytes 16–19, in the IHDR chunk) is twice the first plot's width on screen.
      expect(head.readUInt32BE(16)).toBe(2 * plots[0]!);
    } else expect(head.toString('utf8')).toContain('<svg');
  }
  await page.getByTestId('export-draw-count').fill('7');
  downloads.length = 0;
  await page.getByTestId('export-prior-draws-npy').click();
  await expect.poll(() => downloads.length).toBe(2);
  const byName = Object.fromEntries(downloads.map((d) => [d.suggestedFilename(), d]));
  const base = `${stem}-prior-realisations-7`;
  expect(Object.keys(byName).sort()).toEqual([`${base}.grid.json`, `${base}.npy`]);
  const { parseNpy } = await import('../src/core/io/npy.ts');
  // draws × cells, as priorscope sample writes them
  expect(parseNpy('d.npy', new Uint8Array(readFileSync(await byName[`${base}.npy`]!.path()))).shape).toEqual([7, 20]);
  const record = JSON.parse(readFileSync(await byName[`${base}.grid.json`]!.path(), 'utf8'));
  expect(record).toMatchObject({
    kind: 'priorscope.realisations',
    count: 7,
    seed: s.seed,
    grid: { shape: [20], spacing: [1], origin: [0] },
  });
  downloads.length = 0;
  await page.getByTestId('export-posterior-draws-csv').click();
  await expect.poll(() => downloads.length).toBe(2);
  const csv = downloads.find((d) => d.suggestedFilename().endsWith('.csv'))!;
  const lines = readFileSync(await csv.path(), 'utf8')
    .trim()
    .split('\n');
  expect(lines).toHaveLength(7);
  expect(lines[0]!.split(',')).toHaveLength(20);
  downloads.length = 0;
  await page.getByTestId('export-cholesky-npy').click();
  await expect.poll(() => downloads.length).toBe(2);
  const factor = downloads.find((d) => d.suggestedFilename().endsWith('.npy'))!;
  expect(factor.suggestedFilename()).toBe(`${stem}-prior-cholesky-factor-20.npy`);
  const L = parseNpy('L.npy', new Uint8Array(readFileSync((await factor.path())!)));
  expect(L.shape).toEqual([20, 20]);
  expect(L.data[1]).toBe(0); // lower triangular
  expect(downloads.map((d) => d.suggestedFilename())).toContain(`${stem}-prior-cholesky-factor-20.grid.json`);
  const [popup] = await Promise.all([page.waitForEvent('popup'), page.getByTestId('report-open').click()]);
  await expect(popup.locator('h1')).toHaveText('Template: soil moisture along a trench (invented)');
  await expect(popup.locator('.caution')).toContainText('qualified professional');
  expect(await popup.locator('section svg').count()).toBeGreaterThanOrEqual(4);
  expect(await csp()).toEqual([]);
  expect(w.problems).toEqual([]);
  expect(w.foreign).toEqual([]);
});

test('the report prints on A4 with every section of the defence document (1-D and 2-D demos)', async ({ page }) => {
  for (const demo of ['borehole-log', 'crosshole-tomography']) {
    await open(page, demo);
    await page.getByTestId('export-menu').click();
    const [dl] = await Promise.all([page.waitForEvent('download'), page.getByTestId('report-download').click()]);
    const html = readFileSync(await dl.path(), 'utf8');
    const report = await page.context().newPage();
    await report.setContent(html);
    expect(await report.locator('section h2').allTextContents()).toHaveLength(10);
    const pdf = (await report.pdf({ format: 'A4', preferCSSPageSize: true })).toString('latin1');
    // page objects (/Type /Page, not /Pages): a few A4 pages, not one squeezed page nor dozens
    const pages = (pdf.match(/\/Type\s*\/Page(?!s)/g) ?? []).length;
    expect(pages, demo).toBeGreaterThanOrEqual(2);
    expect(pages, demo).toBeLessThanOrEqual(6);
    await report.close();
    await page.keyboard.press('Escape');
  }
});
