/**
 * The import graph of src/, read from the source text (no compiler API): every static
 * `import … from`, `export … from`, side-effect `import '…'` and dynamic `import('…')` of a relative
 * path. An edge is type-only when the whole statement is `import type` / `export type` or every
 * imported name is marked `type`: those vanish from the JavaScript, so they cannot change the order
 * modules run in, but they still tie the two modules' sources together.
 */
import { readdirSync, readFileSync } from 'node:fs';
import { dirname, join, relative, resolve } from 'node:path';

export interface ImportEdge {
  readonly from: string;
  readonly to: string;
  readonly typeOnly: boolean;
}

function sourceFiles(dir: string): string[] {
  const out: string[] = [];
  for (const e of readdirSync(dir, { withFileTypes: true })) {
    const p = join(dir, e.name);
    if (e.isDirectory()) out.push(...sourceFiles(p));
    else if (/\.(ts|tsx|mjs)$/.test(e.name) && !e.name.endsWith('.d.ts')) out.push(p);
  }
  return out;
}

/** Comments removed (string contents kept), so commented-out imports do not count. */
function stripComments(text: string): string {
  return text.replace(/\/\*[\s\S]*?\*\//g, '').replace(/(^|[^:'"`\\])\/\/[^\n]*/g, '$1');
}

const STATIC = /(^|[\n;])\s*(import|export)\s+(type\s+)?([^'";]*?)\s*from\s*['"]([^'"]+)['"]/g;
const BARE = /(^|[\n;])\s*import\s*['"]([^'"]+)['"]/g;
const DYNAMIC = /\bimport\(\s*['"]([^'"]+)['"]\s*\)/g;

function allNamesTypeOnly(clause: string): boolean {
  const m = /^\{([\s\S]*)\}$/.exec(clause.trim());
  if (!m) return false;
  const names = m[1]
    .split(',')
    .map((s) => s.trim())
    .filter(Boolean);
  return names.length > 0 && names.every((n) => n.startsWith('type '));
}

/** Edges between files under `root` (paths relative to `root`, '/'-separated). */
export function importEdges(root: string): ImportEdge[] {
  const edges: ImportEdge[] = [];
  for (const file of sourceFiles(root)) {
    const text = stripComments(readFileSync(file, 'utf8'));
    const from = relative(root, file).split('\\').join('/');
    const add = (spec: string, typeOnly: boolean) => {
      if (!spec.startsWith('.')) return;
      const to = relative(root, resolve(dirname(file), spec))
        .split('\\')
        .join('/');
      edges.push({ from, to, typeOnly });
    };
    for (const m of text.matchAll(STATIC)) add(m[5], Boolean(m[3]) || allNamesTypeOnly(m[4]));
    for (const m of text.matchAll(BARE)) add(m[2], false);
    for (const m of text.matchAll(DYNAMIC)) add(m[1], false);
  }
  return edges;
}

/**
 * The cycles of the graph, one per strongly connected component of more than one module (or a
 * module importing itself), each given as a path m1 → m2 → … → m1 through that component.
 */
export function importCycles(edges: readonly ImportEdge[]): string[][] {
  const next = new Map<string, string[]>();
  for (const e of edges) {
    if (!next.has(e.from)) next.set(e.from, []);
    next.get(e.from)!.push(e.to);
  }
  // Tarjan's strongly connected components (Tarjan 1972), iterative over a sorted node list.
  const nodes = [...new Set(edges.flatMap((e) => [e.from, e.to]))].sort();
  const index = new Map<string, number>();
  const low = new Map<string, number>();
  const onStack = new Set<string>();
  const stack: string[] = [];
  const components: string[][] = [];
  let counter = 0;
  const visit = (v: string): void => {
    index.set(v, counter);
    low.set(v, counter);
    counter++;
    stack.push(v);
    onStack.add(v);
    for (const w of next.get(v) ?? []) {
      if (!index.has(w)) {
        visit(w);
        low.set(v, Math.min(low.get(v)!, low.get(w)!));
      } else if (onStack.has(w)) low.set(v, Math.min(low.get(v)!, index.get(w)!));
    }
    if (low.get(v) === index.get(v)) {
      const c: string[] = [];
      let w: string;
      do {
        w = stack.pop()!;
        onStack.delete(w);
        c.push(w);
      } while (w !== v);
      if (c.length > 1 || (next.get(v) ?? []).includes(v)) components.push(c);
    }
  };
  for (const v of nodes) if (!index.has(v)) visit(v);
  // One concrete cycle per component: breadth-first from its first module back to itself.
  return components.map((c) => {
    const members = new Set(c);
    const start = [...c].sort()[0];
    const prev = new Map<string, string>();
    const queue = [start];
    while (queue.length > 0) {
      const v = queue.shift()!;
      for (const w of next.get(v) ?? []) {
        if (!members.has(w)) continue;
        if (w === start) {
          const path = [start];
          for (let u = v; u !== start; u = prev.get(u)!) path.splice(1, 0, u);
          return [...path, start];
        }
        if (!prev.has(w)) {
          prev.set(w, v);
          queue.push(w);
        }
      }
    }
    return [start, start];
  });
}
