/** One plotly figure: redrawn with Plotly.react whenever its traces or layout change. */
import { useEffect, useRef } from 'react';
import Plotly, { type PlotlyHTMLElement } from 'plotly.js-dist-min';
import type { Trace } from './traces.ts';

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
  responsive: true,
  displaylogo: false,
  // No link to any online editor; everything stays local.
  showLink: false,
  showSendToCloud: false,
  modeBarButtonsToRemove: ['select2d', 'lasso2d'],
};

/**
 * Redraws are queued and run one figure per macrotask (newest arguments per figure win), so that a
 * new result that changes several figures does not become one long main-thread task. Figures with
 * `priority` (the posterior plot) go first.
 */
interface DrawJob {
  run: () => Promise<void>;
  priority: boolean;
}
const drawQueue = new Map<HTMLElement, DrawJob>();
let drawScheduled = false;
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
    if (!pick || job.priority) pick = el;
    if (job.priority) break;
  }
  if (!pick) return;
  const job = drawQueue.get(pick)!;
  drawQueue.delete(pick);
  void job.run().finally(() => {
    if (drawQueue.size > 0) scheduleDraws();
  });
}
if (channel) channel.port1.onmessage = runOneDraw;

export function Plot({ id, label, data, layout, height = 300, onDrawn, onPointClick }: PlotProps) {
  const ref = useRef<HTMLDivElement>(null);
  const clickRef = useRef(onPointClick);
  const drawnRef = useRef(onDrawn);
  clickRef.current = onPointClick;
  drawnRef.current = onDrawn;
  const bound = useRef(false);

  useEffect(() => {
    const el = ref.current;
    if (!el) return;
    let live = true;
    const run = () =>
      Plotly.react(
      el,
      data,
      {
        height,
        margin: { l: 56, r: 16, t: 30, b: 66 },
        font: FONT,
        paper_bgcolor: 'rgba(0,0,0,0)',
        plot_bgcolor: '#fbfaf6',
        legend: { orientation: 'h', x: 0, y: -0.22, yanchor: 'top' },
        ...layout,
      },
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
    drawQueue.set(el, { run, priority: onDrawn !== undefined });
    scheduleDraws();
    return () => {
      live = false;
    };
  }, [data, layout, height]);

  useEffect(() => {
    const el = ref.current;
    return () => {
      if (el) {
        drawQueue.delete(el);
        Plotly.purge(el);
      }
    };
  }, []);

  return <div id={id} data-testid={id} ref={ref} role="figure" aria-label={label} className="plot" />;
}
