/**
 * One plotly figure: redrawn with Plotly.react whenever its traces, layout or width change.
 *
 * Main-thread budget (no task above 50 ms during a slider drag). Profiling a drag on the
 * 2-D demos (Chromium CPU profile) showed three causes, each handled here:
 * 1. plotly's own `responsive` mode re-lays out every figure (a full `relayout`, ~50–130 ms for a
 *    heat map) whenever its box changes by a pixel, e.g. when a scroll bar comes and goes. We turn
 *    it off and pass an explicit width instead, measured by our own ResizeObserver, rounded and
 *    debounced, and redrawn through the same queue as everything else.
 * 2. tick labels with `ticklabeloverflow` other than 'allow' (the default of colour bars) measure
 *    every label against every other with getBoundingClientRect: quadratic forced layouts. Our
 *    labels never overflow the figure, so {@link tameOverflow} sets 'allow' everywhere.
 * 3. one result changing several figures: redraws are queued one figure per macrotask (newest
 *    arguments per figure win). Figures with `priority` (the posterior plot) go first; the others
 *    wait until the user has stopped moving a control for {@link SETTLE_MS} (see
 *    {@link noteInteraction}), so that a drag redraws only the figure it is timed by.
 */
import { useEffect, useLayoutEffect, useRef, useState } from 'react';
import Plotly, { type PlotlyHTMLElement } from 'plotly.js-dist-min';
import { tameOverflow, type Trace } from './traces.ts';
import { plotSafe } from './plotText.ts';
import { settleWait } from './interaction.ts';

export interface PlotProps {
  id: string;
  /** Accessible description of the figure. */
  label: string;
  data: Trace[];
  layout: Record<string, unknown>;
  height?: number;
  /** Called after each redraw has finished. */
  onDrawn?: () => void;
  /** Called with the data coordinates of a clicked point. */
  onPointClick?: (x: number, y: number) => void;
}

const FONT = { family: 'Inter, "Segoe UI", system-ui, sans-serif', size: 11, color: '#2b2f3a' };

const CONFIG = {
  // Width comes from our own observer (see the file comment); plotly must not measure on its own.
  responsive: false,
  displaylogo: false,
  // No link to any online editor; everything stays local.
  showLink: false,
  showSendToCloud: false,
  modeBarButtonsToRemove: ['select2d', 'lasso2d'],
};

/** Quiet time after the last control movement before secondary figures are redrawn (ms). */
export const SETTLE_MS = 250;
/** Width changes smaller than this are ignored (px); resizes are debounced by RESIZE_MS. */
const WIDTH_STEP = 4;
const RESIZE_MS = 120;

interface DrawJob {
  run: () => Promise<void>;
  priority: boolean;
}
const drawQueue = new Map<HTMLElement, DrawJob>();
let drawScheduled = false;
let settleTimer: ReturnType<typeof setTimeout> | null = null;
const channel = typeof MessageChannel !== 'undefined' ? new MessageChannel() : null;

function scheduleDraws(): void {
  if (drawScheduled) return;
  drawScheduled = true;
  if (channel) channel.port2.postMessage(0);
  else setTimeout(runOneDraw, 0);
}

function runOneDraw(): void {
  drawScheduled = false;
  let pick: HTMLElement | null = null;
  for (const [el, job] of drawQueue) {
    if (job.priority) {
      pick = el;
      break;
    }
    pick ??= el;
  }
  if (!pick) return;
  const job = drawQueue.get(pick)!;
  const wait = settleWait(SETTLE_MS);
  if (!job.priority && wait > 0) {
    // Only secondary figures are left and a control is moving: come back when it has settled.
    if (settleTimer === null)
      settleTimer = setTimeout(() => {
        settleTimer = null;
        scheduleDraws();
      }, wait);
    return;
  }
  drawQueue.delete(pick);
  void job.run().finally(() => {
    if (drawQueue.size > 0) scheduleDraws();
  });
}
if (channel) channel.port1.onmessage = runOneDraw;

/** Content width of an element in whole pixels (0 when it is not laid out). */
function widthOf(el: HTMLElement): number {
  return Math.floor(el.clientWidth);
}

export function Plot({ id, label, data, layout, height = 300, onDrawn, onPointClick }: PlotProps) {
  const ref = useRef<HTMLDivElement>(null);
  const clickRef = useRef(onPointClick);
  const drawnRef = useRef(onDrawn);
  clickRef.current = onPointClick;
  drawnRef.current = onDrawn;
  const bound = useRef(false);
  const [width, setWidth] = useState(0);

  // Our own width tracking instead of plotly's `responsive` (see the file comment).
  useLayoutEffect(() => {
    const el = ref.current;
    if (!el) return;
    setWidth(widthOf(el));
    if (typeof ResizeObserver === 'undefined') return;
    let timer: ReturnType<typeof setTimeout> | null = null;
    const obs = new ResizeObserver(() => {
      if (timer !== null) clearTimeout(timer);
      timer = setTimeout(() => {
        timer = null;
        const w = widthOf(el);
        setWidth((old) => (w > 0 && Math.abs(w - old) >= WIDTH_STEP ? w : old));
      }, RESIZE_MS);
    });
    obs.observe(el);
    return () => {
      obs.disconnect();
      if (timer !== null) clearTimeout(timer);
    };
  }, []);

  useEffect(() => {
    const el = ref.current;
    if (!el || width <= 0) return;
    let live = true;
    const run = () => {
      const t0 = performance.now();
      const drawn = Plotly.react(
        el,
        plotSafe(tameOverflow.traces(data)),
        plotSafe(
          tameOverflow.layout({
            height,
            width,
            autosize: false,
            margin: { l: 56, r: 16, t: 30, b: 66 },
            font: FONT,
            paper_bgcolor: 'rgba(0,0,0,0)',
            plot_bgcolor: '#fbfaf6',
            legend: { orientation: 'h', x: 0, y: -0.22, yanchor: 'top' },
            ...layout,
          }),
        ),
        CONFIG,
      ).then((gd: PlotlyHTMLElement) => {
        if (!live) return;
        if (!bound.current) {
          bound.current = true;
          gd.on('plotly_click', (ev) => {
            const p = ev.points[0];
            if (p && typeof p.x === 'number' && clickRef.current) clickRef.current(p.x, typeof p.y === 'number' ? p.y : 0);
          });
        }
        drawnRef.current?.();
      });
      // The synchronous part of the redraw, read by the UI benchmark (test/bench/ui.ts).
      performance.measure(`ps:plot:${id}`, { start: t0 });
      return drawn;
    };
    drawQueue.set(el, { run, priority: onDrawn !== undefined });
    scheduleDraws();
    return () => {
      live = false;
    };
  }, [data, layout, height, width]);

  useEffect(() => {
    const el = ref.current;
    return () => {
      if (el) {
        drawQueue.delete(el);
        Plotly.purge(el);
      }
    };
  }, []);

  return <div id={id} data-testid={id} ref={ref} role="figure" aria-label={label} className="plot" style={{ minHeight: height }} />;
}
