/** Colour scales of our own shared by the workbench (src/app/colourScales.ts) and the report. */

/** Diverging: plum below the reference, near-white at it, teal above. */
export const DIVERGING: [number, string][] = [
  [0, '#5a1f4d'],
  [0.25, '#a8679a'],
  [0.5, '#f7f7f4'],
  [0.75, '#5fa7ad'],
  [1, '#0c4f5c'],
];

/** Sequential for magnitudes: pale sand (0) through teal to deep slate. */
export const SEQUENTIAL: [number, string][] = [
  [0, '#f4ecc4'],
  [0.25, '#9ccc8a'],
  [0.5, '#2f8f8c'],
  [0.75, '#28507a'],
  [1, '#1d2340'],
];
