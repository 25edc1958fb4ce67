/**
 * A loaded problem starts from the prior of src/core/tuning/startPrior.ts (not mean 0, variance 1),
 * says how it was made, and "+ Add term" adds a term on the same scale. Real store, real worker
 * Engine in-process.
 */
import { describe, expect, it } from 'vitest';
import { createWorkbenchStore } from '../../src/app/store.ts';
import { startPriorRule } from '../../src/core/tuning/startPrior.ts';
import { assembleProblem } from '../../src/core/io/pieces.ts';
import { inProcessClient, tick } from './session/inProcessClient.ts';

const enc = (s: string) => new TextEncoder().encode(s);
// Invented travel-time-like data: 4 averages over 6 cells, values around 0.03 s/km·km = 30 ms, σ 0.5 ms.
const G = '%%MatrixMarket matrix coordinate real general\n4 6 8\n1 1 0.5\n1 2 0.5\n2 2 0.5\n2 3 0.5\n3 4 0.5\n3 5 0.5\n4 5 0.5\n4 6 0.5\n';
const pieces = () => ({
  grid: { shape: [6], spacing: [1], unit: 'km' },
  operator: { name: 'G.mtx', bytes: enc(G) },
  data: { name: 'd.csv', bytes: enc('value,sigma\n0.031,0.0005\n0.029,0.0005\n0.036,0.0005\n0.027,0.0005\n') },
  title: 'Travel times',
});

describe('a loaded problem starts from a prior fitted to its data', () => {
  it('uses the rule, states it, adds terms on its scale, and Reset returns to it', async () => {
    const client = inProcessClient();
    const store = createWorkbenchStore(client, { demoId: 'borehole-log' });
    await store.getState().openDemo('borehole-log');
    expect(await store.getState().loadPieces(pieces())).toBe(true);
    for (let k = 0; k < 200 && store.getState().problemStatus !== 'ready'; k++) await tick(5);
    const s = store.getState();
    const expected = startPriorRule(assembleProblem(pieces())).prior;
    expect(s.prior).toEqual(expected);
    expect(s.prior!.terms[0].variance).toBeLessThan(1e-3); // not the generic variance 1
    expect((s.prior!.mean as { constant: number }).constant).toBeGreaterThan(0.01);
    expect(s.problem!.startRule).toMatch(/generalised least squares through G/);

    s.updateTerm(0, { variance: 0.002 });
    store.getState().addTerm();
    const terms = store.getState().prior!.terms;
    expect(terms).toHaveLength(2);
    expect(terms[1].variance).toBe(0.002);

    store.getState().resetPrior();
    expect(store.getState().prior).toEqual(expected);
  });
});
