/**
 * Built-in demo problems: four invented scenarios (three 1-D / 2-D, one 3-D) with a seeded synthetic truth drawn from a stated
 * `truthPrior` and seeded Gaussian noise, plus a reasonable but deliberately different `startPrior`
 * for the user to improve on. PUBLIC API (UI and CLI): DemoProblem, DEMOS, DEMO_IDS, demoById.
 *
 * Every build() is deterministic: the same call gives bit-identical arrays.
 */
import { InputError } from '../errors.ts';
import { cellCoordinates, type Grid } from '../grid/grid.ts';
import { fromRows } from '../linalg/matrix.ts';
import type { Operator } from '../linalg/operator.ts';
import { applyOperator } from '../linalg/operator.ts';
import { sparseFromCoordinates } from '../linalg/sparse.ts';
import type { PriorSpec } from '../prior/spec.ts';
import { Random } from '../sampling/random.ts';
import { priorRealisations } from '../sampling/realisations.ts';
import { gravityOperator } from './potential.ts';
import { rayOperator, type Ray } from './rays.ts';
import type { Problem } from './spec.ts';

export interface DemoProblem {
  /** Stable id used in URLs and the CLI: "borehole-log", "crosshole-tomography", "potential-field", "three-boreholes". */
  readonly id: string;
  readonly title: string;
  /** One or two sentences describing the invented scenario. */
  readonly description: string;
  /** Deterministic (seeded) construction. */
  build(): { problem: Problem; truthPrior: PriorSpec; startPrior: PriorSpec };
}

/** One realisation of the prior (Cholesky of Cm times seeded normals, src/core/sampling). */
function drawFromPrior(grid: Grid, prior: PriorSpec, seed: number): Float64Array {
  return priorRealisations(grid, prior, 1, seed).data;
}

/** d = G m_true + σ e with e ~ N(0, I) from `seed` (src/core/sampling/random.ts). */
function syntheticData(G: Operator, truth: Float64Array, sigma: Float64Array, seed: number): Float64Array {
  const d = applyOperator(G, truth);
  const e = new Random(seed).fillNormal(new Float64Array(d.length));
  for (let k = 0; k < d.length; k++) d[k] += sigma[k] * e[k];
  return d;
}

/** The travel-time demos' starting prior: deliberately shorter and wider than their truth, for the user to improve. */
const RAY_START_PRIOR: PriorSpec = {
  mean: { constant: 0 },
  terms: [{ kernel: 'exponential', variance: 1e-3, length: 3 }],
  nugget: 1e-7,
};

/**
 * A travel-time demo: straight rays through the grid (./rays.ts), the truth drawn from `truthPrior`, data with
 * σ = 0.01 ms; slowness perturbation in s/km (length in m × s/km = ms).
 */
function rayDemo(
  title: string,
  grid: Grid,
  rays: readonly Ray[],
  priors: { truthPrior: PriorSpec; startPrior: PriorSpec },
  seeds: { truth: number; noise: number },
): { problem: Problem; truthPrior: PriorSpec; startPrior: PriorSpec } {
  const G = rayOperator(grid, rays);
  const truth = drawFromPrior(grid, priors.truthPrior, seeds.truth);
  const sigma = new Float64Array(G.matrix.rows).fill(0.01);
  const values = syntheticData(G, truth, sigma, seeds.noise);
  const problem: Problem = {
    title,
    grid,
    operator: G,
    data: {
      values,
      sigma,
      unit: 'ms',
      geometry: { kind: 'paths', sources: fromRows(rays.map((r) => r.from)), receivers: fromRows(rays.map((r) => r.to)) },
    },
    truth,
    quantity: { name: 'slowness perturbation', unit: 's/km' },
  };
  return { problem, ...priors };
}

// ---------------------------------------------------------------------------------------------
// borehole-log: 1-D temperature profile, Gaussian-weighted sensor windows.

const BOREHOLE_GRID: Grid = { shape: [200], spacing: [0.5], origin: [0.25], unit: 'm', axes: ['depth'] };
/** Sensor centres (m) and Gaussian window standard deviation (m); windows cut at ±3 widths. */
const BOREHOLE_SENSORS = Array.from({ length: 50 }, (_, k) => 1 + 2 * k);
const BOREHOLE_WINDOW = 1.5;

function boreholeOperator(): Operator {
  const { x } = cellCoordinates(BOREHOLE_GRID);
  const ri: number[] = [];
  const ci: number[] = [];
  const v: number[] = [];
  BOREHOLE_SENSORS.forEach((c, k) => {
    const cells: number[] = [];
    const w: number[] = [];
    for (let j = 0; j < x.length; j++) {
      const u = (x[j] - c) / BOREHOLE_WINDOW;
      if (Math.abs(u) <= 3) {
        cells.push(j);
        w.push(Math.exp(-0.5 * u * u));
      }
    }
    const sum = w.reduce((a, b) => a + b, 0);
    cells.forEach((j, q) => {
      ri.push(k);
      ci.push(j);
      v.push(w[q] / sum);
    });
  });
  return { kind: 'sparse', matrix: sparseFromCoordinates(BOREHOLE_SENSORS.length, x.length, ri, ci, v) };
}

const boreholeLog: DemoProblem = {
  id: 'borehole-log',
  title: 'Borehole temperature log',
  description:
    'A 100 m observation borehole logged by 50 temperature sensors 2 m apart; each sensor reports a ' +
    'Gaussian-weighted average over about ±4.5 m of the wall, so neighbouring windows overlap. ' +
    'Estimate the temperature (°C) every 0.5 m along the hole.',
  build() {
    const truthPrior: PriorSpec = {
      mean: { trend: { intercept: 10, slope: [0.03] } },
      terms: [{ kernel: 'matern', nu: 1.5, variance: 0.04, length: 5 }],
      nugget: 1e-6,
    };
    const startPrior: PriorSpec = {
      mean: { constant: 11.5 },
      terms: [{ kernel: 'exponential', variance: 0.25, length: 10 }],
      nugget: 1e-6,
    };
    const G = boreholeOperator();
    const truth = drawFromPrior(BOREHOLE_GRID, truthPrior, 20240611);
    const sigma = new Float64Array(BOREHOLE_SENSORS.length).fill(0.02);
    const values = syntheticData(G, truth, sigma, 7101);
    const problem: Problem = {
      title: 'Borehole temperature log',
      grid: BOREHOLE_GRID,
      operator: G,
      data: { values, sigma, unit: '°C', geometry: { kind: 'points', positions: fromRows(BOREHOLE_SENSORS.map((c) => [c])) } },
      truth,
      quantity: { name: 'temperature', unit: '°C' },
    };
    return { problem, truthPrior, startPrior };
  },
};

// ---------------------------------------------------------------------------------------------
// crosshole-tomography: 2-D slowness perturbation between two boreholes 16 m apart.

/** x across (m), y depth (m); cells 0.5 m. */
const CROSSHOLE_GRID: Grid = { shape: [32, 32], spacing: [0.5, 0.5], origin: [0.25, 0.25], unit: 'm', axes: ['x', 'depth'] };
const CROSSHOLE_DEPTHS = Array.from({ length: 16 }, (_, k) => 0.5 + k);

function crossholeRays(): Ray[] {
  const rays: Ray[] = [];
  for (const zs of CROSSHOLE_DEPTHS) for (const zr of CROSSHOLE_DEPTHS) rays.push({ from: [0, zs], to: [16, zr] });
  return rays;
}

const crossholeTomography: DemoProblem = {
  id: 'crosshole-tomography',
  title: 'Crosshole travel-time tomography',
  description:
    'Two boreholes 16 m apart: 16 sources in the left hole and 16 receivers in the right, 256 straight ' +
    'rays. Data are travel-time anomalies (ms); estimate the slowness perturbation (s/km) in 0.5 m cells ' +
    'of a gently dipping layered formation.',
  build() {
    const truthPrior: PriorSpec = {
      mean: { constant: 0 },
      terms: [{ kernel: 'matern', nu: 2.5, variance: 4e-4, lengths: [5, 1.5], angle: 15 }],
      nugget: 4e-8,
    };
    return rayDemo(
      'Crosshole travel-time tomography',
      CROSSHOLE_GRID,
      crossholeRays(),
      { truthPrior, startPrior: RAY_START_PRIOR },
      { truth: 31337, noise: 4242 },
    );
  },
};

// ---------------------------------------------------------------------------------------------
// potential-field: 2-D vertical section of density contrast under a gravity profile.

/** x along the profile (m), y depth below the surface (m). */
const POTENTIAL_GRID: Grid = { shape: [40, 20], spacing: [50, 25], origin: [25, 12.5], unit: 'm', axes: ['x', 'depth'] };
/** 40 stations 1 m above the surface (depth −1 m), one over every column. */
const POTENTIAL_STATIONS: [number, number][] = Array.from({ length: 40 }, (_, k) => [25 + 50 * k, -1]);

const potentialField: DemoProblem = {
  id: 'potential-field',
  title: 'Gravity profile over a buried basin',
  description:
    'A 2 km gravity profile with 40 stations 50 m apart over sediments and basement rock. Data are ' +
    'vertical gravity anomalies (mGal) of 2-D bodies; estimate the density contrast (kg/m³) in a ' +
    '500 m deep section of 50 m × 25 m cells. Sensitivity decays fast with depth.',
  build() {
    const truthPrior: PriorSpec = {
      mean: { constant: 0 },
      terms: [{ kernel: 'matern', nu: 1.5, variance: 1e4, lengths: [400, 120], angle: 0 }],
      nugget: 1,
    };
    const startPrior: PriorSpec = {
      mean: { constant: 0 },
      terms: [{ kernel: 'exponential', variance: 2.25e4, length: 200 }],
      nugget: 1,
    };
    const G = gravityOperator(POTENTIAL_GRID, POTENTIAL_STATIONS);
    const truth = drawFromPrior(POTENTIAL_GRID, truthPrior, 5150);
    const sigma = new Float64Array(POTENTIAL_STATIONS.length).fill(0.02);
    const values = syntheticData(G, truth, sigma, 9090);
    const problem: Problem = {
      title: 'Gravity profile over a buried basin',
      grid: POTENTIAL_GRID,
      operator: G,
      data: { values, sigma, unit: 'mGal', geometry: { kind: 'points', positions: fromRows(POTENTIAL_STATIONS) } },
      truth,
      quantity: { name: 'density contrast', unit: 'kg/m³' },
    };
    return { problem, truthPrior, startPrior };
  },
};

// ---------------------------------------------------------------------------------------------
// three-boreholes: 3-D travel times between three boreholes through a block of 1 m cells.

/** east, north along the surface, depth downwards (m); 16 × 12 × 10 cells of 1 m. */
const BOREHOLES_GRID: Grid = {
  shape: [16, 12, 10],
  spacing: [1, 1, 1],
  origin: [0.5, 0.5, 0.5],
  unit: 'm',
  axes: ['east', 'north', 'depth'],
};
/** Where the three holes meet the surface (east, north; m), and the 8 source / receiver depths in each (m). */
const BOREHOLES_HOLES: readonly (readonly [number, number])[] = [
  [1.5, 1.5],
  [14.5, 3],
  [6, 10.5],
];
const BOREHOLES_DEPTHS = Array.from({ length: 8 }, (_, k) => 0.75 + 1.25 * k);

/** Straight rays between every pair of holes, every source depth to every receiver depth: 3 × 64 = 192. */
function boreholeRays3d(): Ray[] {
  const rays: Ray[] = [];
  for (let a = 0; a < BOREHOLES_HOLES.length; a++)
    for (let b = a + 1; b < BOREHOLES_HOLES.length; b++)
      for (const zs of BOREHOLES_DEPTHS)
        for (const zr of BOREHOLES_DEPTHS) rays.push({ from: [...BOREHOLES_HOLES[a], zs], to: [...BOREHOLES_HOLES[b], zr] });
  return rays;
}

const threeBoreholes: DemoProblem = {
  id: 'three-boreholes',
  title: 'Travel times between three boreholes (3-D)',
  description:
    'Three boreholes 10 m deep, 9 to 13 m apart: 8 sources and receivers in each, 192 straight rays between every ' +
    'pair. Data are travel-time anomalies (ms); estimate the slowness perturbation (s/km) in a 16 m × 12 m × 10 m ' +
    'block of 1 m cells, a formation with gently dipping, rotated layering.',
  build() {
    const truthPrior: PriorSpec = {
      mean: { constant: 0 },
      terms: [{ kernel: 'matern', nu: 1.5, variance: 4e-4, lengths: [7, 5, 1.5], angles: [25, 10, 0] }],
      nugget: 4e-8,
    };
    return rayDemo(
      'Travel times between three boreholes (3-D)',
      BOREHOLES_GRID,
      boreholeRays3d(),
      { truthPrior, startPrior: RAY_START_PRIOR },
      { truth: 2718, noise: 1414 },
    );
  },
};

export const DEMOS: readonly DemoProblem[] = [boreholeLog, crossholeTomography, potentialField, threeBoreholes];

export const DEMO_IDS: readonly string[] = DEMOS.map((d) => d.id);

/** The demo with this id; InputError naming the known ids otherwise. */
export function demoById(id: string): DemoProblem {
  const d = DEMOS.find((x) => x.id === id);
  if (!d) throw new InputError('demo', `one of ${DEMO_IDS.map((s) => JSON.stringify(s)).join(', ')}`, id);
  return d;
}
