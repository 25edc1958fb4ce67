import { describe, expect, it } from 'vitest';
import {
  correlation,
  correlationFunction,
  kernelInfo,
  practicalRange,
  PRACTICAL_RANGE_LEVEL,
} from '../../../src/core/kernels/correlation.ts';
import { KERNEL_NAMES, type KernelName } from '../../../src/core/kernels/spec.ts';

const EPS = 2.220446049250313e-16;

// One table of kernels through one property suite.
const CASES: { name: string; kernel: KernelName; nu?: number }[] = [
  { name: 'exponential', kernel: 'exponential' },
  { name: 'gaussian', kernel: 'gaussian' },
  { name: 'spherical', kernel: 'spherical' },
  ...[0.05, 0.3, 0.5, 0.8, 1, 1.25, 1.5, 2, 2.5, 2.75, 7.5, 30, 100].map((nu) => ({
    name: `matern ν = ${nu}`,
    kernel: 'matern' as const,
    nu,
  })),
];

const HS = [0, 5e-324, 1e-300, 1e-12, ...Array.from({ length: 400 }, (_, i) => Math.pow(10, -8 + (i * 11) / 399)), 1e5];

describe.each(CASES)('$name', ({ kernel, nu }) => {
  const rho = correlationFunction(kernel, nu);
  it('ρ(0) = 1 exactly', () => expect(rho(0)).toBe(1));
  it('0 ≤ ρ ≤ 1 and finite for h from 0 to 1e5 (incl. subnormal h)', () => {
    for (const h of HS) {
      const r = rho(h);
      expect(Number.isFinite(r)).toBe(true);
      expect(r).toBeGreaterThanOrEqual(0);
      expect(r).toBeLessThanOrEqual(1);
    }
  });
  it('is non-increasing in h (allowing 4 ulp of rounding between neighbours)', () => {
    for (let i = 1; i < HS.length; i++) expect(rho(HS[i])).toBeLessThanOrEqual(rho(HS[i - 1]) * (1 + 4 * EPS));
  });
  it('practicalRange r has ρ(r) = 0.05 and brackets it: ρ(r(1 − 1e-9)) > 0.05 > ρ(r(1 + 1e-9))', () => {
    const r = practicalRange(kernel, nu);
    expect(Math.abs(rho(r) - PRACTICAL_RANGE_LEVEL)).toBeLessThan(1e-14);
    expect(rho(r * (1 - 1e-9))).toBeGreaterThan(PRACTICAL_RANGE_LEVEL);
    expect(rho(r * (1 + 1e-9))).toBeLessThan(PRACTICAL_RANGE_LEVEL);
  });
  it('correlation(kernel, h, ν) equals correlationFunction(kernel, ν)(h)', () => {
    for (const h of [0, 0.3, 1.7, 4]) expect(correlation(kernel, h, nu)).toBe(rho(h));
  });
});

describe('practical ranges in closed form', () => {
  it('exponential: −ln 0.05 = ln 20 = 2.9957 (derived); textbook "3a" for 1 − e^{−h/a} (Journel & Huijbregts 1978)', () => {
    expect(practicalRange('exponential')).toBe(-Math.log(0.05));
    expect(practicalRange('exponential')).toBeCloseTo(2.9957, 4);
    // the textbook's 3 is ln 20 rounded: within 0.15 %
    expect(Math.abs(practicalRange('exponential') / 3 - 1)).toBeLessThan(1.5e-3);
  });
  it('gaussian: √(2 ln 20) = 2.4477 (derived); textbook √3·a for 1 − e^{−h²/a²} is √3·√2 = 2.449 in our scaling', () => {
    expect(practicalRange('gaussian')).toBeCloseTo(Math.sqrt(2 * Math.log(20)), 15);
    expect(practicalRange('gaussian')).toBeCloseTo(2.4477, 4);
    expect(Math.abs(practicalRange('gaussian') / Math.sqrt(6) - 1)).toBeLessThan(1e-3);
  });
  it('spherical: root of 1 − 1.5h + 0.5h³ = 0.05 in (0, 1)', () => {
    const r = practicalRange('spherical');
    expect(r).toBeGreaterThan(0);
    expect(r).toBeLessThan(1);
    expect(Math.abs(1 - 1.5 * r + 0.5 * r ** 3 - 0.05)).toBeLessThan(4 * EPS);
  });
  it('matern ν = 1/2 gives the exponential value', () => {
    expect(practicalRange('matern', 0.5)).toBeCloseTo(Math.log(20), 14);
  });
  it('matern approaches the Gaussian value as ν grows (first-order error ∝ 1/ν)', () => {
    const g = practicalRange('gaussian');
    const d100 = practicalRange('matern', 100) - g;
    const d1000 = practicalRange('matern', 1000) - g;
    expect(Math.abs(d1000)).toBeLessThan(Math.abs(d100));
    expect(d100 / d1000).toBeGreaterThan(8);
    expect(d100 / d1000).toBeLessThan(12);
  });
});

describe('kernelInfo', () => {
  it.each(KERNEL_NAMES)('%s has a label, description, formula and source', (kernel) => {
    const info = kernelInfo(kernel);
    expect(info.kernel).toBe(kernel);
    for (const text of [info.label, info.description, info.formula, info.source]) expect(text.length).toBeGreaterThan(5);
    expect(info.formula).toMatch(/^ρ\(h\) = /);
  });
});

describe('spherical and exponential shape', () => {
  it('spherical reaches 0 exactly at h = 1 and stays 0', () => {
    const rho = correlationFunction('spherical');
    expect(rho(1)).toBe(0);
    expect(rho(1 - 1e-12)).toBeGreaterThan(0);
    expect(rho(7)).toBe(0);
  });
  it('matern with default ν is ν = 3/2', () => {
    expect(correlationFunction('matern')(0.9)).toBe(correlationFunction('matern', 1.5)(0.9));
  });
});
