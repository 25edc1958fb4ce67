import { describe, expect, it } from 'vitest';
import { changedPaths, COALESCE_MS, emptyHistory, HISTORY_LIMIT, record, redo, undo } from '../../../src/app/session/history.ts';
import type { PriorSpec } from '../../../src/core/prior/spec.ts';

const prior = (length: number, variance = 1): PriorSpec => ({
  mean: { constant: 0 },
  terms: [{ kernel: 'exponential', variance, length }],
  nugget: 0,
});

describe('changedPaths', () => {
  it.each([
    [prior(1), prior(1), []],
    [prior(1), prior(2), ['terms.0.length']],
    [prior(1), prior(2, 3), ['terms.0.length', 'terms.0.variance']],
    [prior(1), { ...prior(1), nugget: 0.1 }, ['nugget']],
    [prior(1), { ...prior(1), terms: [] }, ['terms.0']],
  ])('%#', (a, b, paths) => {
    expect(changedPaths(a, b)).toEqual(paths);
  });
});

describe('undo history', () => {
  it('undoes and redoes typed edits one by one, even when they come fast', () => {
    let h = emptyHistory;
    const p = [prior(1), prior(2), prior(3)];
    h = record(h, p[0], p[1], 0);
    h = record(h, p[1], p[2], 10); // 10 ms later, same field: still its own step
    const u1 = undo(h, p[2])!;
    expect(u1.prior).toEqual(p[1]);
    const u2 = undo(u1.history, u1.prior)!;
    expect(u2.prior).toEqual(p[0]);
    expect(undo(u2.history, u2.prior)).toBeNull();
    const r1 = redo(u2.history, u2.prior)!;
    expect(r1.prior).toEqual(p[1]);
    const r2 = redo(r1.history, r1.prior)!;
    expect(r2.prior).toEqual(p[2]);
    expect(redo(r2.history, r2.prior)).toBeNull();
  });

  it('coalesces a slider gesture on one field into one step, split by a pause or another field', () => {
    let h = emptyHistory;
    let cur = prior(1);
    for (let k = 1; k <= 20; k++) {
      const next = prior(1 + k / 10);
      h = record(h, cur, next, k * 30, true);
      cur = next;
    }
    expect(h.past).toEqual([prior(1)]);
    // a pause longer than the coalescing window starts a new step
    const later = prior(5);
    h = record(h, cur, later, 20 * 30 + COALESCE_MS + 1, true);
    expect(h.past).toEqual([prior(1), cur]);
    // another field right away is a new step too
    h = record(h, later, prior(5, 2), 20 * 30 + COALESCE_MS + 2, true);
    expect(h.past.length).toBe(3);
  });

  it('a new edit clears the redo list; no-op edits are not recorded; the list is bounded', () => {
    let h = record(emptyHistory, prior(1), prior(2), 0);
    const u = undo(h, prior(2))!;
    h = record(u.history, prior(1), prior(9), 5000);
    expect(h.future).toEqual([]);
    expect(record(h, prior(9), prior(9), 6000)).toBe(h);
    let g = emptyHistory;
    for (let k = 0; k < HISTORY_LIMIT + 10; k++) g = record(g, prior(k + 1), prior(k + 2), k * 10_000);
    expect(g.past.length).toBe(HISTORY_LIMIT);
    expect(g.past[0]).toEqual(prior(11));
  });
});
