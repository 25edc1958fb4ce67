/**
 * Restoring the autosaved session (src/app/session/restore.ts, start.ts): damaged records never
 * give a blank page, persistent errors or raw JavaScript messages; a link or a ?demo= address that
 * replaces the session keeps a copy; a failed link changes nothing; a pending save goes out when
 * the page is hidden. Each case below failed before the restore went through the validators.
 */
import { describe, expect, it } from 'vitest';
import { createWorkbenchStore, type WorkbenchStore } from '../../../src/app/store.ts';
import { DEFAULT_SEED } from '../../../src/app/view/slice.ts';
import { memoryStorage, SESSION_FORMAT } from '../../../src/app/session/autosave.ts';
import { installAutosave, restorePreviousSession, type sessionRecord, startSession } from '../../../src/app/session/start.ts';
import { sanitizeSavedSession, validateSavedProblem } from '../../../src/app/session/restore.ts';
import { encodeShare } from '../../../src/app/session/share.ts';
import { problemFingerprint } from '../../../src/core/io/fingerprint.ts';
import { parseProblemFile } from '../../../src/core/io/problemFile.ts';
import { demoById } from '../../../src/core/problems/demos.ts';
import { enc, fiveCells } from './fixtures.ts';
import { inProcessClient, tick } from './inProcessClient.ts';
import { KERNEL_NAMES } from '../../../src/core/kernels/spec.ts';

const prior = { mean: { constant: 0 }, terms: [{ kernel: 'exponential' as const, variance: 1, length: 5 }], nugget: 0.01 };
const record = (over: Record<string, unknown> = {}) => ({
  format: SESSION_FORMAT,
  source: { kind: 'demo', demoId: 'borehole-log' },
  prior,
  seed: 7,
  tab: 'fit',
  selectedCell: 3,
  savedAt: 1,
  ...over,
});

/** Plain messages only: nothing a JavaScript engine writes by itself. */
const RAW_JS = /Cannot (use|read)|undefined is not|is not a function|is not iterable|TypeError|RangeError/;

describe('sanitizeSavedSession: only known, well-formed keys', () => {
  const cases: [string, Record<string, unknown>, (r: NonNullable<ReturnType<typeof sanitizeSavedSession>>) => void][] = [
    ['an unknown tab', { tab: 'nonsense' }, (r) => expect(r.session.tab).toBe('posterior')],
    ['a NaN seed', { seed: Number.NaN }, (r) => expect(r.session.seed).toBe(DEFAULT_SEED)],
    ['a negative selected cell', { selectedCell: -4 }, (r) => expect(r.session.selectedCell).toBeNull()],
    [
      'junk candidates',
      { extra: { candidates: [1, 'x', { id: 'a', name: 'A', colour: '#000', prior }] } },
      (r) => expect((r.session.extra!.candidates as unknown[]).length).toBe(1),
    ],
    ['candidates that are not a list', { extra: { candidates: 'oops' } }, (r) => expect(r.session.extra!.candidates).toEqual([])],
    ['unknown keys', { extra: { prior: 'evil', notice: 'x' }, evil: true }, (r) => expect(r.session.extra).toBeUndefined()],
  ];
  it.each(cases)('%s', (_n, over, check) => {
    const r = sanitizeSavedSession(record(over));
    expect(r).not.toBeNull();
    check(r!);
    expect(Object.keys(r!.session).sort()).toEqual(expect.arrayContaining(['format', 'prior', 'seed', 'selectedCell', 'source', 'tab']));
    expect(Object.keys(r!.session)).not.toContain('evil');
  });
  it.each([
    ['another format', { format: 99 }],
    ['no source', { source: null }],
  ])('%s: not usable at all', (_n, over) => {
    expect(sanitizeSavedSession(record(over))).toBeNull();
  });
  it('a prior that is not an object keeps the problem and says the prior was damaged', () => {
    const r = sanitizeSavedSession(record({ prior: 'x' }))!;
    expect(r.session.prior).toBeUndefined();
    expect(r.notes.join(' ')).toMatch(/^the saved prior was damaged \(saved prior: prior must be an object with mean and terms, got "x"\)/);
  });
  it('seeded mutations of a good record never throw', () => {
    let s = 12345;
    const rand = () => (s = (s * 1103515245 + 12345) >>> 0) / 2 ** 32;
    const junk = [null, undefined, Number.NaN, -1, 1e308, 'x', [], {}, [1, 2], { kind: 'user' }];
    const keys = ['format', 'source', 'prior', 'seed', 'tab', 'selectedCell', 'extra', 'savedAt'];
    for (let k = 0; k < 300; k++) {
      const over: Record<string, unknown> = {};
      for (const key of keys) if (rand() < 0.3) over[key] = junk[Math.floor(rand() * junk.length)];
      expect(() => sanitizeSavedSession(record(over))).not.toThrow();
    }
  });
});

describe('validateSavedProblem: the problem-file validators', () => {
  const good = demoById('borehole-log').build().problem;
  it('a good problem comes back equal', () => {
    const p = validateSavedProblem(good);
    expect(Array.from(p.data.values)).toEqual(Array.from(good.data.values));
    expect(p.grid).toMatchObject({ shape: good.grid.shape });
    expect(p.data.geometry).toEqual(good.data.geometry);
  });
  const broken: [string, unknown, RegExp][] = [
    [
      'a short G',
      {
        ...good,
        operator: { kind: 'dense', matrix: { rows: 2, cols: good.grid.shape[0], data: new Float64Array(2 * good.grid.shape[0]) } },
      },
      /operator/,
    ],
    ['σ 0', { ...good, data: { ...good.data, sigma: new Float64Array(good.data.values.length) } }, /sigma/],
    [
      'a NaN datum',
      { ...good, data: { ...good.data, values: Float64Array.from(good.data.values, (v, i) => (i === 2 ? Number.NaN : v)) } },
      /values/,
    ],
    ['a 10⁹-cell grid', { ...good, grid: { shape: [1e9], spacing: [1] } }, /./],
    ['not an object', 'junk', /./],
  ];
  it.each(broken)('%s is refused with our message', (_n, raw, field) => {
    let message = '';
    try {
      validateSavedProblem(raw);
    } catch (e) {
      message = (e as Error).message;
    }
    expect(message).toMatch(/^The saved problem could not be restored: /);
    expect(message).toMatch(field);
    expect(message).not.toMatch(RAW_JS);
  });
});

describe('validateSavedProblem on a cell list (the user’s own mesh)', () => {
  const centres = [
    [0, 0],
    [1.5, 0.2],
    [0.4, 2.1],
    [2.2, 1.7],
  ];
  const { problem: good } = parseProblemFile(
    'mesh.json',
    JSON.stringify({
      kind: 'priorscope.problem',
      version: 1,
      cells: { centres, unit: 'm' },
      operator: { dense: [[0.5, 0.5, 0, 0]] },
      data: { values: [1], sigma: [0.1] },
    }),
  );
  it('comes back equal, centres and all', () => {
    expect(validateSavedProblem(good)).toEqual(good);
  });
  it('a damaged cell list is refused with our message, never looped over', () => {
    const g = good.grid as { x: Float64Array };
    for (const grid of [
      { ...good.grid, x: 'junk' },
      { ...good.grid, y: new Float64Array(1) },
      { ...good.grid, x: new Float64Array(0) },
      { ...good.grid, x: Float64Array.from(g.x, (v, i) => (i === 1 ? Number.NaN : v)) },
    ]) {
      expect(() => validateSavedProblem({ ...good, grid })).toThrow(/^The saved problem could not be restored: /);
    }
  });
});

async function settled(store: WorkbenchStore) {
  for (let k = 0; k < 400 && store.getState().problemStatus !== 'ready'; k++) await tick(5);
  expect(store.getState().problemStatus).toBe('ready');
}

describe('startSession with a damaged autosave', () => {
  it.each([
    ['an unknown kernel', record({ prior: { ...prior, terms: [{ kernel: 'wobbly', variance: 1, length: 2 }] } })],
    ['a NaN prior', record({ prior: { ...prior, nugget: Number.NaN } })],
    ['an unknown tab and junk candidates', record({ tab: 'zzz', extra: { candidates: [{ id: 1 }] } })],
    ['a user problem whose stored copy is damaged', record({ source: { kind: 'user', problemKey: 'k', label: 'mine' } })],
  ])('%s: the page opens on a usable problem, with our words', async (_n, rec) => {
    const storage = memoryStorage();
    await storage.put('session', rec);
    await storage.put('problem', { key: 'k', problem: { grid: { shape: [3], spacing: [0] } } });
    const store = createWorkbenchStore(inProcessClient(), { demoId: 'borehole-log' });
    await startSession(store, { storage, explicitDemo: null, hash: '' });
    await settled(store);
    const s = store.getState();
    expect(s.prior).not.toBeNull();
    // Every restored prior passed the core validator (an unknown kernel crashed the Prior panel).
    for (const t of s.prior!.terms) expect(KERNEL_NAMES).toContain(t.kernel);
    expect(Number.isFinite(s.prior!.nugget ?? 0)).toBe(true);
    expect(['fit', 'posterior']).toContain(s.tab);
    for (const text of [s.loadError, s.notice]) if (text) expect(text).not.toMatch(RAW_JS);
    expect(Array.isArray((s as unknown as { candidates: unknown[] }).candidates)).toBe(true);
  });
});

describe('nothing lost when something replaces the session', () => {
  async function savedEdit() {
    const storage = memoryStorage();
    const store = createWorkbenchStore(inProcessClient(), { demoId: 'borehole-log' });
    await store.getState().openDemo('borehole-log');
    await settled(store);
    installAutosave(store, storage, 0);
    store.getState().updateTerm(0, { length: 0.9 });
    await tick(20);
    return storage;
  }

  it('a ?demo= address keeps the earlier session, which can be put back', async () => {
    const storage = await savedEdit();
    const b = createWorkbenchStore(inProcessClient(), { demoId: 'borehole-log' });
    await startSession(b, { storage, explicitDemo: 'potential-field', hash: '' });
    expect(b.getState().previousSessionKept).toBe(true);
    await tick(400); // the new page's autosave overwrites "session"
    expect(await restorePreviousSession(storage)).toBe(true);
    const c = createWorkbenchStore(inProcessClient(), { demoId: 'borehole-log' });
    await startSession(c, { storage, explicitDemo: null, hash: '' });
    expect(c.getState().prior!.terms[0].length).toBe(0.9);
  });

  it('a link that cannot be applied changes nothing and says so', async () => {
    const storage = await savedEdit();
    // A prior shared from a user's own problem, opened where that problem is not saved.
    const hash = await encodeShare({ problem: null, prior });
    const b = createWorkbenchStore(inProcessClient(), { demoId: 'borehole-log' });
    await startSession(b, { storage, explicitDemo: null, hash });
    expect(b.getState().prior!.terms[0].length).toBe(0.9);
    expect(b.getState().loadError).toMatch(/^The shared link could not be opened: /);
    expect(b.getState().notice).toBeNull();
  });

  it('a pending save goes out at once when the page is hidden', async () => {
    const storage = memoryStorage();
    const store = createWorkbenchStore(inProcessClient(), { demoId: 'borehole-log' });
    await store.getState().openDemo('borehole-log');
    await settled(store);
    const handlers: Record<string, () => void> = {};
    installAutosave(store, storage, 60_000, { addEventListener: (type: string, h: () => void) => (handlers[type] = h) } as never);
    await tick(5);
    store.getState().updateTerm(0, { length: 0.77 });
    handlers.pagehide!();
    await tick(5);
    const saved = (await storage.get<ReturnType<typeof sessionRecord>>('session'))!;
    expect(saved.prior.terms[0].length).toBe(0.77);
  });
});

describe('a link made on a loaded problem', () => {
  const pieces = () => fiveCells('value,sigma\n1.5,0.1\n2,0.1\n3,0.2\n');
  it('names the problem it was made for when that problem is not open, and applies itself once it is loaded', async () => {
    // The sender: the problem loaded from files, a prior of their own, the link.
    const sender = createWorkbenchStore(inProcessClient(), { demoId: 'borehole-log' });
    await sender.getState().openDemo('borehole-log');
    expect(await sender.getState().loadPieces(pieces())).toBe(true);
    await settled(sender);
    const sent = { mean: { constant: 0.5 }, terms: [{ kernel: 'gaussian' as const, variance: 0.3, length: 1.5 }], nugget: 0.01 };
    const fingerprint = problemFingerprint(sender.getState().userProblem!.problem);
    expect(fingerprint).toMatch(/^[0-9a-f]{16}$/);
    const hash = await encodeShare({ problem: null, prior: sent, madeFor: { title: 'Five cells', fingerprint } });

    // The receiver: a fresh browser on the demo. Nothing is changed; the message says what is missing.
    const storage = memoryStorage();
    const receiver = createWorkbenchStore(inProcessClient(), { demoId: 'borehole-log' });
    await startSession(receiver, { storage, explicitDemo: null, hash });
    await settled(receiver);
    expect(receiver.getState().loadError).toMatch(
      /made for the problem titled "Five cells" \(fingerprint [0-9a-f]{16}\).*load that problem/,
    );
    expect(receiver.getState().prior).not.toEqual(sent);
    // Loading another problem does not apply it; loading that problem does.
    expect(
      await receiver.getState().loadPieces({ ...pieces(), data: { name: 'd.csv', bytes: enc('value,sigma\n1,0.1\n2,0.1\n3,0.2\n') } }),
    ).toBe(true);
    expect(receiver.getState().prior).not.toEqual(sent);
    expect(await receiver.getState().loadPieces(pieces())).toBe(true);
    await tick(5);
    expect(receiver.getState().prior).toEqual(sent);
    expect(receiver.getState().notice).toMatch(/Applied the prior from the shared link/);
  });
});
