/**
 * Gravity of 2-D bodies (infinitely long in the strike direction) on a vertical section.
 * PUBLIC API: GRAVITATIONAL_CONSTANT, lineMassGz, prismGz, gravityOperator.
 *
 * Coordinates: x horizontal, z depth (positive down); a station at (xs, zs) with zs above the body.
 * An infinite horizontal line of mass λ per unit length at horizontal offset x and depth z below
 * the station attracts with the vertical component
 *   g_z = 2 G λ z / (x² + z²)                                  (Blakely 1995, Potential Theory in
 *                                                               Gravity and Magnetic Applications, §9, memory)
 * Integrating this over a rectangular cross-section [x1, x2] × [z1, z2] with uniform density Δρ
 * (λ = Δρ dx dz) gives (our derivation: ∫ z/(x²+z²) dz = ½ ln(x²+z²), then by parts in x)
 *   g_z = 2 G Δρ [F(x2,z2) − F(x1,z2) − F(x2,z1) + F(x1,z1)],
 *   F(x, z) = ½ x ln(x² + z²) + z atan(x / z)               (z > 0; the −x term of the primitive cancels)
 * which the tests check against numerical quadrature of the line-mass kernel.
 */
import { InputError } from '../errors.ts';
import { cellCount, type Grid } from '../grid/grid.ts';
import { matrix } from '../linalg/matrix.ts';
import type { Operator } from '../linalg/operator.ts';

/** CODATA 2018 value, m³ kg⁻¹ s⁻² (memory). */
export const GRAVITATIONAL_CONSTANT = 6.6743e-11;

/** m/s² per mGal (1 Gal = 1 cm/s²). */
export const MGAL = 1e-5;

/** g_z (m/s²) of a line mass λ (kg/m) at horizontal offset x (m) and depth z > 0 (m) below the station. */
export function lineMassGz(lambda: number, x: number, z: number): number {
  return (2 * GRAVITATIONAL_CONSTANT * lambda * z) / (x * x + z * z);
}

function primitive(x: number, z: number): number {
  const r2 = x * x + z * z;
  return (x === 0 ? 0 : 0.5 * x * Math.log(r2)) + z * Math.atan(x / z);
}

/**
 * g_z (m/s²) of a 2-D rectangular prism of density contrast rho (kg/m³) spanning horizontal offsets
 * [x1, x2] and depths [z1, z2] (0 < z1 < z2) relative to the station.
 */
export function prismGz(rho: number, x1: number, x2: number, z1: number, z2: number): number {
  if (!(z1 > 0 && z2 > z1)) throw new InputError('prismGz: depths', '0 < z1 < z2 (prism below the station)', `${z1}, ${z2}`);
  const s = primitive(x2, z2) - primitive(x1, z2) - primitive(x2, z1) + primitive(x1, z1);
  return 2 * GRAVITATIONAL_CONSTANT * rho * s;
}

/**
 * Dense G (stations × cells) mapping density contrast (kg/m³) per cell of a 2-D grid (x, depth) to
 * g_z in mGal at each station. Cell (ix, iz) is the rectangle centred on the grid coordinates.
 * Stations are (x, z) with z above every cell (z smaller than the top edge of the grid).
 */
export function gravityOperator(grid: Grid, stations: readonly (readonly [number, number])[]): Operator {
  if (grid.shape.length !== 2) throw new InputError('grid.shape', '[nx, nz] (a vertical 2-D section)', grid.shape);
  const [nx, nz] = grid.shape as [number, number];
  const [dx, dz] = grid.spacing as [number, number];
  const [ox = 0, oz = 0] = grid.origin ?? [];
  const top = oz - dz / 2;
  const n = cellCount(grid);
  const G = matrix(stations.length, n);
  stations.forEach(([xs, zs], k) => {
    if (!(zs < top)) throw new InputError(`stations[${k}].z`, `a depth above the grid top ${top}`, zs);
    for (let iz = 0; iz < nz; iz++) {
      const z1 = oz + iz * dz - dz / 2 - zs;
      for (let ix = 0; ix < nx; ix++) {
        const x1 = ox + ix * dx - dx / 2 - xs;
        G.data[k * n + ix + nx * iz] = prismGz(1, x1, x1 + dx, z1, z1 + dz) / MGAL;
      }
    }
  });
  return { kind: 'dense', matrix: G };
}
