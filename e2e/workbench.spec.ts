/**
 * Acceptance of the workbench in Chromium. Expected numbers are computed here, in Node,
 * with the same numerical core the worker runs, for the prior the page reports it used.
 *
 * Tolerance for page-against-Node comparisons: the same code in IEEE double arithmetic on two V8
 * builds; we allow 1e-9 relative for round-off differences (common practice, no source). The
 * changes we detect are many orders of magnitude larger (asserted in each test).
 */
import { expect, test } from '@playwright/test';
import { patchTerm } from '../src/core/kernels/spec.ts';
import { DEMOS } from '../src/core/problems/demos.ts';
import { posteriorSummary, preparePosterior, resolutionRow } from '../src/core/inverse/posterior.ts';
import { priorRealisations } from '../src/core/sampling/realisations.ts';
import { maxRelDiff, open, screenshot, settle, state, traceNames, traceValues, watch } from './helpers.ts';

const TOL = 1e-9;
const ORIGIN = 'http://127.0.0.1:' + (process.env.PRIORSCOPE_E2E_PORT ?? 4317);

function demo(id: string) {
  const d = DEMOS.find((x) => x.id === id);
  if (!d) throw new Error(`demo ${id} missing`);
  return d.build();
}

const borehole = demo('borehole-log');

test('loads the 1-D demo with posterior mean, bands and data fit; no console errors; no foreign requests', async ({ page }) => {
  const w = watch(page, ORIGIN);
  const s = await open(page);
  expect(s.demoId).toBe('borehole-log');
  // The worker compiled the WebAssembly SIMD kernels under the page's CSP (a fallback would say 'JavaScript').
  expect(s.numericKernels).toBe('WebAssembly SIMD');
  await expect(page.getByTestId('demo-select')).toHaveValue('borehole-log');
  const names = await traceNames(page, 'plot-posterior');
  for (const n of ['posterior mean', 'posterior 68%', 'posterior 95%', 'prior 95%', 'truth']) expect(names).toContain(n);
  const mean = (await traceValues(page, 'plot-posterior', 'posterior mean')) as number[];
  expect(mean).toHaveLength(200);
  // The drawn mean is the core's posterior mean for the page's prior (the demo's starting prior).
  expect(s.prior).toEqual(borehole.startPrior);
  const expected = posteriorSummary(preparePosterior(borehole.problem, s.prior));
  expect(maxRelDiff(mean, expected.mean)).toBeLessThan(TOL);
  // the 95% band is mean ± 1.96 σ of the core's posterior std
  const upper95 = ((await traceValues(page, 'plot-posterior', 'posterior 95%')) as number[]).slice(0, 200);
  expect(
    maxRelDiff(
      upper95,
      Array.from(expected.mean, (m, i) => m + 1.959963984540054 * expected.std[i]),
    ),
  ).toBeLessThan(TOL);

  await page.getByTestId('tab-fit').click();
  await expect(page.getByTestId('plot-fit')).toBeVisible();
  // The plot's element is visible before Plotly has drawn into it: wait for both traces.
  await expect.poll(async () => (await traceValues(page, 'plot-fit', 'predicted G m̃')).length).toBe(expected.predicted.length);
  await expect.poll(async () => (await traceValues(page, 'plot-residuals', 'normalised residual')).length).toBe(expected.residuals.length);
  const predicted = (await traceValues(page, 'plot-fit', 'predicted G m̃')) as number[];
  expect(maxRelDiff(predicted, expected.predicted)).toBeLessThan(TOL);
  const residuals = (await traceValues(page, 'plot-residuals', 'normalised residual')) as number[];
  expect(maxRelDiff(residuals, expected.residuals)).toBeLessThan(TOL);
  // χ² against its reference under the model: the borehole demo's χ² = 7.2 with M = 50
  // lies inside the interval around M − tr R = 9.6 and is not flagged (against χ²_50 it was "over-fitted").
  const ref = expected.fitReference!;
  const shown = async (id: string) => Number(await page.getByTestId(id).textContent());
  expect(Math.abs((await shown('chi2-value')) / expected.chi2 - 1)).toBeLessThan(1e-3);
  expect(Math.abs((await shown('chi2-expected')) / ref.expected - 1)).toBeLessThan(1e-3);
  await expect(page.getByTestId('chi2-interval')).toHaveText(
    `[${Number(ref.interval95[0].toPrecision(4))}, ${Number(ref.interval95[1].toPrecision(4))}]`,
  );
  await expect(page.getByTestId('chi2-verdict')).toHaveAttribute('data-position', 'inside');
  await expect(page.getByTestId('chi2-verdict')).not.toContainText('over-fitted');
  await expect(page.getByTestId('caution')).toContainText('qualified professional');
  await expect(page.getByTestId('pd-status')).toBeVisible();

  expect(w.problems).toEqual([]);
  expect(w.foreign).toEqual([]);
});

test('changing a correlation length changes the posterior to the core numbers for that prior', async ({ page }) => {
  const w = watch(page, ORIGIN);
  await open(page);
  const before = (await traceValues(page, 'plot-posterior', 'posterior mean')) as number[];
  const input = page.getByTestId('term-0-length-input');
  await input.fill('2.5');
  await input.press('Enter');
  const s = await settle(page);
  expect(s.prior.terms[0].length).toBe(2.5);
  await expect
    .poll(async () => maxRelDiff((await traceValues(page, 'plot-posterior', 'posterior mean')) as number[], before))
    .toBeGreaterThan(1e-4);
  const after = (await traceValues(page, 'plot-posterior', 'posterior mean')) as number[];
  const expected = posteriorSummary(
    preparePosterior(borehole.problem, { ...borehole.startPrior, terms: [patchTerm(borehole.startPrior.terms[0], { length: 2.5 })] }),
  );
  expect(maxRelDiff(after, expected.mean)).toBeLessThan(TOL);
  const std = ((await traceValues(page, 'plot-posterior', 'posterior 68%')) as number[]).slice(0, 200);
  expect(
    maxRelDiff(
      std,
      Array.from(expected.mean, (m, i) => m + expected.std[i]),
    ),
  ).toBeLessThan(TOL);
  expect(w.problems).toEqual([]);
});

test('a Gaussian kernel far longer than the spacing is flagged with a jitter; applying it clears the status', async ({ page }) => {
  const w = watch(page, ORIGIN);
  await open(page);
  await expect(page.getByTestId('pd-status')).toHaveAttribute('data-level', 'ok');
  await page.getByTestId('term-0-kernel').selectOption('gaussian');
  const input = page.getByTestId('term-0-length-input');
  await input.fill('20'); // 40 cell spacings (at 40 m the core's eigenvalue iteration fails today; see report)
  await input.press('Enter');
  await page.getByTestId('nugget-input').fill('0');
  await page.getByTestId('nugget-input').press('Enter');
  await expect(page.getByTestId('pd-status')).toHaveAttribute('data-level', /not-pd|not-decided|near-singular/, { timeout: 45_000 });
  await expect(page.getByTestId('pd-jitter')).toBeVisible();
  await expect(page.getByTestId('pd-warnings')).not.toBeEmpty();
  const jitter = (await state(page)).diagnostics!.suggestedJitter!;
  expect(jitter).toBeGreaterThan(0);
  await page.getByTestId('apply-jitter').click();
  await expect(page.getByTestId('pd-status')).toHaveAttribute('data-level', 'ok', { timeout: 45_000 });
  const s = await state(page);
  expect(s.prior.nugget).toBe(jitter);
  await expect(page.getByTestId('pd-jitter')).toHaveCount(0);
  expect(w.problems).toEqual([]);
});

test('redraw with a new seed changes the realisations; the same seed reproduces them', async ({ page }) => {
  const w = watch(page, ORIGIN);
  await open(page);
  await page.getByTestId('tab-realisations').click();
  const seedInput = page.getByTestId('seed-input');
  const readDraws = async () => {
    await expect(page.getByTestId('plot-prior-draws')).toBeVisible();
    await settle(page);
    await expect.poll(async () => (await state(page)).computedFor.priorDraws?.endsWith(`:${(await state(page)).seed}`)).toBe(true);
    await expect.poll(async () => (await state(page)).busy.priorDraws ?? false).toBe(false);
    await page.waitForTimeout(200); // let plotly finish the redraw
    const out: number[][] = [];
    for (let k = 1; k <= 6; k++) out.push((await traceValues(page, 'plot-prior-draws', `draw ${k}`)) as number[]);
    return out;
  };
  await seedInput.fill('123');
  await seedInput.press('Enter');
  const a = await readDraws();
  expect(a.every((d) => d.length === 200)).toBe(true);
  const prior = (await state(page)).prior;
  const core = priorRealisations(borehole.problem.grid, prior, 6, 123);
  expect(maxRelDiff(a.flat(), core.data)).toBeLessThan(TOL);
  await page.getByTestId('redraw').click();
  const newSeed = (await state(page)).seed;
  expect(newSeed).not.toBe(123);
  await expect(seedInput).toHaveValue(String(newSeed));
  const b = await readDraws();
  expect(maxRelDiff(b.flat(), a.flat())).toBeGreaterThan(1e-3);
  await seedInput.fill('123');
  await seedInput.press('Enter');
  const c = await readDraws();
  expect(c).toEqual(a);
  await expect(page.getByTestId('plot-posterior-draws')).toBeVisible();
  expect(w.problems).toEqual([]);
});

for (const id of ['crosshole-tomography', 'potential-field']) {
  test(`2-D demo ${id} renders its maps and a clicked cell shows its averaging kernel`, async ({ page }, info) => {
    test.setTimeout(120_000);
    const w = watch(page, ORIGIN);
    const built = demo(id);
    const [nx, ny] = built.problem.grid.shape as [number, number];
    await open(page, id);
    for (const plot of ['plot-posterior-mean', 'plot-posterior-std', 'plot-variance-reduction', 'plot-truth']) {
      await expect(page.getByTestId(plot)).toBeVisible();
    }
    const z = (await traceValues(page, 'plot-posterior-mean', 'mean', 'z')) as number[][];
    expect(z).toHaveLength(ny);
    expect(z[0]).toHaveLength(nx);
    const s = await state(page);
    const post = preparePosterior(built.problem, s.prior);
    expect(maxRelDiff(z.flat(), posteriorSummary(post).mean)).toBeLessThan(TOL);

    // click inside the mean map's plotting area
    const drag = page.locator('#plot-posterior-mean .nsewdrag').first();
    const box = (await drag.boundingBox())!;
    await page.mouse.click(box.x + box.width * 0.3, box.y + box.height * 0.4);
    await expect(page.getByTestId('plot-kernel')).toBeVisible({ timeout: 45_000 });
    await expect.poll(async () => (await state(page)).busy.resolution ?? true, { timeout: 45_000 }).toBe(false);
    const cell = (await state(page)).selectedCell!;
    expect(cell).toBeGreaterThanOrEqual(0);
    expect(cell).toBeLessThan(nx * ny);
    // roughly where we clicked: 30% across, 40% down
    expect(Math.abs((cell % nx) / nx - 0.3)).toBeLessThan(0.1);
    expect(Math.abs(Math.floor(cell / nx) / ny - 0.4)).toBeLessThan(0.12);
    await page.waitForTimeout(200);
    const kernel = (await traceValues(page, 'plot-kernel', 'R row', 'z')) as number[][];
    expect(maxRelDiff(kernel.flat(), resolutionRow(post, cell))).toBeLessThan(TOL);
    await screenshot(page, info, `${id}-posterior`);
    expect(w.problems).toEqual([]);
  });
}

test('20 rapid slider changes in a second end in the last value, with no errors', async ({ page }) => {
  const w = watch(page, ORIGIN);
  await open(page);
  const slider = page.getByTestId('term-0-length-slider');
  const positions = Array.from({ length: 20 }, (_, k) => 100 + 7 * k);
  // 20 input events 50 ms apart inside the page (as a drag produces them), within one second.
  const elapsed = await slider.evaluate(async (el, list) => {
    const input = el as HTMLInputElement;
    const setValue = Object.getOwnPropertyDescriptor(HTMLInputElement.prototype, 'value')!.set!;
    const t0 = performance.now();
    for (let k = 0; k < list.length; k++) {
      const wait = t0 + 50 * k - performance.now(); // absolute schedule: event k at 50·k ms
      if (wait > 0) await new Promise((r) => setTimeout(r, wait));
      setValue.call(input, String(list[k]));
      input.dispatchEvent(new Event('input', { bubbles: true }));
    }
    return performance.now() - t0;
  }, positions);
  // 19 gaps of 50 ms = 950 ms; the margin covers a busy 2-core test machine
  expect(elapsed).toBeLessThan(1400);
  expect((await state(page)).priorRevision).toBeGreaterThanOrEqual(20);
  const s = await settle(page);
  await expect(slider).toHaveValue(String(positions[positions.length - 1]));
  const shown = Number(await page.getByTestId('term-0-length-input').inputValue());
  expect(s.prior.terms[0].length).toBe(shown);
  // the last value, not an earlier one: slider positions map monotonically to lengths
  const max = Number(await slider.getAttribute('max'));
  expect(max).toBeGreaterThan(positions[positions.length - 1]);
  await expect
    .poll(async () => {
      const mean = (await traceValues(page, 'plot-posterior', 'posterior mean')) as number[];
      const expected = posteriorSummary(preparePosterior(borehole.problem, s.prior)).mean;
      return maxRelDiff(mean, expected);
    })
    .toBeLessThan(TOL);
  expect(Object.keys(s.errors)).toEqual([]);
  await expect(page.locator('[role=alert]')).toHaveCount(0);
  expect(w.problems).toEqual([]);
});

test('every control is reachable and usable from the keyboard', async ({ page }) => {
  await open(page);
  // tabs: arrow keys move between screens
  await page.getByTestId('tab-posterior').focus();
  await page.keyboard.press('ArrowRight');
  await expect(page.getByTestId('tab-fit')).toHaveAttribute('aria-selected', 'true');
  await page.keyboard.press('ArrowLeft');
  await page.keyboard.press('ArrowLeft');
  await expect(page.getByTestId('tab-realisations')).toHaveAttribute('aria-selected', 'true');
  // a slider moves with the arrow keys and updates the prior
  const before = (await state(page)).prior.terms[0].variance;
  await page.getByTestId('term-0-variance-slider').focus();
  await page.keyboard.press('ArrowRight');
  await expect.poll(async () => (await state(page)).prior.terms[0].variance).toBeGreaterThan(before);
  // add a term with Enter, remove it again
  await page.getByTestId('add-term').focus();
  await page.keyboard.press('Enter');
  await expect(page.getByTestId('term-1')).toBeVisible();
  await page.getByTestId('term-1-remove').focus();
  await page.keyboard.press('Enter');
  await expect(page.getByTestId('term-1')).toHaveCount(0);
  // bad typed input gets a precise message and leaves the prior alone
  const len = (await state(page)).prior.terms[0].length;
  await page.getByTestId('term-0-length-input').fill('-3');
  await page.getByTestId('term-0-length-input').press('Enter');
  await expect(page.getByRole('alert').first()).toContainText('Length ℓ must be > 0');
  expect((await state(page)).prior.terms[0].length).toBe(len);
  // every control has a tooltip with its formula or meaning
  const untitled = await page.evaluate(
    () => [...document.querySelectorAll('.prior-panel input, .prior-panel select')].filter((e) => !e.getAttribute('title')).length,
  );
  expect(untitled).toBe(0);
});

test('screenshots of each screen (1-D demo, and the 2-D demos on every screen)', async ({ page }, info) => {
  test.setTimeout(180_000);
  for (const id of ['borehole-log', 'crosshole-tomography', 'potential-field']) {
    await open(page, id);
    for (const tab of ['problem', 'prior', 'realisations', 'posterior', 'fit']) {
      await page.getByTestId(`tab-${tab}`).click();
      await expect(page.getByTestId(`screen-${tab}`)).toBeVisible();
      await settle(page);
      await expect.poll(async () => Object.values((await state(page)).busy).some(Boolean), { timeout: 60_000 }).toBe(false);
      await page.waitForTimeout(300);
      await screenshot(page, info, `${id}-${tab}`);
    }
  }
});

test('"Pin as candidate" in the prior panel pins the current prior once and lists it on the Choose prior screen', async ({ page }) => {
  const w = watch(page, ORIGIN);
  const s0 = await open(page);
  const pin = page.getByTestId('pin-candidate');
  await expect(pin).toBeEnabled();
  await pin.click();
  await expect.poll(async () => ((await state(page)) as unknown as { candidates: { prior: unknown }[] }).candidates.length).toBe(1);
  const s1 = (await state(page)) as unknown as { candidates: { prior: unknown }[] };
  expect(s1.candidates[0].prior).toEqual(s0.prior);
  // The same prior cannot be pinned twice; a changed prior can.
  await expect(pin).toBeDisabled();
  await page.getByTestId('term-0-variance-slider').focus();
  await page.keyboard.press('ArrowRight');
  await expect(pin).toBeEnabled();
  await pin.click();
  await expect.poll(async () => ((await state(page)) as unknown as { candidates: unknown[] }).candidates.length).toBe(2);
  await page.getByTestId('tab-select').click();
  await expect(page.getByTestId('select-pin')).toContainText('(2/');
  expect(w.problems).toEqual([]);
});

test('evidence map cells are reachable from the keyboard: arrows move the highlighted cell, Enter applies it', async ({ page }) => {
  const w = watch(page, ORIGIN);
  const s0 = await open(page);
  await page.getByTestId('tab-select').click();
  await page.getByTestId('map-run').click();
  await expect(page.getByTestId('map-best')).toBeVisible({ timeout: 45_000 });
  // The map's axes as drawn: x = log10 length, y = log10 variance (row-major index i·nv + j).
  const axes = await page.evaluate(() => {
    const gd = document.getElementById('plot-evidence-map') as unknown as { data: { name?: string; x: number[]; y: number[] }[] };
    const t = gd.data.find((d) => d.name === 'log evidence')!;
    return { lengths: Array.from(t.x, (v) => 10 ** v), variances: Array.from(t.y, (v) => 10 ** v) };
  });
  const nv = axes.variances.length;
  const keys = page.getByTestId('map-keys');
  await keys.focus();
  await page.keyboard.press('ArrowRight'); // first key shows the cursor at the maximum
  const first = Number(await page.getByTestId('map-cursor').getAttribute('data-index'));
  const [i0, j0] = [Math.floor(first / nv), first % nv];
  // Move inwards so that the steps are not clipped at an edge.
  const di = i0 >= 2 ? -2 : 2;
  const dj = j0 >= 1 ? -1 : 1;
  for (let k = 0; k < 2; k++) await page.keyboard.press(di < 0 ? 'ArrowLeft' : 'ArrowRight');
  await page.keyboard.press(dj < 0 ? 'ArrowDown' : 'ArrowUp');
  const i = i0 + di;
  const j = j0 + dj;
  await expect(page.getByTestId('map-cursor')).toHaveAttribute('data-index', String(i * nv + j));
  await page.keyboard.press('Enter');
  await expect.poll(async () => (await state(page)).priorRevision).toBeGreaterThan(s0.priorRevision);
  const s1 = await settle(page);
  // Values travel through log10 and back in the test only; the prior holds the map's own numbers.
  expect(Math.abs(s1.prior.terms[0].length! / axes.lengths[i] - 1)).toBeLessThan(1e-12);
  expect(Math.abs(s1.prior.terms[0].variance / axes.variances[j] - 1)).toBeLessThan(1e-12);
  expect(w.problems).toEqual([]);
});
