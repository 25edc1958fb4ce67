/**
 * `priorscope posterior --vti` and `priorscope sample --format vti` on a 3-D problem: the .vti read back by
 * Python's xml.etree and numpy (test/reference/vti_reference.py) holds the same numbers as the JSON output,
 * cell (ix, iy, iz) at [iz][iy][ix].
 */
import { mkdtempSync, readFileSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { runPython } from '../reference/python.ts';
import { runCommand } from './run.ts';

type Read = { extent: number[]; origin: number[]; spacing: number[]; fields: Record<string, number[][][]> };

const [nx, ny, nz] = [5, 4, 3];
const n = nx * ny * nz;

function setUp(): string {
  const d = mkdtempSync(join(tmpdir(), 'ps-vti-'));
  const rows = [7, 23, 41, 58].map((c) => Array.from({ length: n }, (_, i) => (i === c ? 1 : 0)));
  writeFileSync(
    join(d, 'p.json'),
    JSON.stringify({
      kind: 'priorscope.problem',
      version: 1,
      grid: { shape: [nx, ny, nz], spacing: [2, 1, 0.5], origin: [1, 0.5, 0.25] },
      operator: { dense: rows },
      data: { values: [1.2, -0.4, 0.3, 0.9], sigma: [0.1, 0.1, 0.2, 0.2] },
    }),
  );
  writeFileSync(
    join(d, 'q.json'),
    JSON.stringify({
      kind: 'priorscope.prior',
      version: 1,
      mean: { constant: 0.5 },
      terms: [{ kernel: 'exponential', variance: 1, lengths: [4, 2, 1], angles: [20, 10, 0] }],
      nugget: 0.01,
    }),
  );
  return d;
}

const at = (f: number[][][], i: number) => f[Math.floor(i / (nx * ny))]![Math.floor(i / nx) % ny]![i % nx]!;

describe('3-D fields as .vti from the command line', () => {
  it('posterior --vti: mean, std, prior std and variance reduction as cell arrays, x fastest, corner origin', async () => {
    const d = setUp();
    const r = await runCommand(['posterior', '--problem', 'p.json', '--prior', 'q.json', '--vti', 'post.vti', '--out', 'post.json'], d);
    expect(r.code).toBe(0);
    const json = JSON.parse(readFileSync(join(d, 'post.json'), 'utf8')) as { mean: number[]; std: number[]; priorStd: number[] };
    const v = runPython<Read>('vti_reference.py', { text: readFileSync(join(d, 'post.vti'), 'utf8') });
    expect(v.extent).toEqual([0, nx, 0, ny, 0, nz]);
    expect(v.origin).toEqual([0, 0, 0]);
    expect(v.spacing).toEqual([2, 1, 0.5]);
    for (let i = 0; i < n; i++) {
      expect(at(v.fields['posterior mean']!, i)).toBe(json.mean[i]);
      expect(at(v.fields['posterior std']!, i)).toBe(json.std[i]);
      expect(at(v.fields['prior std']!, i)).toBe(json.priorStd[i]);
      expect(at(v.fields['variance reduction']!, i)).toBeCloseTo(1 - json.std[i]! ** 2 / json.priorStd[i]! ** 2, 14);
    }
    // Observed cells lose variance; the cell far from every datum barely does.
    expect(at(v.fields['variance reduction']!, 7)).toBeGreaterThan(0.5);
  });

  it('sample --out r.vti: one cell array per realisation, equal to the JSON realisations of the same seed', async () => {
    const d = setUp();
    expect(
      (await runCommand(['sample', '--problem', 'p.json', '--prior', 'q.json', '--count', '3', '--seed', '9', '--out', 'r.vti'], d)).code,
    ).toBe(0);
    const j = await runCommand(['sample', '--problem', 'p.json', '--prior', 'q.json', '--count', '3', '--seed', '9'], d);
    const rows = (JSON.parse(j.out) as { realisations: number[][] }).realisations;
    const v = runPython<Read>('vti_reference.py', { text: readFileSync(join(d, 'r.vti'), 'utf8') });
    expect(Object.keys(v.fields)).toEqual(['realisation 1', 'realisation 2', 'realisation 3']);
    for (let k = 0; k < 3; k++) for (let i = 0; i < n; i++) expect(at(v.fields[`realisation ${k + 1}`]!, i)).toBe(rows[k]![i]);
  });
});
