/**
 * Main-thread responsiveness during a slider drag on the 2-D demos while 30 input events arrive at 60 Hz
 * and the results settle. The product target is 50 ms per task and is measured by the benchmark
 * (`npm run bench:ui`), not here: a time bound in a test fails on a loaded machine (a run with other jobs
 * on the 2 cores saw a 232 ms task against a 200 ms bound). The longest task is reported as an annotation
 * (and must stay below BOUND_MS, a bound only a lost frame budget of several hundred ms would break), and the test
 * checks, independently of machine speed, the mechanism behind the responsiveness: secondary figures are not
 * redrawn while the slider moves, and are afterwards.
 * The drag also has to end in the last slider value with the posterior computed for it.
 */
import { expect, test } from '@playwright/test';
import { DEMOS } from '../src/core/problems/demos.ts';
import { posteriorSummary, preparePosterior } from '../src/core/inverse/posterior.ts';
import { maxRelDiff, open, settle, traceValues, watch } from './helpers.ts';

function demo(id: string) {
  const d = DEMOS.find((x) => x.id === id);
  if (!d) throw new Error(`demo ${id} missing`);
  return d.build();
}

const ORIGIN = 'http://127.0.0.1:' + (process.env.PRIORSCOPE_E2E_PORT ?? 4317);
/** Far above any healthy task (50 ms target) and any load seen on the shared machines: a gross stall only. */
const BOUND_MS = 1000;

for (const id of ['crosshole-tomography', 'potential-field']) {
  test(`a slider drag on ${id} defers the secondary figures and never stalls the page (no task above ${BOUND_MS} ms)`, async ({ page }) => {
    const w = watch(page, ORIGIN);
    const s0 = await open(page, id);
    const slider = page.getByTestId('term-0-length-slider');
    const start = Number(await slider.inputValue());
    // 30 positions moving away from the start (the slider has 400 steps).
    const positions = Array.from({ length: 30 }, (_, k) => (start > 200 ? start - 3 * (k + 1) : start + 3 * (k + 1)));
    const r = await slider.evaluate(async (el, list) => {
      const longTasks: number[] = [];
      const obs = new PerformanceObserver((l) => l.getEntries().forEach((e) => longTasks.push(e.duration)));
      obs.observe({ type: 'longtask' });
      const input = el as HTMLInputElement;
      const setValue = Object.getOwnPropertyDescriptor(HTMLInputElement.prototype, 'value')!.set!;
      const t0 = performance.now();
      for (let k = 0; k < list.length; k++) {
        const wait = t0 + (1000 / 60) * k - performance.now();
        if (wait > 0) await new Promise((res) => setTimeout(res, wait));
        setValue.call(input, String(list[k]));
        input.dispatchEvent(new Event('input', { bubbles: true }));
      }
      const t1 = performance.now();
      // Results arrive and the deferred figures redraw after the drag: keep observing.
      await new Promise((res) => setTimeout(res, 2500));
      obs.disconnect();
      // Synchronous Plotly.react calls per figure (measures from src/app/Plot.tsx), during and after the drag.
      const plots = performance.getEntriesByType('measure').filter((m) => m.name.startsWith('ps:plot:') && m.startTime >= t0);
      const count = (name: string, from: number, to: number) =>
        plots.filter((m) => m.name === `ps:plot:${name}` && m.startTime >= from && m.startTime < to).length;
      return {
        longTasks,
        observed: PerformanceObserver.supportedEntryTypes.includes('longtask'),
        stdDuring: count('plot-posterior-std', t0, t1),
        stdAfter: count('plot-posterior-std', t1, Infinity),
        longestPlot: Math.max(0, ...plots.map((m) => m.duration)),
      };
    }, positions);
    expect(r.observed).toBe(true);
    const longest = r.longTasks.length ? Math.max(...r.longTasks) : 0;
    test.info().annotations.push({ type: 'longest task (ms)', description: `${longest.toFixed(0)} over ${r.longTasks.length} long tasks` });
    expect(longest).toBeLessThanOrEqual(BOUND_MS);
    expect(r.longestPlot).toBeLessThanOrEqual(BOUND_MS);
    // Secondary figures wait until the slider has been still (SETTLE_MS = 250 ms, events come every
    // 17 ms), then redraw: this does not depend on the machine's speed, unlike the bound above.
    expect(r.stdDuring).toBe(0);
    expect(r.stdAfter).toBeGreaterThanOrEqual(1);

    const s1 = await settle(page);
    await expect(slider).toHaveValue(String(positions[positions.length - 1]));
    expect(s1.priorRevision).toBeGreaterThan(s0.priorRevision);
    expect(s1.prior.terms[0].length).not.toBe(s0.prior.terms[0].length);
    expect(s1.computedFor.posterior).toBe(`${s1.problemVersion}:${s1.priorRevision}`);
    // The deferred figures were redrawn for the final prior: the std map equals the core's
    // posterior std for it (relative 1e-9 for round-off between two V8 builds; common practice, no source).
    const expected = posteriorSummary(preparePosterior(demo(id).problem, s1.prior));
    await expect
      .poll(async () => {
        const z = (await traceValues(page, 'plot-posterior-std', 'std', 'z')) as number[][];
        return z.length ? maxRelDiff(z.flat(), expected.std) : Infinity;
      })
      .toBeLessThan(1e-9);
    expect(w.problems).toEqual([]);
  });
}
