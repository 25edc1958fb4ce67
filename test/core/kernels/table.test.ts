import { describe, expect, it } from 'vitest';
import { parsePriorFile, writePriorFile } from '../../../src/core/io/priorFile.ts';
import { WARNING_CODES } from '../../../src/core/prior/diagnostics.ts';
import { nonStationaryReason } from '../../../src/core/fft/covariance.ts';
import {
  KERNEL_NAMES,
  KERNELS,
  kernelDefinition,
  kernelsTaking,
  kernelTakes,
  type KernelName,
  PRACTICAL_RANGE_LEVEL,
} from '../../../src/core/kernels/table.ts';

// Every kernel in the table goes through the same checks; a kernel that takes a smoothness ν is checked at several.
const NUS = [0.3, 0.5, 0.8, 1.5, 2.5, 3.7, 20];
type Case = { name: string; kernel: KernelName; nu: number | undefined };
const CASES: Case[] = KERNEL_NAMES.flatMap<Case>((kernel) =>
  kernelTakes(kernel, 'nu') ? NUS.map((nu) => ({ name: `${kernel} ν = ${nu}`, kernel, nu })) : [{ name: kernel, kernel, nu: undefined }],
);

const EPS = 2.220446049250313e-16;

/** ∫₀^H f by composite Simpson's rule on n (even) panels. */
function simpson(f: (h: number) => number, H: number, n: number): number {
  const dh = H / n;
  let s = f(0) + f(H);
  for (let i = 1; i < n; i++) s += (i % 2 === 1 ? 4 : 2) * f(i * dh);
  return (s * dh) / 3;
}

describe('the kernel table', () => {
  it('KERNEL_NAMES lists exactly the table entries', () => {
    expect([...KERNEL_NAMES].sort()).toEqual(Object.keys(KERNELS).sort());
    expect(KERNEL_NAMES.length).toBeGreaterThanOrEqual(4);
  });

  describe.each(CASES)('$name: shared properties', ({ kernel, nu }) => {
    const def = kernelDefinition(kernel);
    const rho = def.correlation(nu);
    const hs = Array.from({ length: 600 }, (_, i) => Math.pow(10, -6 + (i * 9) / 599));

    it('ρ(0) = 1 and 0 ≤ ρ ≤ 1', () => {
      expect(rho(0)).toBe(1);
      for (const h of hs) {
        expect(rho(h)).toBeGreaterThanOrEqual(0);
        expect(rho(h)).toBeLessThanOrEqual(1);
      }
    });

    it('ρ is non-increasing and falls below the practical-range level', () => {
      for (let i = 1; i < hs.length; i++) expect(rho(hs[i])).toBeLessThanOrEqual(rho(hs[i - 1]) * (1 + 4 * EPS));
      expect(rho(hs[hs.length - 1])).toBeLessThan(PRACTICAL_RANGE_LEVEL);
    });

    it(`the practical range is where ρ = ${PRACTICAL_RANGE_LEVEL} (the project's definition)`, () => {
      const r = def.practicalRange(nu);
      expect(r).toBeGreaterThan(0);
      expect(Math.abs(rho(r) - PRACTICAL_RANGE_LEVEL)).toBeLessThan(1e-13);
      expect(rho(r * (1 - 1e-8))).toBeGreaterThan(PRACTICAL_RANGE_LEVEL);
      expect(rho(r * (1 + 1e-8))).toBeLessThan(PRACTICAL_RANGE_LEVEL);
    });

    // Bochner / Wiener–Khinchin: in 1-D the spectral density is the cosine transform of ρ, so
    // S(ω)/S(0) = ∫₀^∞ ρ(h) cos(ωh) dh / ∫₀^∞ ρ(h) dh with q = ω² (unit length). Matérn: R&W (2006) eq. 4.15;
    // Gaussian: the transform of e^{−h²/2}. The integrals by Simpson's rule, independent of the table's closed forms.
    it('the spectral density agrees with the numerical cosine transform of ρ (1-D)', () => {
      const logS = def.logSpectralDensity(nu, 1);
      if (logS === null) {
        expect(def.longLengthWarning).toBeNull(); // no estimate, so no warning can rest on one
        return;
      }
      const H = 60 / Math.min(1, Math.sqrt(nu ?? 1));
      const n = 40000;
      const area = simpson(rho, H, n);
      for (const w of [0.3, 1, 2.5]) {
        const ratio = simpson((h) => rho(h) * Math.cos(w * h), H, n) / area;
        expect(Math.exp(logS(w * w) - logS(0))).toBeCloseTo(ratio, 5); // ν = 0.3 has a cusp ρ ≈ 1 − c·h^0.6 that Simpson resolves to ~2e-6
      }
    });

    it('a stationary kernel is accepted by the FFT path; its dimension limit covers the 1-D and 2-D grids', () => {
      const prior = { mean: { constant: 0 }, terms: [{ kernel, variance: 1, length: 2, ...(nu === undefined ? {} : { nu }) }] };
      expect(def.stationary).toBe(true);
      expect(nonStationaryReason({ shape: [8, 8], spacing: [1, 1] }, prior)).toBeNull();
      expect(def.maxDimension).toBeGreaterThanOrEqual(2);
    });
  });

  describe.each(KERNEL_NAMES)('%s: file fields and help text', (kernel) => {
    const def = kernelDefinition(kernel);
    const file = (term: Record<string, unknown>) =>
      JSON.stringify({ kind: 'priorscope.prior', version: 1, mean: { constant: 0 }, terms: [term] });

    it('a field the kernel takes is required in the prior file and round-trips; elsewhere it is kept with a warning', () => {
      if (kernelTakes(kernel, 'nu')) {
        expect(() => parsePriorFile('p.json', file({ kernel, variance: 1, length: 2 }))).toThrow(
          `terms[0].nu must be a finite number > 0 for the ${kernel} kernel`,
        );
        const { prior, warnings } = parsePriorFile('p.json', file({ kernel, variance: 1, length: 2, nu: 2.5 }));
        expect(warnings).toEqual([]);
        expect(parsePriorFile('p.json', writePriorFile(prior)).prior).toEqual(prior);
      } else {
        expect(parsePriorFile('p.json', file({ kernel, variance: 1, length: 2 })).warnings).toEqual([]);
        const { prior, warnings } = parsePriorFile('p.json', file({ kernel, variance: 1, length: 2, nu: 2.5 }));
        expect(prior.terms[0].nu).toBe(2.5);
        expect(warnings.map((w) => w.message).join()).toContain(`only ${kernelsTaking('nu').join(', ')} has a smoothness`);
      }
    });

    it('has a label, description, formula and source, and its warning codes are listed', () => {
      for (const text of [def.label, def.description, def.formula, def.source]) expect(text.length).toBeGreaterThan(5);
      expect(def.formula).toMatch(/^ρ\(h\) = /);
      if (def.longLengthWarning) expect(WARNING_CODES).toContain(def.longLengthWarning.code);
      if (def.maxDimension < Infinity) expect(WARNING_CODES).toContain(`${kernel}-dimension`);
    });
  });
});
