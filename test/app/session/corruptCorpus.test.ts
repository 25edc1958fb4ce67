/**
 * The autosave and share links are read through the same checks as files. A seeded
 * corpus of damaged saved sessions must each open to a working page (a problem shown, a valid prior,
 * no raw JavaScript message), and a failed share link must leave the saved session as it was.
 */
import { describe, expect, it } from 'vitest';
import { createWorkbenchStore, type WorkbenchStore } from '../../../src/app/store.ts';
import { TABS } from '../../../src/app/view/slice.ts';
import { memoryStorage } from '../../../src/app/session/autosave.ts';
import { installAutosave, startSession } from '../../../src/app/session/start.ts';
import { encodeShare } from '../../../src/app/session/share.ts';
import { MAX_TERMS, validatePrior } from '../../../src/core/prior/validate.ts';
import { parsePriorFile } from '../../../src/core/io/priorFile.ts';
import { Random } from '../../../src/core/sampling/random.ts';
import { enc, fiveCells } from './fixtures.ts';
import { inProcessClient, tick } from './inProcessClient.ts';

const pieces = () => fiveCells();

/** A store whose autosave holds the user's 5-cell problem with an edited prior. */
async function savedUserSession() {
  const storage = memoryStorage();
  const store = createWorkbenchStore(inProcessClient(), { demoId: 'borehole-log' });
  await store.getState().openDemo('borehole-log');
  installAutosave(store, storage, 0);
  expect(await store.getState().loadPieces(pieces())).toBe(true);
  store.getState().updateTerm(0, { length: 0.75 });
  await tick(30);
  expect(storage.map.get('session')).toBeDefined();
  return { storage, prior: store.getState().prior! };
}

async function openFresh(
  storage: ReturnType<typeof memoryStorage>,
  hash = '',
  explicitDemo: string | null = null,
): Promise<WorkbenchStore> {
  const store = createWorkbenchStore(inProcessClient(), { demoId: 'borehole-log' });
  await startSession(store, { storage, explicitDemo, hash });
  for (let k = 0; k < 200 && Object.values(store.getState().busy).some(Boolean); k++) await tick(5);
  return store;
}

const RAW_JS = /Cannot |undefined|is not a function|is not iterable|of null|TypeError|RangeError|Invalid (typed )?array length/;

/** Everything the page shows as text after opening. */
function shown(store: WorkbenchStore): string {
  const s = store.getState();
  return [s.notice, s.loadError, s.problemError, ...Object.values(s.errors)].filter(Boolean).join(' | ');
}

type Rec = Record<string, unknown> & { prior: Record<string, unknown>; extra?: unknown };
type Mutation = readonly [name: string, f: (session: Rec, problem: { key: string; problem: Record<string, unknown> }) => void];

const huge = () => {
  const terms = [];
  for (let k = 0; k < 20_000; k++) terms.push({ kernel: 'exponential', variance: 1, length: 1 + k });
  return terms;
};

const MUTATIONS: readonly Mutation[] = [
  ['unknown tab', (s) => (s.tab = 'maps')],
  ['unknown kernel', (s) => ((s.prior.terms as Record<string, unknown>[])[0].kernel = 'cubic')],
  [
    'junk candidates',
    (s) => (s.extra = { candidates: [{ id: 1 }, 'x', null, { id: 'a', name: 'b', colour: '#123456', prior: { terms: 3 } }] }),
  ],
  ['candidates not an array', (s) => (s.extra = { candidates: 'abc' })],
  ['NaN prior length', (s) => ((s.prior.terms as Record<string, unknown>[])[0].length = NaN)],
  ['NaN mean', (s) => (s.prior.mean = { constant: NaN })],
  ['prior mean values too short', (s) => (s.prior.mean = { values: new Float64Array(2) })],
  ['prior is a number', (s) => (s.prior = 5 as unknown as Record<string, unknown>)],
  ['terms is a string', (s) => (s.prior.terms = 'abc')],
  ['20,000 terms', (s) => (s.prior.terms = huge())],
  ['seed NaN', (s) => (s.seed = NaN)],
  ['selected cell out of range', (s) => (s.selectedCell = 1e9)],
  [
    'short G',
    (_s, p) => {
      const op = p.problem.operator as { matrix: { values: Float64Array; colIdx: Int32Array } };
      op.matrix.values = op.matrix.values.subarray(0, 2);
    },
  ],
  ['sigma 0', (_s, p) => ((p.problem.data as { sigma: Float64Array }).sigma[1] = 0)],
  ['data NaN', (_s, p) => ((p.problem.data as { values: Float64Array }).values[0] = NaN)],
  ['a 10⁹-cell problem', (_s, p) => (p.problem.grid = { shape: [100_000, 10_000], spacing: [1, 1] })],
  ['grid shape junk', (_s, p) => (p.problem.grid = { shape: 'x', spacing: [1] })],
  ['operator missing', (_s, p) => delete p.problem.operator],
  ['problem key mismatch', (_s, p) => (p.key = 'other')],
  ['source kind unknown', (s) => (s.source = { kind: 'cloud' })],
  ['source null', (s) => (s.source = null)],
  ['unknown demo', (s) => (s.source = { kind: 'demo', demoId: 'nowhere' })],
  ['format 2', (s) => (s.format = 2)],
];

describe('a damaged autosave opens to a working page with our own message', () => {
  for (const [name, mutate] of MUTATIONS) {
    it(name, async () => {
      const { storage } = await savedUserSession();
      const session = storage.map.get('session') as Rec;
      const problem = storage.map.get('problem') as { key: string; problem: Record<string, unknown> };
      mutate(session, problem);
      const store = await openFresh(storage);
      const s = store.getState();
      expect(s.problemStatus).toBe('ready');
      expect(s.prior).not.toBeNull();
      expect(() => validatePrior(s.prior!, s.problem!.grid)).not.toThrow();
      expect(s.prior!.terms.length).toBeLessThanOrEqual(MAX_TERMS);
      expect(TABS.map((t) => t.id)).toContain(s.tab);
      expect(Number.isInteger(s.seed)).toBe(true);
      for (const c of s.candidates) expect(() => validatePrior(c.prior, s.problem!.grid)).not.toThrow();
      expect(shown(store)).toMatch(/saved/i);
      expect(shown(store)).not.toMatch(RAW_JS);
      expect(Object.keys(s.errors)).toEqual([]);
    });
  }

  it('a seeded random corruption of any field never gives a raw message or a broken state (60 cases)', async () => {
    const { storage } = await savedUserSession();
    const base = storage.map.get('session') as Rec;
    const baseProblem = storage.map.get('problem') as { key: string; problem: Record<string, unknown> };
    const gen = new Random(20261204);
    const rng = () => gen.nextUint32() / 2 ** 32;
    const junk = [NaN, -1, 0, 1e308, null, undefined, 'x', [], {}, true, new Float64Array(1), -0];
    /** Paths of the leaves of a record. */
    const leaves = (v: unknown, path: (string | number)[] = []): (string | number)[][] => {
      if (ArrayBuffer.isView(v)) return [path, [...path, 0]];
      if (typeof v === 'object' && v !== null)
        return [path, ...Object.entries(v).flatMap(([k, x]) => leaves(x, [...path, Array.isArray(v) ? Number(k) : k]))];
      return [path];
    };
    for (let c = 0; c < 60; c++) {
      const rec = { session: structuredClone(base), problem: structuredClone(baseProblem) } as Record<string, unknown>;
      const paths = leaves(rec).filter((p) => p.length > 1);
      const path = paths[Math.floor(rng() * paths.length)];
      let o = rec as Record<string | number, unknown>;
      for (const k of path.slice(0, -1)) o = o[k] as Record<string | number, unknown>;
      o[path[path.length - 1]] = junk[Math.floor(rng() * junk.length)];
      const st = memoryStorage();
      st.map.set('session', rec.session);
      st.map.set('problem', rec.problem);
      const store = await openFresh(st);
      const t = store.getState();
      expect(t.problemStatus, path.join('.')).toBe('ready');
      expect(() => validatePrior(t.prior!, t.problem!.grid), path.join('.')).not.toThrow();
      expect(shown(store), path.join('.')).not.toMatch(RAW_JS);
    }
  });
});

describe('share links change nothing when they fail', () => {
  it('a link whose prior does not fit its problem keeps the saved session (prior and problem)', async () => {
    const { storage, prior } = await savedUserSession();
    const before = structuredClone(storage.map.get('session'));
    const hash = await encodeShare({
      problem: 'borehole-log',
      prior: { mean: { values: [1, 2, 3] }, terms: [{ kernel: 'exponential', variance: 1, length: 2 }] },
    });
    const store = await openFresh(storage, hash);
    expect(store.getState().loadError).toMatch(/^The shared link could not be opened: /);
    expect(store.getState().userProblem?.label).toBe('G.mtx + d.csv');
    expect(store.getState().prior).toEqual(prior);
    installAutosave(store, storage, 0);
    await tick(30);
    expect((storage.map.get('session') as Rec).prior).toEqual((before as Rec).prior);
  });

  it('a link for an unknown built-in problem is refused and keeps the saved session', async () => {
    const { storage, prior } = await savedUserSession();
    const hash = await encodeShare({
      problem: 'nowhere',
      prior: { mean: { constant: 0 }, terms: [{ kernel: 'exponential', variance: 1, length: 2 }] },
    });
    const store = await openFresh(storage, hash);
    expect(store.getState().loadError).toBe('The shared link could not be opened: problem "nowhere" is not one of the built-in problems');
    expect(store.getState().prior).toEqual(prior);
  });

  it(`a link with 20,000 terms is refused by its count, before any term is read (limit ${MAX_TERMS})`, async () => {
    const { storage, prior } = await savedUserSession();
    const json = JSON.stringify({ kind: 'priorscope.prior', version: 1, mean: { constant: 0 }, terms: huge() });
    const hash = await encodeShare({
      problem: 'borehole-log',
      prior: parsePriorFile('x', JSON.stringify({ kind: 'priorscope.prior', version: 1, mean: { constant: 0 }, terms: huge().slice(0, 1) }))
        .prior,
    });
    expect(hash).toMatch(/^#share=/);
    // Build the 20,000-term link by hand (the encoder's own reader would refuse it too).
    const { toBase64Url } = await import('../../../src/app/session/share.ts');
    // Every term but the first is an empty object: a reader that looked at terms before their count
    // would name terms[1] instead of the count, so the message proves the early refusal (no timing).
    const parsed = JSON.parse(json) as { terms: unknown[] };
    parsed.terms = parsed.terms.map((t, k) => (k === 0 ? t : {}));
    const raw = JSON.stringify({ problem: 'borehole-log', prior: parsed });
    const packed = new Uint8Array(
      await new Response(new Blob([enc(raw)]).stream().pipeThrough(new CompressionStream('deflate-raw'))).arrayBuffer(),
    );
    const store = await openFresh(storage, '#share=' + toBase64Url(packed));
    expect(store.getState().loadError).toBe(`shared link: terms must be at most ${MAX_TERMS} covariance terms, got 20000`);
    expect(store.getState().prior).toEqual(prior);
  });
});

describe('the term limit', () => {
  it(`files and the core refuse more than ${MAX_TERMS} terms; the Add term action stops there`, async () => {
    const text = JSON.stringify({ kind: 'priorscope.prior', version: 1, mean: { constant: 0 }, terms: huge().slice(0, MAX_TERMS + 1) });
    expect(() => parsePriorFile('p.json', text)).toThrow(
      `p.json: terms must be at most ${MAX_TERMS} covariance terms, got ${MAX_TERMS + 1}`,
    );
    const ok = parsePriorFile(
      'p.json',
      JSON.stringify({ kind: 'priorscope.prior', version: 1, mean: { constant: 0 }, terms: huge().slice(0, MAX_TERMS) }),
    ).prior;
    expect(() => validatePrior(ok, { shape: [5], spacing: [1] })).not.toThrow();
    expect(() => validatePrior({ ...ok, terms: [...ok.terms, ok.terms[0]] }, { shape: [5], spacing: [1] })).toThrow(
      /terms must be at most 16 covariance terms, got 17/,
    );
    const store = createWorkbenchStore(inProcessClient(), { demoId: 'borehole-log' });
    await store.getState().openDemo('borehole-log');
    for (let k = 0; k < MAX_TERMS + 3; k++) store.getState().addTerm();
    expect(store.getState().prior!.terms.length).toBe(MAX_TERMS);
  });
});
