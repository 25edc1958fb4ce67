import { describe, expect, it } from 'vitest';
import { isAnisotropic, patchTerm, type Term } from '../../../src/core/kernels/spec.ts';
import { DEFAULT_MATERN_NU } from '../../../src/core/kernels/matern.ts';
import { termSmoothness } from '../../../src/core/kernels/table.ts';

describe('Term as a union of isotropic and anisotropic terms', () => {
  it('narrows on the length field it has (checked by tsc: the lines below fail to compile if it does not)', () => {
    const terms: Term[] = [
      { kernel: 'gaussian', variance: 1, length: 3 },
      { kernel: 'matern', variance: 2, lengths: [4, 1], angle: 30, nu: 2.5 },
    ];
    const first = terms.map((t) => (t.lengths !== undefined ? t.lengths[0] : t.length));
    expect(first).toEqual([3, 4]);
    expect(terms.map(isAnisotropic)).toEqual([false, true]);
    // @ts-expect-error a term has either length or lengths, not both
    const both: Term = { kernel: 'gaussian', variance: 1, length: 1, lengths: [1, 2] };
    expect(both.length).toBe(1);
  });

  it('patchTerm keeps the form and the field order, or switches the form dropping the other length', () => {
    const iso: Term = { kernel: 'exponential', variance: 1, length: 3, angle: 10 };
    const aniso: Term = { kernel: 'gaussian', variance: 2, lengths: [4, 1] };
    expect(JSON.stringify(patchTerm(iso, { variance: 5 }))).toBe('{"kernel":"exponential","variance":5,"length":3,"angle":10}');
    expect(JSON.stringify(patchTerm(iso, { length: 6, nu: 2 }))).toBe('{"kernel":"exponential","variance":1,"length":6,"angle":10,"nu":2}');
    expect(patchTerm(iso, { lengths: [2, 3] })).toEqual({ kernel: 'exponential', variance: 1, angle: 10, lengths: [2, 3] });
    expect(patchTerm(aniso, { length: 7 })).toEqual({ kernel: 'gaussian', variance: 2, length: 7 });
    expect(patchTerm(aniso, { lengths: [5, 1] })).toEqual({ kernel: 'gaussian', variance: 2, lengths: [5, 1] });
    expect(iso).toEqual({ kernel: 'exponential', variance: 1, length: 3, angle: 10 }); // not mutated
  });

  it('termSmoothness fills in the default only for kernels that take ν', () => {
    expect(termSmoothness({ kernel: 'matern' })).toBe(DEFAULT_MATERN_NU);
    expect(termSmoothness({ kernel: 'matern', nu: 0.7 })).toBe(0.7);
    expect(termSmoothness({ kernel: 'gaussian', nu: 0.7 })).toBeUndefined();
    expect(termSmoothness({ kernel: 'spherical' })).toBeUndefined();
  });
});
