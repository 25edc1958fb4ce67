/**
 * One orientation on every 2-D plot: a rotated anisotropic prior must tilt the
 * same way on screen in the correlation map as in its realisations.
 *
 * Tilt as drawn: with X the offset to the right and U the offset upwards on screen (U = −Δy when
 * the y axis is reversed, +Δy otherwise), the sign of Σ ρ·X·U over the map says whether the
 * correlation ellipse rises or falls to the right. For the realisations the same sign comes from
 * the neighbour products: the field is more alike along the diagonal it is stretched along, so
 * sign(C(+1,+1) − C(+1,−1)) in grid steps gives the direction in (x, y), turned into screen terms
 * by the same rule. Nothing here is computed by the page's own code.
 */
import { expect, test } from '@playwright/test';
import { open, screenshot, traceValues } from './helpers.ts';

/** Whether the drawn y axis runs downwards: plotly's computed range starts above where it ends. */
async function reversedY(page: import('@playwright/test').Page, plotId: string): Promise<boolean> {
  const range = await page.evaluate((id) => {
    const gd = document.getElementById(id) as unknown as { _fullLayout?: { yaxis?: { range?: number[] } } } | null;
    return gd?._fullLayout?.yaxis?.range ?? null;
  }, plotId);
  expect(range, `${plotId} has a y range`).not.toBeNull();
  return range![0] > range![1];
}

async function axisValues(page: import('@playwright/test').Page, plotId: string, name: string, key: 'x' | 'y'): Promise<number[]> {
  return page.evaluate(
    ([id, n, k]) => {
      const gd = document.getElementById(id!) as unknown as { data?: Record<string, unknown>[] } | null;
      const t = gd?.data?.find((d) => d.name === n);
      return t ? Array.from(t[k!] as ArrayLike<number>) : [];
    },
    [plotId, name, key] as const,
  );
}

test('the correlation map tilts the same way as a rotated realisation, and says which way is down', async ({ page }, info) => {
  await open(page, 'crosshole-tomography');
  // Term 1: exponential, 6 m along an axis at 35° from +x towards +y, 0.6 m across it.
  await page.getByTestId('term-0-anisotropic').check();
  for (const [id, v] of [
    ['term-0-length1-input', '6'],
    ['term-0-length2-input', '0.6'],
    ['term-0-angle-input', '35'],
  ] as const) {
    const f = page.getByTestId(id);
    await f.fill(v);
    await f.press('Enter');
  }
  await page.getByTestId('tab-prior').click();
  await expect(page.locator('#plot-correlation-map')).toBeVisible();
  await expect.poll(async () => (await traceValues(page, 'plot-correlation-map', 'ρ', 'z')).length, { timeout: 30_000 }).toBeGreaterThan(0);
  await expect(page.getByTestId('orientation-note')).toContainText('x to the right, depth increasing downwards');
  await expect(page.locator('#plot-correlation-map .ytitle')).toHaveText('Δdepth (m) ↓');

  const z = (await traceValues(page, 'plot-correlation-map', 'ρ', 'z')) as number[][];
  const xs = await axisValues(page, 'plot-correlation-map', 'ρ', 'x');
  const ys = await axisValues(page, 'plot-correlation-map', 'ρ', 'y');
  const mapUp = (await reversedY(page, 'plot-correlation-map')) ? -1 : 1;
  let mapMoment = 0;
  z.forEach((row, j) => row.forEach((rho, i) => (mapMoment += rho * xs[i] * mapUp * ys[j])));
  expect(Math.abs(mapMoment)).toBeGreaterThan(0);
  await screenshot(page, info, 'orientation-prior');

  await page.getByTestId('tab-realisations').click();
  await expect
    .poll(async () => (await traceValues(page, 'plot-prior-draws', 'draw 1', 'z')).length, { timeout: 45_000 })
    .toBeGreaterThan(0);
  let along = 0;
  let across = 0;
  for (let k = 1; k <= 6; k++) {
    const f = (await traceValues(page, 'plot-prior-draws', `draw ${k}`, 'z')) as number[][];
    for (let j = 1; j + 1 < f.length; j++) {
      for (let i = 0; i + 1 < f[j].length; i++) {
        along += f[j][i] * f[j + 1][i + 1]; // step (+1, +1) in (x, y)
        across += f[j][i] * f[j - 1][i + 1]; // step (+1, −1)
      }
    }
  }
  // Stretched along (+x, +y) in grid terms (35° lies between 0° and 90°): the data agree.
  expect(along).toBeGreaterThan(across);
  const drawUp = (await reversedY(page, 'plot-prior-draws')) ? -1 : 1;
  // On screen: (+1, +1) in (x, y) rises to the right when up = +y, falls when y is reversed.
  const drawTilt = Math.sign(along - across) * drawUp;
  await screenshot(page, info, 'orientation-realisations');
  expect(drawUp).toBe(-1); // the sections are drawn depth-down
  expect(Math.sign(mapMoment)).toBe(drawTilt);
});
