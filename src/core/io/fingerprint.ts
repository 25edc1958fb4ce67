/**
 * A short fingerprint of a problem, so that a share link made on the user's own problem can say
 * which problem it was made for and be applied only to that one. It covers the grid, the data
 * (values, standard deviations or covariance) and the operator, bit for bit: two problems with the
 * same fingerprint hold the same numbers (up to the hash's collision chance, about 2^-53 for two
 * different problems; the hash is cyrb53-style mixing of 32-bit words, common practice, no source,
 * and is not meant to resist deliberate collisions).
 */
import { matchOperator } from '../linalg/operator.ts';
import { type Geometry, isCellList } from '../grid/grid.ts';
import type { Problem } from '../problems/spec.ts';

function mix(h: [number, number], words: Uint32Array): void {
  let [h1, h2] = h;
  for (let i = 0; i < words.length; i++) {
    const w = words[i];
    h1 = Math.imul(h1 ^ w, 2654435761);
    h2 = Math.imul(h2 ^ w, 1597334677);
  }
  h1 = Math.imul(h1 ^ (h1 >>> 16), 2246822507) ^ Math.imul(h2 ^ (h2 >>> 13), 3266489909);
  h2 = Math.imul(h2 ^ (h2 >>> 16), 2246822507) ^ Math.imul(h1 ^ (h1 >>> 13), 3266489909);
  h[0] = h1 >>> 0;
  h[1] = h2 >>> 0;
}

const words = (a: Float64Array | Int32Array | Uint32Array) => new Uint32Array(a.buffer, a.byteOffset, (a.byteLength / 4) | 0);
const numbers = (xs: readonly number[]) => words(Float64Array.from(xs));

/** 16 hexadecimal digits identifying the problem's grid, data and operator. */
export function problemFingerprint(p: Problem<Geometry>): string {
  const h: [number, number] = [0x9e3779b9, 0x85ebca6b];
  const g0 = p.grid;
  if (isCellList(g0)) {
    // A cell list: its dimension and centres (a grid's words start with a positive count, this with −3).
    mix(h, numbers([-3, g0.dim, g0.x.length]));
    for (const a of [g0.x, g0.y, g0.z]) mix(h, words(a));
  } else mix(h, numbers([...g0.shape, -1, ...g0.spacing, -2, ...(g0.origin ?? [])]));
  mix(h, words(p.data.values));
  if (p.data.sigma) mix(h, words(p.data.sigma));
  if (p.data.covariance) mix(h, words(p.data.covariance.data));
  const g = p.operator;
  mix(h, numbers([g.matrix.rows, g.matrix.cols]));
  // A sparse operator's arrays in the order of their sorted names (the order of earlier fingerprints).
  const arrays = matchOperator(g, { dense: (a) => [a.data], sparse: (s) => [s.colIdx, s.rowPtr, s.values] });
  for (const a of arrays) mix(h, words(a));
  return h[0].toString(16).padStart(8, '0') + h[1].toString(16).padStart(8, '0');
}
