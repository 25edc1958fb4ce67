/** Shared helpers for the workbench end-to-end specs. */
import { expect, type Page, type TestInfo } from '@playwright/test';
import { mkdirSync, writeFileSync } from 'node:fs';
import { join } from 'node:path';
import type { PriorSpec } from '../src/core/prior/spec.ts';

export interface PageState {
  demoId: string;
  problemVersion: number | null;
  numericKernels: 'WebAssembly SIMD' | 'JavaScript' | null;
  prior: PriorSpec;
  priorRevision: number;
  seed: number;
  tab: string;
  selectedCell: number | null;
  errors: Record<string, string>;
  busy: Record<string, boolean>;
  computedFor: Record<string, string>;
  diagnostics: { positiveDefinite: boolean; suggestedJitter: number | null } | null;
  restarts: number;
}

/** Records console errors, page errors and every request that leaves the page's origin. */
export function watch(page: Page, origin: string) {
  const problems: string[] = [];
  const foreign: string[] = [];
  page.on('console', (m) => {
    if (m.type() === 'error') problems.push(`console: ${m.text()}`);
  });
  page.on('pageerror', (e) => problems.push(`page error: ${e.message}`));
  page.on('request', (r) => {
    const url = r.url();
    if (url.startsWith('data:') || url.startsWith('blob:')) return;
    if (new URL(url).origin !== origin) foreign.push(url);
  });
  return { problems, foreign };
}

export async function state(page: Page): Promise<PageState> {
  return (await page.evaluate(() => (window as unknown as { __priorscope: { getState(): unknown } }).__priorscope.getState())) as PageState;
}

/** Wait until nothing is being computed and the posterior is up to date for the current prior. */
export async function settle(page: Page): Promise<PageState> {
  await expect
    .poll(
      async () => {
        const s = await state(page);
        const busy = Object.values(s.busy).some(Boolean);
        const rev = `${s.problemVersion}:${s.priorRevision}`;
        return !busy && s.computedFor.posterior === rev;
      },
      { timeout: 45_000 },
    )
    .toBe(true);
  return state(page);
}

/**
 * Open the page (a demo when given) and wait until it is up to date. The page opens on the
 * overview; the specs written for one screen go to `tab` (the posterior screen unless told).
 */
export async function open(page: Page, demo?: string, tab = 'posterior'): Promise<PageState> {
  await page.goto(demo ? `/?demo=${demo}` : '/');
  await expect(page.getByTestId('activity')).toHaveText('Up to date', { timeout: 45_000 });
  if (tab !== 'overview') {
    await settle(page);
    await page.getByTestId(`tab-${tab}`).click();
  }
  return settle(page);
}

/** y values (or z rows) of the named trace of a plotly figure, read from the graph div. */
export async function traceValues(page: Page, plotId: string, traceName: string, key: 'y' | 'z' = 'y'): Promise<number[] | number[][]> {
  return page.evaluate(
    ([id, name, k]) => {
      const gd = document.getElementById(id!) as unknown as { data?: Record<string, unknown>[] } | null;
      const t = gd?.data?.find((d) => d.name === name);
      if (!t) return [];
      const v = t[k!] as ArrayLike<number> | ArrayLike<number>[];
      const arr = Array.from(v as ArrayLike<unknown>);
      return arr.map((row) => (typeof row === 'number' ? row : Array.from(row as ArrayLike<number>))) as number[] | number[][];
    },
    [plotId, traceName, key] as const,
  );
}

export async function traceNames(page: Page, plotId: string): Promise<string[]> {
  return page.evaluate((id) => {
    const gd = document.getElementById(id) as unknown as { data?: { name?: string }[] } | null;
    return (gd?.data ?? []).map((d) => d.name ?? '');
  }, plotId);
}

/** Largest |a − b| relative to the largest |b| (both flat). */
export function maxRelDiff(a: ArrayLike<number>, b: ArrayLike<number>): number {
  expect(a.length).toBe(b.length);
  let scale = 0;
  let d = 0;
  for (let i = 0; i < b.length; i++) {
    scale = Math.max(scale, Math.abs(b[i]));
    d = Math.max(d, Math.abs(a[i] - b[i]));
  }
  return d / (scale || 1);
}

export async function screenshot(page: Page, info: TestInfo, name: string): Promise<void> {
  mkdirSync('test-results/screens', { recursive: true });
  const path = `test-results/screens/${name}.png`;
  await page.screenshot({ path });
  await info.attach(name, { path, contentType: 'image/png' });
}

/**
 * Writes an invented problem for the file loader: a field `truth(i, j)` on an nx × ny grid of 1 m
 * cells seen through `m` averages over `seg`-cell segments, alternately along x and y, at seeded
 * positions, with uniform noise of width `noise` and σ = `sigma`. Returns the JSON file and its
 * Matrix Market operator (both in `dir`, named after `name`).
 */
export function writeSegmentProblem(
  dir: string,
  o: {
    name: string;
    title: string;
    nx: number;
    ny: number;
    m: number;
    seg: number;
    seed: number;
    noise: number;
    sigma: number;
    truth: (i: number, j: number) => number;
  },
): { json: string; mtx: string } {
  let seed = o.seed;
  const rnd = () => (seed = (Math.imul(seed, 1103515245) + 12345) >>> 0) / 2 ** 32;
  const lines: string[] = [];
  const values: number[] = [];
  for (let k = 0; k < o.m; k++) {
    const alongX = k % 2 === 0;
    const i0 = Math.floor(rnd() * (o.nx - (alongX ? o.seg : 0)));
    const j0 = Math.floor(rnd() * (o.ny - (alongX ? 0 : o.seg)));
    let d = 0;
    for (let t = 0; t < o.seg; t++) {
      const i = alongX ? i0 + t : i0;
      const j = alongX ? j0 : j0 + t;
      lines.push(`${k + 1} ${j * o.nx + i + 1} ${1 / o.seg}`);
      d += o.truth(i, j) / o.seg;
    }
    values.push(Number((d + o.noise * (rnd() - 0.5)).toFixed(6)));
  }
  const mtxName = `${o.name}.mtx`;
  const mtx = join(dir, mtxName);
  writeFileSync(
    mtx,
    `%%MatrixMarket matrix coordinate real general\n% invented segment averages\n${o.m} ${o.nx * o.ny} ${lines.length}\n${lines.join('\n')}\n`,
  );
  const json = join(dir, `${o.name}.json`);
  writeFileSync(
    json,
    JSON.stringify({
      kind: 'priorscope.problem',
      version: 1,
      title: o.title,
      grid: { shape: [o.nx, o.ny], spacing: [1, 1], unit: 'm' },
      operator: { file: mtxName },
      data: { values, sigma: values.map(() => o.sigma) },
    }),
  );
  return { json, mtx };
}
