/** The overview is the first screen: prior realisations, posterior and data fit of one prior together. */
import { expect, test } from '@playwright/test';
import { open, settle, state, traceNames, watch } from './helpers.ts';

const ORIGIN = `http://127.0.0.1:${process.env.PRIORSCOPE_E2E_PORT ?? 4173}`;

test('the first view shows prior realisations, posterior with bands and the data fit together (1-D)', async ({ page }, info) => {
  const w = watch(page, ORIGIN);
  const s = await open(page, undefined, 'overview');
  expect(s.tab).toBe('overview');
  await expect(page.getByTestId('screen-overview')).toBeVisible();
  await expect
    .poll(async () => (await traceNames(page, 'ov-prior')).filter((n) => n.startsWith('realisation')).length, { timeout: 30_000 })
    .toBe(3);
  expect(await traceNames(page, 'ov-posterior')).toEqual(
    expect.arrayContaining(['posterior mean', 'posterior 68%', 'posterior 95%', 'prior 95%']),
  );
  expect(await traceNames(page, 'ov-fit')).toEqual(['observed ±1σ', 'predicted G m̃']);
  await expect(page.getByTestId('overview-chi2')).toContainText('expected');
  // every panel is redrawn for a new prior, and the mark says so
  const before = await page.evaluate(() => performance.getEntriesByName('ps:overview-drawn').length);
  await page.getByTestId('term-0-length-slider').fill('150');
  await settle(page);
  await expect
    .poll(() => page.evaluate(() => performance.getEntriesByName('ps:overview-drawn').length), { timeout: 30_000 })
    .toBeGreaterThan(before);
  await page.screenshot({ path: info.outputPath('overview-1d.png'), fullPage: true });
  expect(w.problems).toEqual([]);
});

test('2-D overview: realisations and posterior mean on one diverging range about the prior mean, maps at true aspect', async ({
  page,
}, info) => {
  await open(page, 'potential-field', 'overview');
  for (const id of ['ov-draw-1', 'ov-draw-2', 'ov-mean', 'ov-std', 'ov-fit'])
    await expect(page.getByTestId(id)).toBeVisible({ timeout: 30_000 });
  await expect.poll(async () => (await traceNames(page, 'ov-std')).length, { timeout: 30_000 }).toBe(1);
  const s = await state(page);
  const c = 'constant' in s.prior.mean ? s.prior.mean.constant : Number.NaN;
  const info2 = await page.evaluate(() =>
    ['ov-draw-1', 'ov-draw-2', 'ov-mean', 'ov-std'].map((id) => {
      const gd = document.getElementById(id) as unknown as {
        data: { zmin: number; zmax: number }[];
        _fullLayout: { xaxis: { _length: number; range: number[] }; yaxis: { _length: number; range: number[] } };
      };
      const fl = gd._fullLayout;
      return {
        zmin: gd.data[0].zmin,
        zmax: gd.data[0].zmax,
        w: fl.xaxis._length,
        h: fl.yaxis._length,
        xr: fl.xaxis.range,
        yr: fl.yaxis.range,
      };
    }),
  );
  const [d1, d2, mean, std] = info2 as { zmin: number; zmax: number; w: number; h: number; xr: number[]; yr: number[] }[];
  expect(d1!.zmin).toBe(d2!.zmin);
  expect(d1!.zmax).toBe(mean!.zmax);
  expect((d1!.zmin + d1!.zmax) / 2).toBeCloseTo(c, 9);
  expect(std!.zmin).toBe(0);
  // true aspect: pixels per metre equal on both axes (the section is 2000 m × 500 m)
  for (const m of [d1!, mean!]) {
    const sx = m.w / Math.abs(m.xr[1] - m.xr[0]);
    const sy = m.h / Math.abs(m.yr[1] - m.yr[0]);
    expect(sy / sx).toBeCloseTo(1, 2);
  }
  // the gravity stations have positions: the data fit runs along the profile, not along datum number
  const fitAxis = await page.evaluate(() => {
    const gd = document.getElementById('ov-fit') as unknown as {
      data: { x: number[] }[];
      _fullLayout: { xaxis: { title: { text: string } } };
    };
    return { title: gd._fullLayout.xaxis.title.text, x: Array.from(gd.data[0].x) };
  });
  expect(fitAxis.title).toContain('where measured');
  expect(fitAxis.x.length).toBe(40);
  expect(fitAxis.x.every((v, i) => i === 0 || v >= fitAxis.x[i - 1]!)).toBe(true);
  expect(fitAxis.x[fitAxis.x.length - 1]! - fitAxis.x[0]!).toBeGreaterThan(1000);
  // limits by hand
  await page.getByTestId('colour-limit').fill('100');
  await page.getByTestId('colour-limit').press('Enter');
  await expect
    .poll(() => page.evaluate(() => (document.getElementById('ov-draw-1') as unknown as { data: { zmax: number }[] }).data[0].zmax))
    .toBeCloseTo(c + 100, 9);
  await page.screenshot({ path: info.outputPath('overview-2d.png'), fullPage: true });
});
