import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { DATA_FIELDS, GRID_FIELDS, CELLS_FIELDS, OPERATOR_FIELDS, parseProblemFile, TOP_FIELDS } from '../../src/core/io/problemFile.ts';
import { gridProblem } from '../../src/core/problems/spec.ts';
import { parseGeometryCsv } from '../../src/core/io/geometryCsv.ts';
import { parseDataCsv } from '../../src/core/io/pieces.ts';
import { toRows } from '../../src/core/linalg/matrix.ts';
import { repoRoot, runCommand } from './run.ts';

const templates = join(repoRoot, 'public/templates');
const read = (f: string) => readFileSync(join(templates, f));

describe('priorscope --help formats', () => {
  it.each([['--help'], ['help']])('%s formats prints the whole problem-file format, exit 0', async (flag) => {
    const r = await runCommand([flag, 'formats'], repoRoot);
    expect(r.code).toBe(0);
    // Every field the problem reader knows is named, in quotes as it is written in a file.
    for (const f of [...TOP_FIELDS, ...GRID_FIELDS, ...CELLS_FIELDS, ...OPERATOR_FIELDS, ...DATA_FIELDS]) expect(r.out).toContain(`"${f}"`);
    for (const words of ['x fastest', 'ix + nx·iy', 'CENTRE of the first cell', 'sx,sy,rx,ry', 'stdProfile', 'trend']) {
      expect(r.out).toContain(words);
    }
  });

  it('the main help points to it', async () => {
    expect((await runCommand(['--help'], repoRoot)).out).toContain('priorscope --help formats');
  });
});

describe('the downloadable templates are in step with the format', () => {
  it('problem.json (with G.mtx) reads without a warning and carries positions at its windows’ centres', () => {
    const { problem, warnings } = parseProblemFile('problem.json', read('problem.json'), { readSibling: (name) => read(name) });
    expect(warnings).toEqual([]);
    const geo = problem.data.geometry!;
    expect(geo.kind).toBe('points');
    // Window k of G.mtx averages cells 2k … 2k + 4 (1 m cells, first centre at 0): centre 2k + 2.
    const g = problem.operator;
    if (geo.kind !== 'points' || g.kind !== 'sparse') throw new Error('template changed shape');
    const rows = toRows(geo.positions);
    for (let k = 0; k < rows.length; k++) {
      let sum = 0;
      let w = 0;
      for (let p = g.matrix.rowPtr[k]; p < g.matrix.rowPtr[k + 1]; p++) {
        sum += g.matrix.values[p] * g.matrix.colIdx[p];
        w += g.matrix.values[p];
      }
      expect(rows[k][0]).toBeCloseTo(sum / w, 12);
    }
  });

  it('data.csv and geometry.csv hold the same data as problem.json', () => {
    const problem = gridProblem(
      parseProblemFile('problem.json', read('problem.json'), { readSibling: (name) => read(name) }).problem,
      'this test',
    );
    const d = parseDataCsv('data.csv', read('data.csv'));
    expect([...d.values]).toEqual([...problem.data.values]);
    const geo = parseGeometryCsv('geometry.csv', read('geometry.csv'), problem.grid, d.values.length);
    expect(geo.geometry).toEqual(problem.data.geometry);
  });
});
