import { describe, expect, it } from 'vitest';
import { correlationFunction, practicalRange } from '../../src/core/kernels/correlation.ts';
import { assertNever } from '../../src/core/errors.ts';
import { DEFAULT_MATERN_NU, type KernelName } from '../../src/core/kernels/spec.ts';

describe('assertNever', () => {
  it('throws naming the union and the value that got past the types', () => {
    expect(() => assertNever('cubic' as never, 'kernel')).toThrow('unexpected kernel: "cubic"');
    expect(() => assertNever({ kind: 'x' } as never)).toThrow('unexpected variant: {"kind":"x"}');
  });
  it('an exhaustive kernel switch reached with a name outside KernelName throws', () => {
    expect(() => correlationFunction('cubic' as KernelName)).toThrow('unexpected kernel: "cubic"');
  });
});

describe('DEFAULT_MATERN_NU', () => {
  it('is 3/2, the smoothness a matern term without nu gets', () => {
    expect(DEFAULT_MATERN_NU).toBe(1.5);
    // Matérn ν = 3/2: ρ(h) = (1 + √3 h) e^(−√3 h) (Rasmussen & Williams 2006, eq. 4.17).
    const h = 0.7;
    expect(correlationFunction('matern')(h)).toBeCloseTo((1 + Math.sqrt(3) * h) * Math.exp(-Math.sqrt(3) * h), 14);
    expect(practicalRange('matern')).toBe(practicalRange('matern', 1.5));
  });
});
