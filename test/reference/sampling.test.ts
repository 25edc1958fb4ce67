/**
 * The seeded generator against numpy's legacy RandomState (same published MT19937 with the same
 * init_genrand seeding, 53-bit doubles, polar-method normals; test/reference/sampling_reference.py),
 * and the fdlibm log port against numpy's log (glibc libm).
 */
import { describe, expect, it } from 'vitest';
import { FDLIBM_LOG_CONSTANTS, MT19937_DEFAULT_SEED, Random, ieeeLog } from '../../src/core/sampling/random.ts';
import { runPython } from './python.ts';

type Ref = { uint32?: number[]; double?: number[]; normal?: number[]; log?: number[] };
const seeds = [0, 1, MT19937_DEFAULT_SEED, 123456789, 4294967295];

/** Distance in units in the last place between two finite doubles of the same sign. */
function ulps(a: number, b: number): number {
  if (a === b) return 0;
  const f = new Float64Array([a, b]);
  const i = new BigInt64Array(f.buffer);
  const d = i[0] - i[1];
  return Number(d < 0n ? -d : d);
}

describe('Random (MT19937) vs numpy RandomState', () => {
  it.each(seeds)('seed %i: first 2000 integers, 1000 doubles bit for bit; 1001 normals within 2 ulp', (seed) => {
    const ref = runPython<Ref>('sampling_reference.py', { seed, uint32: 2000, double: 1000, normal: 1001 });
    const a = new Random(seed);
    expect(Array.from({ length: 2000 }, () => a.nextUint32())).toEqual(ref.uint32);
    const b = new Random(seed);
    expect(Array.from({ length: 1000 }, () => b.nextDouble())).toEqual(ref.double);
    const c = new Random(seed);
    const z = Array.from({ length: 1001 }, () => c.nextNormal());
    // Same uniforms and the same operations; only log may differ (glibc vs fdlibm, each < 1 ulp).
    const worst = Math.max(...z.map((v, k) => ulps(v, ref.normal![k])));
    expect(worst).toBeLessThanOrEqual(2);
  });

  it('10000th output for the default seed 5489 is 4123659995 (ISO C++ [rand.predef] mt19937 requirement, memory)', () => {
    const r = new Random(MT19937_DEFAULT_SEED);
    let v = 0;
    for (let k = 0; k < 10000; k++) v = r.nextUint32();
    expect(v).toBe(4123659995);
  });
});

describe('ieeeLog (fdlibm e_log.c port)', () => {
  it('constants match the bit patterns printed beside them in fdlibm', () => {
    const hex = (x: number) => {
      const f = new Float64Array([x]);
      const u = new Uint32Array(f.buffer);
      return (u[1].toString(16).padStart(8, '0') + u[0].toString(16).padStart(8, '0')).toUpperCase();
    };
    const K = FDLIBM_LOG_CONSTANTS;
    expect([K.Lg1, K.Lg2, K.Lg3, K.Lg4, K.Lg5, K.Lg6, K.Lg7, K.ln2_hi, K.ln2_lo, K.two54].map(hex)).toEqual([
      '3FE5555555555593',
      '3FD999999997FA04',
      '3FD2492494229359',
      '3FCC71C51D8E78AF',
      '3FC7466496CB03DE',
      '3FC39A09D078C69F',
      '3FC2F112DF3E5244',
      '3FE62E42FEE00000',
      '3DEA39EF35793C76',
      '4350000000000000',
    ]);
  });

  it('is within 1 ulp of numpy.log on 20000 arguments (subnormal … 1e300, near 1, the polar-method range)', () => {
    const r = new Random(2024);
    const xs: number[] = [5e-324, 2.2250738585072014e-308, 1e-310, 0.5, 1, 2, Math.E, 1 + 2 ** -52, 1 - 2 ** -53, 1e300];
    for (let k = 0; k < 8000; k++) xs.push(r.nextDouble()); // (0, 1): the r² of the polar method
    for (let k = 0; k < 6000; k++) xs.push(1 + (r.nextDouble() - 0.5) * 2 ** -(10 + (k % 30))); // near 1 (|f| < 2^-20 branch)
    for (let k = 0; k < 5990; k++) xs.push(r.nextDouble() * 2 ** Math.floor(r.nextDouble() * 2000 - 1070)); // all exponents
    const ref = runPython<Ref>('sampling_reference.py', { seed: 0, log: xs }).log!;
    let worst = 0;
    xs.forEach((x, k) => {
      const got = ieeeLog(x);
      worst = Math.max(worst, ref[k] === 0 ? Math.abs(got) : ulps(got, ref[k]));
    });
    expect(worst).toBeLessThanOrEqual(1);
    expect([ieeeLog(0), ieeeLog(-1), ieeeLog(Infinity), ieeeLog(NaN)]).toEqual([-Infinity, NaN, Infinity, NaN]);
  });
});
