/**
 * UI benchmark (`npm run bench:ui`): in Chromium, for each demo and each of two screens, the time
 * from a prior parameter change (performance mark `ps:param-change`) to the screen redrawn: on the
 * overview (the first screen) every panel showing the new prior's results (`ps:overview-drawn`,
 * src/app/overview/OverviewScreen.tsx), on the posterior screen the posterior plot
 * (`ps:posterior-drawn`); median over 20 changes, and the main-thread long tasks (PerformanceObserver 'longtask') during a
 * slider drag of 30 input events at 60 Hz, with the number and longest synchronous part of the
 * Plotly.react calls in that window and the machine's 1-minute load average. Measures a production build (vite build into a
 * temporary directory, served by vite preview) unless PRIORSCOPE_BENCH_URL points at a running
 * server. Prints JSON and writes bench-results/ui.json.
 *
 * Then the volume load (issue target: a 32³ problem loaded from files, posterior mean drawn ≤ 3 s after the load):
 * the invented 32 × 32 × 32 survey of test/bench/cases/fft3.ts (M = 1,000 rays, sparse G in a sibling .mtx) is
 * written to files, chosen in the workbench's file input (as a user picks them), and timed from the choice to the
 * volume screen's x–y section holding the posterior mean (polled every 20 ms from here); five runs (PRIORSCOPE_BENCH_VOLUME_RUNS), each in a new
 * page once its opening demo has settled, median reported. PRIORSCOPE_BENCH_VOLUME=0 skips it; PRIORSCOPE_BENCH_DEMOS= (empty) runs it alone.
 */
import { chromium, type Page } from '@playwright/test';
import { execFileSync, spawn, type ChildProcess } from 'node:child_process';
import { loadavg, tmpdir } from 'node:os';
import { join } from 'node:path';
import { mkdirSync, mkdtempSync, writeFileSync } from 'node:fs';
import { writeProblemFile } from '../../src/core/io/problemFile.ts';
import { benchProblem3 } from './cases/fft3.ts';

const DEMO_IDS = (process.env.PRIORSCOPE_BENCH_DEMOS ?? 'borehole-log,crosshole-tomography,potential-field')
  .split(',')
  .filter((d) => d !== '');
const VOLUME_RUNS = process.env.PRIORSCOPE_BENCH_VOLUME === '0' ? 0 : Number(process.env.PRIORSCOPE_BENCH_VOLUME_RUNS ?? 5);
const CHANGES = Number(process.env.PRIORSCOPE_BENCH_CHANGES ?? 20);
const PORT = Number(process.env.PRIORSCOPE_BENCH_PORT ?? 4319);

function median(xs: number[]): number {
  const s = [...xs].sort((a, b) => a - b);
  const n = s.length;
  return n === 0 ? NaN : n % 2 ? s[(n - 1) / 2] : 0.5 * (s[n / 2 - 1] + s[n / 2]);
}

async function waitForServer(url: string, ms = 60_000): Promise<void> {
  const t0 = Date.now();
  while (Date.now() - t0 < ms) {
    try {
      const r = await fetch(url);
      if (r.ok) return;
    } catch {
      // not up yet
    }
    await new Promise((r) => setTimeout(r, 300));
  }
  throw new Error(`bench: no server at ${url} after ${ms} ms`);
}

/** Screens measured: the tab and the mark that says it has drawn the new prior's results. */
const SCREENS = [
  { tab: 'overview', mark: 'ps:overview-drawn' },
  { tab: 'posterior', mark: 'ps:posterior-drawn' },
] as const;

/** Set the first term's length slider to `pos`; resolve with param-change → `mark` in ms. */
async function timedChange(page: Page, pos: number, mark: string): Promise<number> {
  return page.evaluate(
    ([p, markName]) =>
      new Promise<number>((resolve, reject) => {
        const start = performance.now();
        const timer = setTimeout(() => reject(new Error(`no ${markName} within 60 s`)), 60_000);
        const obs = new PerformanceObserver((list) => {
          for (const e of list.getEntries()) {
            if (e.name !== markName || e.startTime < start) continue;
            const change = performance.getEntriesByName('ps:param-change').filter((m) => m.startTime >= start)[0];
            if (!change) continue;
            obs.disconnect();
            clearTimeout(timer);
            resolve(e.startTime - change.startTime);
            return;
          }
        });
        obs.observe({ type: 'mark' });
        const el = document.querySelector('[data-testid=term-0-length-slider]') as HTMLInputElement;
        Object.getOwnPropertyDescriptor(HTMLInputElement.prototype, 'value')!.set!.call(el, String(p));
        el.dispatchEvent(new Event('input', { bubbles: true }));
      }),
    [pos, mark] as const,
  );
}

/** 30 input events at 60 Hz (absolute schedule) on the length slider; long tasks until quiet. */
async function drag(
  page: Page,
): Promise<{ longTasks: number[]; dragMs: number; plotCalls: number; longestPlotMs: number; byFigure: Record<string, number> }> {
  return page.evaluate(async () => {
    const longTasks: number[] = [];
    const obs = new PerformanceObserver((l) => l.getEntries().forEach((e) => longTasks.push(e.duration)));
    obs.observe({ type: 'longtask' });
    const el = document.querySelector('[data-testid=term-0-length-slider]') as HTMLInputElement;
    const setValue = Object.getOwnPropertyDescriptor(HTMLInputElement.prototype, 'value')!.set!;
    const t0 = performance.now();
    for (let k = 0; k < 30; k++) {
      const wait = t0 + (1000 / 60) * k - performance.now();
      if (wait > 0) await new Promise((r) => setTimeout(r, wait));
      setValue.call(el, String(120 + 3 * k));
      el.dispatchEvent(new Event('input', { bubbles: true }));
    }
    const dragMs = performance.now() - t0;
    await new Promise((r) => setTimeout(r, 3000));
    obs.disconnect();
    // Synchronous part of each Plotly.react (measures `ps:plot:<figure>` from src/app/Plot.tsx).
    const plots = performance.getEntriesByType('measure').filter((m) => m.name.startsWith('ps:plot:') && m.startTime >= t0);
    const byFigure: Record<string, number> = {};
    for (const m of plots) {
      const f = m.name.slice('ps:plot:'.length);
      byFigure[f] = Math.max(byFigure[f] ?? 0, Number(m.duration.toFixed(1)));
    }
    return { longTasks, dragMs, plotCalls: plots.length, longestPlotMs: Math.max(0, ...plots.map((m) => m.duration)), byFigure };
  });
}

/** The 32³ problem's files (problem JSON + sibling Matrix Market G) in a fresh temporary folder. */
function writeVolumeFiles(): string[] {
  const dir = mkdtempSync(join(tmpdir(), 'priorscope-bench-volume-'));
  const w = writeProblemFile({ ...benchProblem3(32, 1000), title: 'Invented 32³ block, 1,000 rays' }, { file: 'G.mtx' });
  writeFileSync(join(dir, 'volume32.json'), w.json);
  writeFileSync(join(dir, 'G.mtx'), w.operatorFile!.bytes);
  return [join(dir, 'volume32.json'), join(dir, 'G.mtx')];
}

/** Milliseconds from choosing the files to the x–y section holding the posterior mean (32 rows of the mean). */
async function timedVolumeLoad(page: Page, files: string[]): Promise<number> {
  const shown = () =>
    page.evaluate(() => {
      const el = document.getElementById('plot-section-xy') as unknown as { data?: { z?: number[][] }[] } | null;
      const s = (
        window as unknown as { __priorscope: { getState(): { posterior: unknown; posteriorPartial: unknown } } }
      ).__priorscope.getState();
      // The mean is drawn from the partial result (mean first on the FFT route) or the full one.
      return (el?.data?.[0]?.z?.length ?? 0) === 32 && (s.posterior !== null || s.posteriorPartial !== null);
    });
  const t0 = Date.now();
  await page.getByTestId('load-files-input').setInputFiles(files);
  while (!(await shown())) {
    if (Date.now() - t0 > 120_000) throw new Error('bench: the 32³ volume was not drawn within 120 s');
    await new Promise((r) => setTimeout(r, 20));
  }
  return Date.now() - t0;
}

async function main(): Promise<void> {
  let server: ChildProcess | null = null;
  let base = process.env.PRIORSCOPE_BENCH_URL;
  if (!base) {
    base = `http://127.0.0.1:${PORT}`;
    const outDir = join(tmpdir(), 'priorscope-bench-ui');
    execFileSync('npx', ['vite', 'build', '--outDir', outDir, '--emptyOutDir', '--logLevel', 'warn'], { stdio: 'inherit' });
    server = spawn('npx', ['vite', 'preview', '--outDir', outDir, '--host', '127.0.0.1', '--port', String(PORT), '--strictPort'], {
      stdio: 'ignore',
      detached: true,
    });
    await waitForServer(base);
  }
  const browser = await chromium.launch({
    executablePath: process.env.CHROMIUM_PATH || '/usr/bin/chromium',
    args: ['--no-sandbox', '--disable-gpu', '--disable-background-networking', '--no-first-run'],
  });
  const results: Record<string, unknown>[] = [];
  try {
    for (const id of DEMO_IDS) {
      const page = await browser.newPage({ viewport: { width: 1280, height: 720 } });
      await page.goto(`${base}/?demo=${id}`);
      await page.getByTestId('activity').filter({ hasText: 'Up to date' }).waitFor({ timeout: 120_000 });
      await page.waitForSelector('[data-testid=term-0-length-slider]');
      for (const screen of SCREENS) {
        await page.getByTestId(`tab-${screen.tab}`).click();
        await page.getByTestId('activity').filter({ hasText: 'Up to date' }).waitFor({ timeout: 120_000 });
        await page.waitForTimeout(500);
        const t: number[] = [];
        for (let k = 0; k < CHANGES; k++) t.push(await timedChange(page, k % 2 ? 180 : 220 - k, screen.mark));
        const d = await drag(page);
        const r = {
          demo: id,
          screen: screen.tab,
          changes: t.length,
          medianMs: Number(median(t).toFixed(1)),
          minMs: Number(Math.min(...t).toFixed(1)),
          maxMs: Number(Math.max(...t).toFixed(1)),
          targetMs: id === 'borehole-log' ? 100 : 500,
          dragEvents: 30,
          dragMs: Number(d.dragMs.toFixed(1)),
          longTaskCount: d.longTasks.length,
          longestTaskMs: d.longTasks.length ? Number(Math.max(...d.longTasks).toFixed(1)) : 0,
          longTaskTargetMs: 50,
          plotCallsDuringDrag: d.plotCalls,
          longestPlotCallMs: Number(d.longestPlotMs.toFixed(1)),
          longestPlotCallMsByFigure: d.byFigure,
          loadAverage1m: Number(loadavg()[0].toFixed(2)),
        };
        results.push(r);
        console.error(`bench:ui ${id} ${screen.tab}: median ${r.medianMs} ms, longest task ${r.longestTaskMs} ms`);
      }
      await page.close();
    }
    if (VOLUME_RUNS > 0) {
      const files = writeVolumeFiles();
      const t: number[] = [];
      for (let k = 0; k < VOLUME_RUNS; k++) {
        const page = await browser.newPage({ viewport: { width: 1280, height: 720 } });
        await page.goto(`${base}/`);
        await page.getByTestId('activity').filter({ hasText: 'Up to date' }).waitFor({ timeout: 120_000 });
        // The opening demo's results in and nothing running, so the load is timed alone.
        await page.waitForFunction(
          () => {
            const s = (
              window as unknown as { __priorscope: { getState(): { posterior: unknown; busy: Record<string, boolean> } } }
            ).__priorscope.getState();
            return s.posterior !== null && Object.values(s.busy).every((b) => !b);
          },
          undefined,
          { timeout: 120_000 },
        );
        // Requests that follow the first results (the overview's draws) settle too.
        await page.waitForTimeout(1500);
        t.push(await timedVolumeLoad(page, files));
        await page.close();
      }
      const r = {
        case: 'volume 32 × 32 × 32, M = 1000, loaded from files: choice → posterior mean drawn',
        runs: t,
        medianMs: median(t),
        targetMs: 3000,
        loadAverage1m: Number(loadavg()[0].toFixed(2)),
      };
      results.push(r);
      console.error(`bench:ui volume 32³ load: median ${r.medianMs} ms (runs ${t.join(', ')})`);
    }
  } finally {
    await browser.close();
    if (server?.pid) process.kill(-server.pid);
  }
  const out = {
    benchmark: 'ui',
    server: process.env.PRIORSCOPE_BENCH_URL ? `external ${process.env.PRIORSCOPE_BENCH_URL}` : 'production build, vite preview',
    date: new Date().toISOString(),
    results,
  };
  mkdirSync('bench-results', { recursive: true });
  writeFileSync('bench-results/ui.json', JSON.stringify(out, null, 2) + '\n');
  console.log(JSON.stringify(out, null, 2));
}

main().catch((e: unknown) => {
  console.error(e);
  process.exit(1);
});
