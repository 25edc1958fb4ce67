/**
 * When the user last moved a control (a slider input). Secondary figures wait until controls have
 * been still for a moment (src/app/Plot.tsx); no plotly or React here, so controls can import it.
 */
let lastInteraction = -Infinity;

/** Called by controls on every movement. */
export function noteInteraction(now: number = performance.now()): void {
  lastInteraction = now;
}

/** Milliseconds still to wait until `settleMs` have passed since the last movement (≤ 0: settled). */
export function settleWait(settleMs: number, now: number = performance.now()): number {
  return settleMs - (now - lastInteraction);
}
