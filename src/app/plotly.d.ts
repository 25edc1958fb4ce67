/** The small part of plotly.js (dist-min bundle) the workbench uses. */
declare module 'plotly.js-dist-min' {
  export interface PlotlyHTMLElement extends HTMLDivElement {
    data?: Record<string, unknown>[];
    layout?: Record<string, unknown>;
    on(
      event: 'plotly_click',
      handler: (ev: { points: { x: unknown; y: unknown; curveNumber: number; pointNumber: unknown }[] }) => void,
    ): void;
    removeAllListeners?(event: string): void;
  }
  interface PlotlyStatic {
    react(
      el: HTMLElement,
      data: Record<string, unknown>[],
      layout?: Record<string, unknown>,
      config?: Record<string, unknown>,
    ): Promise<PlotlyHTMLElement>;
    purge(el: HTMLElement): void;
    Plots: { resize(el: HTMLElement): void };
  }
  const Plotly: PlotlyStatic;
  export default Plotly;
}
