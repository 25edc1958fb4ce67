/**
 * Acceptance of the "Choose prior" screen in Chromium. Expected numbers are computed
 * here, in Node, with the same numerical core the worker runs (src/core/tuning), for the prior and
 * ranges the page used. Tolerance 1e-9 relative for page-against-Node (same code, IEEE doubles on
 * two V8 builds; common practice, no source); the differences we detect are far larger.
 */
import { expect, test, type Page } from '@playwright/test';
import { DEMOS } from '../src/core/problems/demos.ts';
import { posteriorSummary, preparePosterior } from '../src/core/inverse/posterior.ts';
import { discrepancyScale, evidenceMap, leaveOneOut, logEvidence, priorPredictiveCheck, termLength } from '../src/core/tuning/index.ts';
import type { PriorSpec } from '../src/core/prior/spec.ts';
import { open, screenshot, settle, state, traceValues, watch } from './helpers.ts';

const ORIGIN = 'http://127.0.0.1:' + (process.env.PRIORSCOPE_E2E_PORT ?? 4317);
const TOL = 1e-9;

function demo(id: string) {
  const d = DEMOS.find((x) => x.id === id);
  if (!d) throw new Error(`demo ${id} missing`);
  return d.build();
}
const borehole = demo('borehole-log');

function rel(a: number, b: number): number {
  return Math.abs(a - b) / Math.max(Math.abs(b), 1e-300);
}

async function num(page: Page, testId: string): Promise<number> {
  const v = await page.getByTestId(testId).first().getAttribute('data-value');
  if (v === null || v === '') throw new Error(`${testId} has no value`);
  return Number(v);
}

async function waitStatus(page: Page, kind: string, status: string, timeout = 45_000): Promise<void> {
  await expect(page.getByTestId(`${kind}-status`)).toHaveAttribute('data-status', status, { timeout });
}

/** The default map of the screen: lengths ×1/5 … ×5, variances ×1/100 … ×100, 16 × 16. */
function defaultAxes(prior: PriorSpec) {
  const t = prior.terms[0];
  const l = termLength(t);
  return { lengths: { min: l / 5, max: l * 5, count: 16 }, variances: { min: t.variance / 100, max: t.variance * 100, count: 16 } };
}

async function setField(page: Page, testId: string, value: string): Promise<void> {
  const f = page.getByTestId(testId);
  await f.fill(value);
  await f.press('Enter');
}

test('evidence map on the 1-D demo: maximum equals the core; clicking a cell applies its length and variance', async ({ page }) => {
  const w = watch(page, ORIGIN);
  const s0 = await open(page);
  await page.getByTestId('tab-select').click();
  await page.getByTestId('map-run').click();
  await waitStatus(page, 'evidenceMap', 'done');
  const axes = defaultAxes(s0.prior);
  const expected = evidenceMap(borehole.problem, s0.prior, { term: 0, ...axes });
  expect(expected.best).not.toBeNull();
  const best = expected.best!;
  expect(rel(await num(page, 'map-best-value'), best.logEvidence)).toBeLessThan(TOL);
  expect(rel(await num(page, 'map-best-length'), best.length)).toBeLessThan(TOL);
  expect(rel(await num(page, 'map-best-variance'), best.variance)).toBeLessThan(TOL);
  // The drawn heat map holds every cell: z[j][i] = value at (lengths[i], variances[j]).
  const z = (await traceValues(page, 'plot-evidence-map', 'log evidence', 'z')) as (number | null)[][];
  expect(z).toHaveLength(16);
  let worst = 0;
  for (let j = 0; j < 16; j++) for (let i = 0; i < 16; i++) worst = Math.max(worst, rel(z[j]![i]!, expected.logEvidence[i * 16 + j]!));
  expect(worst).toBeLessThan(TOL);
  // The map really varies (so equality above is not trivial).
  expect(best.logEvidence - Math.min(...Array.from(expected.logEvidence))).toBeGreaterThan(1);

  // Click cell (i = 3, j = 5) on the figure itself.
  const [i, j] = [3, 5];
  const pos = await page.evaluate(
    ([x, y]) => {
      const gd = document.getElementById('plot-evidence-map') as unknown as {
        getBoundingClientRect(): DOMRect;
        _fullLayout: { xaxis: { l2p(v: number): number; _offset: number }; yaxis: { l2p(v: number): number; _offset: number } };
      };
      const r = gd.getBoundingClientRect();
      const L = gd._fullLayout;
      return { x: r.left + L.xaxis._offset + L.xaxis.l2p(x!), y: r.top + L.yaxis._offset + L.yaxis.l2p(y!) };
    },
    [Math.log10(expected.lengths[i]), Math.log10(expected.variances[j])] as const,
  );
  await page.mouse.move(pos.x, pos.y);
  await page.mouse.click(pos.x, pos.y);
  await expect.poll(async () => (await state(page)).prior.terms[0].length).toBe(expected.lengths[i]);
  const s1 = await settle(page);
  expect(s1.prior.terms[0].variance).toBe(expected.variances[j]);
  expect(s1.prior.terms[0].kernel).toBe(s0.prior.terms[0].kernel);
  expect(w.problems).toEqual([]);
  expect(w.foreign).toEqual([]);
});

test('best by evidence applies an optimum whose log evidence is at least the start’s; the nugget stays fixed by default', async ({
  page,
}) => {
  const w = watch(page, ORIGIN);
  const s0 = await open(page);
  await page.getByTestId('tab-select').click();
  await expect(page.getByTestId('fit-nugget')).not.toBeChecked();
  await page.getByTestId('fit-run').click();
  await waitStatus(page, 'typeII', 'done');
  const start = await num(page, 'fit-start-logev');
  const opt = await num(page, 'fit-logev');
  expect(rel(start, logEvidence(borehole.problem, s0.prior))).toBeLessThan(TOL);
  expect(opt).toBeGreaterThanOrEqual(start);
  // The optimum passed the workbench's positive-definiteness check with κ ≤ 1e10.
  await expect(page.getByTestId('fit-conditioning')).toContainText('positive definite, condition number');
  await page.getByTestId('fit-apply').click();
  const s1 = await settle(page);
  expect(s1.prior).not.toEqual(s0.prior);
  expect(s1.prior.nugget).toBe(s0.prior.nugget);
  // The applied prior's evidence, computed here, is the optimum shown and not below the start.
  const applied = logEvidence(borehole.problem, s1.prior);
  expect(rel(applied, opt)).toBeLessThan(TOL);
  expect(applied).toBeGreaterThanOrEqual(logEvidence(borehole.problem, s0.prior));
  expect(w.problems).toEqual([]);
});

test('criteria of the current prior and two pinned candidates match the core; "use this one" restores a candidate', async ({
  page,
}, testInfo) => {
  const w = watch(page, ORIGIN);
  const s0 = await open(page);
  await page.getByTestId('tab-select').click();
  await page.getByTestId('select-view-criteria').click();
  await waitStatus(page, 'criteria', 'done');
  expect(rel(await num(page, 'crit-logev'), logEvidence(borehole.problem, s0.prior))).toBeLessThan(TOL);
  expect(rel(await num(page, 'crit-loo'), leaveOneOut(borehole.problem, s0.prior).logScore)).toBeLessThan(TOL);
  await expect(page.getByTestId('criteria-explanation')).toContainText('different questions');
  // Both forms of the discrepancy rule, each saying what it targets, with the core's scales.
  expect(rel(await num(page, 'crit-discrepancy'), discrepancyScale(borehole.problem, s0.prior).scale)).toBeLessThan(TOL);
  expect(
    rel(await num(page, 'crit-discrepancy-expected'), discrepancyScale(borehole.problem, s0.prior, { form: 'expected' }).scale),
  ).toBeLessThan(TOL);
  await expect(page.getByTestId('crit-discrepancy-row')).toContainText('Targets χ² = M = 50');
  await expect(page.getByTestId('crit-discrepancy-expected-row')).toContainText('M minus the resolved parameters');
  await screenshot(page, testInfo, 'select-criteria');

  await page.getByTestId('select-pin').click();
  await setField(page, 'term-0-length-input', '2.5');
  const s1 = await settle(page);
  expect(s1.prior.terms[0].length).toBe(2.5);
  await page.getByTestId('select-pin').click();
  await page.getByTestId('select-view-candidates').click();
  await waitStatus(page, 'candidates', 'done');
  await expect(page.getByTestId('scores-table').locator('tbody tr')).toHaveCount(2);
  for (const [k, prior] of [s0.prior, s1.prior].entries()) {
    const post = posteriorSummary(preparePosterior(borehole.problem, prior));
    expect(rel(await num(page, `score-${k}-logEvidence`), logEvidence(borehole.problem, prior))).toBeLessThan(TOL);
    expect(rel(await num(page, `score-${k}-loo`), leaveOneOut(borehole.problem, prior).logScore)).toBeLessThan(TOL);
    expect(rel(await num(page, `score-${k}-chi2`), post.chi2 / post.fitReference!.expected)).toBeLessThan(TOL);
    expect(rel(await num(page, `score-${k}-ppp`), priorPredictiveCheck(borehole.problem, prior).pTwoSided)).toBeLessThan(1e-6);
  }
  // The two candidates differ in the table (so the comparison is not vacuous).
  expect(Math.abs((await num(page, 'score-0-logEvidence')) - (await num(page, 'score-1-logEvidence')))).toBeGreaterThan(1e-3);
  await expect(page.getByTestId('plot-candidate-bands')).toBeVisible();
  await page.getByTestId('candidate-use-0').click();
  const s2 = await settle(page);
  expect(s2.prior).toEqual(s0.prior);
  expect(w.problems).toEqual([]);
});

test('cancel stops a running evidence map and frees the worker for the next one', async ({ page }) => {
  test.setTimeout(120_000);
  const w = watch(page, ORIGIN);
  await open(page, 'crosshole-tomography');
  await page.getByTestId('tab-select').click();
  // 200 lengths × 16 variances on the 2-D demo: many seconds of work (≈ 0.15 s per row in Node).
  await setField(page, 'map-lengths-count', '200');
  await page.getByTestId('map-run').click();
  await expect(page.getByTestId('evidenceMap-progress')).toBeVisible();
  await expect
    .poll(async () => Number(await page.getByTestId('evidenceMap-progress').getAttribute('value')), { timeout: 30_000 })
    .toBeGreaterThan(0);
  await page.getByTestId('evidenceMap-cancel').click();
  await waitStatus(page, 'evidenceMap', 'cancelled', 5_000);
  // A small map now finishes quickly: the worker is not still busy with the cancelled one.
  await setField(page, 'map-lengths-count', '2');
  await setField(page, 'map-variances-count', '2');
  const t0 = Date.now();
  await page.getByTestId('map-run').click();
  await waitStatus(page, 'evidenceMap', 'done', 15_000);
  const elapsed = Date.now() - t0;
  // The remaining rows of the big map would take ≥ 20 s.
  expect(elapsed).toBeLessThan(12_000);
  const z = (await traceValues(page, 'plot-evidence-map', 'log evidence', 'z')) as number[][];
  expect(z).toHaveLength(2);
  expect(w.problems).toEqual([]);
});
