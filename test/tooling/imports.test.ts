/**
 * No import cycles in src/ (read by ./importGraph.ts from the source text). Runtime cycles make the
 * order in which modules run depend on which one is imported first; type-only cycles tie two
 * modules' sources together. One kind of type-only edge is allowed: into src/app/store.ts for the
 * WorkbenchState type (and its StoreSet / StoreGet), which is the composition of the slices (zustand's slice pattern: each slice
 * is written against the whole state it lives in). Values never flow back into the store.
 */
import { mkdtempSync, writeFileSync } from 'node:fs';
import { tmpdir } from 'node:os';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { repoRoot } from '../cli/run.ts';
import { importCycles, importEdges, type ImportEdge } from './importGraph.ts';

const STATE_TYPE_MODULE = 'app/store.ts';
const show = (cycles: string[][]) => cycles.map((c) => c.join(' → '));

describe('import graph of src/', () => {
  const edges = importEdges(join(repoRoot, 'src'));

  it('reads the imports (sanity: the graph is not empty, and known edges are there)', () => {
    expect(edges.length).toBeGreaterThan(300);
    expect(edges).toContainEqual({ from: 'app/store.ts', to: 'app/session/slice.ts', typeOnly: false });
    expect(edges).toContainEqual({ from: 'core/kernels/spec.ts', to: 'core/kernels/table.ts', typeOnly: true });
  });

  it('has no runtime import cycle', () => {
    expect(show(importCycles(edges.filter((e) => !e.typeOnly)))).toEqual([]);
  });

  it('has no type-level import cycle, apart from type-only imports of the composed store state', () => {
    const kept = edges.filter((e) => !(e.typeOnly && e.to === STATE_TYPE_MODULE));
    expect(show(importCycles(kept))).toEqual([]);
  });
});

describe('the cycle finder', () => {
  it('finds a runtime cycle and a type-only one in files on disk, and tells them apart', () => {
    const dir = mkdtempSync(join(tmpdir(), 'priorscope-imports-'));
    writeFileSync(join(dir, 'a.ts'), "import { b } from './b.ts';\n// import { c } from './c.ts';\nexport const a = () => b;\n");
    writeFileSync(join(dir, 'b.ts'), "/* import './d.ts' */\nimport { a } from './a.ts';\nexport const b = 1;\nexport { a };\n");
    writeFileSync(join(dir, 'c.ts'), "import type { D } from './d.ts';\nexport type C = number;\nexport const c = (d: D) => d;\n");
    writeFileSync(join(dir, 'd.ts'), "import { type C } from './c.ts';\nexport type D = C;\nexport const lazy = () => import('./e.ts');\n");
    writeFileSync(join(dir, 'e.ts'), "export * from './f.ts';\n");
    writeFileSync(join(dir, 'f.ts'), "import './e.ts';\n");
    const e = importEdges(dir);
    expect(e.filter((x) => x.from === 'a.ts').map((x) => x.to)).toEqual(['b.ts']);
    expect(e.find((x) => x.from === 'c.ts')?.typeOnly).toBe(true);
    expect(e.find((x) => x.from === 'd.ts' && x.to === 'c.ts')?.typeOnly).toBe(true);
    const runtime = show(importCycles(e.filter((x) => !x.typeOnly))).sort();
    expect(runtime).toEqual(['a.ts → b.ts → a.ts', 'e.ts → f.ts → e.ts']);
    expect(show(importCycles(e)).sort()).toEqual(['a.ts → b.ts → a.ts', 'c.ts → d.ts → c.ts', 'e.ts → f.ts → e.ts']);
  });

  it('gives one cycle per strongly connected component, with a module importing itself counted', () => {
    const edge = (from: string, to: string): ImportEdge => ({ from, to, typeOnly: false });
    const cycles = importCycles([edge('x', 'y'), edge('y', 'z'), edge('z', 'x'), edge('z', 'w'), edge('s', 's')]);
    expect(show(cycles).sort()).toEqual(['s → s', 'x → y → z → x']);
  });
});
