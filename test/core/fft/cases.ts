/** Shared test table and helpers for the FFT-path tests (unit and reference). */
import type { Grid } from '../../../src/core/grid/grid.ts';
import type { PriorSpec } from '../../../src/core/prior/spec.ts';

/** Deterministic uniform(−1, 1) values (mulberry32; a test helper, not the project PRNG). */
export function seededVector(n: number, seed: number): Float64Array {
  let a = seed >>> 0;
  const out = new Float64Array(n);
  for (let i = 0; i < n; i++) {
    a = (a + 0x6d2b79f5) >>> 0;
    let t = a;
    t = Math.imul(t ^ (t >>> 15), t | 1);
    t ^= t + Math.imul(t ^ (t >>> 7), t | 61);
    out[i] = (((t ^ (t >>> 14)) >>> 0) / 4294967296) * 2 - 1;
  }
  return out;
}

/** ‖a − b‖₂ / ‖b‖₂. */
export function relErr(a: ArrayLike<number>, b: ArrayLike<number>): number {
  if (a.length !== b.length) throw new Error(`relErr: lengths ${a.length} and ${b.length}`);
  let num = 0;
  let den = 0;
  for (let i = 0; i < a.length; i++) {
    num += (a[i] - b[i]) ** 2;
    den += b[i] ** 2;
  }
  return Math.sqrt(num / den);
}

function profile(n: number, seed: number): number[] {
  return Array.from(seededVector(n, seed), (v) => 1 + 0.5 * v);
}

const zero = { constant: 0 } as const;

export interface CovarianceCase {
  readonly name: string;
  readonly grid: Grid;
  readonly prior: PriorSpec;
}

const g1: Grid = { shape: [23], spacing: [0.4] };
const g2: Grid = { shape: [9, 7], spacing: [1, 0.6] };
const g2b: Grid = { shape: [16, 5], spacing: [0.5, 1.5] };
const g2c: Grid = { shape: [1, 12], spacing: [1, 1] };

/** Every kernel, anisotropy and rotation, sums, nugget and std profile, 1-D and 2-D grids. */
export const COVARIANCE_CASES: readonly CovarianceCase[] = [
  { name: '1-D exponential', grid: g1, prior: { mean: zero, terms: [{ kernel: 'exponential', variance: 2, length: 1.3 }] } },
  { name: '1-D gaussian', grid: g1, prior: { mean: zero, terms: [{ kernel: 'gaussian', variance: 0.7, length: 2.1 }] } },
  { name: '1-D spherical', grid: g1, prior: { mean: zero, terms: [{ kernel: 'spherical', variance: 1.5, length: 3.3 }] } },
  { name: '1-D matern 0.5', grid: g1, prior: { mean: zero, terms: [{ kernel: 'matern', nu: 0.5, variance: 1, length: 1 }] } },
  { name: '1-D matern 1.5', grid: g1, prior: { mean: zero, terms: [{ kernel: 'matern', nu: 1.5, variance: 1, length: 2 }] } },
  {
    name: '1-D matern 2.5 + nugget + profile',
    grid: g1,
    prior: { mean: zero, nugget: 0.05, stdProfile: profile(23, 7), terms: [{ kernel: 'matern', nu: 2.5, variance: 3, length: 0.9 }] },
  },
  { name: '2-D exponential isotropic', grid: g2, prior: { mean: zero, terms: [{ kernel: 'exponential', variance: 1, length: 2.5 }] } },
  {
    name: '2-D gaussian anisotropic, angle 0',
    grid: g2,
    prior: { mean: zero, terms: [{ kernel: 'gaussian', variance: 1, lengths: [4, 1.2] }] },
  },
  {
    name: '2-D gaussian rotated 30°',
    grid: g2,
    prior: { mean: zero, terms: [{ kernel: 'gaussian', variance: 1, lengths: [4, 1.2], angle: 30 }] },
  },
  {
    name: '2-D matern 1.5 rotated 120°',
    grid: g2b,
    prior: { mean: zero, terms: [{ kernel: 'matern', nu: 1.5, variance: 2, lengths: [3, 0.8], angle: 120 }] },
  },
  {
    name: '2-D spherical rotated −45°',
    grid: g2b,
    prior: { mean: zero, terms: [{ kernel: 'spherical', variance: 1, lengths: [5, 2], angle: -45 }] },
  },
  {
    name: '2-D matern 2.5 rotated 75°',
    grid: g2,
    prior: { mean: zero, terms: [{ kernel: 'matern', nu: 2.5, variance: 1, lengths: [2, 6], angle: 75 }] },
  },
  {
    name: '2-D sum: exponential + rotated gaussian + nugget + profile',
    grid: g2b,
    prior: {
      mean: zero,
      nugget: 0.1,
      stdProfile: profile(80, 11),
      terms: [
        { kernel: 'exponential', variance: 0.5, length: 1 },
        { kernel: 'gaussian', variance: 1.5, lengths: [6, 2], angle: 20 },
        { kernel: 'matern', nu: 0.5, variance: 0.2, lengths: [1, 3], angle: 150 },
      ],
    },
  },
  {
    name: '2-D grid with nx = 1',
    grid: g2c,
    prior: { mean: zero, terms: [{ kernel: 'matern', nu: 1.5, variance: 1, lengths: [2, 3], angle: 10 }] },
  },
];

/** `count` straight rays between seeded points on the left/right and top/bottom edges of a 2-D grid. */
export function rayFan(grid: Grid, count: number, seed: number): { from: [number, number]; to: [number, number] }[] {
  const [nx, ny] = [grid.shape[0], grid.shape[1]];
  const [dx, dy] = [grid.spacing[0], grid.spacing[1]];
  const [x0, y0] = [-dx / 2, -dy / 2];
  const [w, h] = [nx * dx, ny * dy];
  const u = seededVector(2 * count, seed);
  return Array.from({ length: count }, (_, k) => {
    const a = 0.5 + 0.5 * u[2 * k];
    const b = 0.5 + 0.5 * u[2 * k + 1];
    return k % 2 === 0
      ? { from: [x0, y0 + a * h] as [number, number], to: [x0 + w, y0 + b * h] as [number, number] }
      : { from: [x0 + a * w, y0] as [number, number], to: [x0 + b * w, y0 + h] as [number, number] };
  });
}

const g3: Grid = { shape: [8, 6, 5], spacing: [1, 0.7, 1.3] };
const g3b: Grid = { shape: [5, 1, 7], spacing: [0.5, 1, 0.8] };

/** 3-D grids (8 × 6 × 5 and a one-row 5 × 1 × 7): every kernel, rotated anisotropy (R = Rz·Ry·Rx), sums, nugget, profile. */
export const COVARIANCE_CASES_3D: readonly CovarianceCase[] = [
  { name: '3-D exponential isotropic', grid: g3, prior: { mean: zero, terms: [{ kernel: 'exponential', variance: 1.2, length: 2.5 }] } },
  { name: '3-D gaussian isotropic', grid: g3, prior: { mean: zero, terms: [{ kernel: 'gaussian', variance: 0.8, length: 1.7 }] } },
  { name: '3-D spherical isotropic', grid: g3, prior: { mean: zero, terms: [{ kernel: 'spherical', variance: 2, length: 3.1 }] } },
  { name: '3-D matern 1.5 isotropic', grid: g3, prior: { mean: zero, terms: [{ kernel: 'matern', nu: 1.5, variance: 1, length: 2 }] } },
  {
    name: '3-D matern 0.8 rotated',
    grid: g3,
    prior: { mean: zero, terms: [{ kernel: 'matern', nu: 0.8, variance: 1.1, lengths: [4, 1.5, 2.2], angles: [30, 20, -40] }] },
  },
  {
    name: '3-D gaussian rotated + spherical rotated + nugget + profile',
    grid: g3,
    prior: {
      mean: zero,
      nugget: 0.07,
      stdProfile: profile(240, 11),
      terms: [
        { kernel: 'gaussian', variance: 0.6, lengths: [3, 1.2, 2], angles: [-55, 35, 10] },
        { kernel: 'spherical', variance: 0.9, lengths: [5, 2.5, 3.5], angles: [120, -15, 70] },
      ],
    },
  },
  {
    name: '3-D exponential rotated, one row in y',
    grid: g3b,
    prior: { mean: zero, nugget: 0.02, terms: [{ kernel: 'exponential', variance: 1, lengths: [2, 1, 3], angles: [10, 45, 0] }] },
  },
];
