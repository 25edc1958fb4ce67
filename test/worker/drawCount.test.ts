/** The number of realisations one request may ask for: as many as the export wants, up to 2²⁴ numbers in all. */
import { describe, expect, it } from 'vitest';
import { Engine, MAX_DRAW_NUMBERS } from '../../src/worker/engine.ts';
import { priorRealisations } from '../../src/core/sampling/realisations.ts';
import { PRIOR, profileProblem, sameBits } from './problems.ts';

describe('Engine: realisations for the export', () => {
  it('returns 200 prior draws (draws × cells), the same numbers as the core for that seed', async () => {
    const engine = new Engine();
    const problem = profileProblem(100, 'diagonal');
    await engine.handle({ id: 1, kind: 'setProblem', version: 1, problem });
    const d = await engine.handle({ id: 2, kind: 'priorDraws', problemVersion: 1, prior: PRIOR, count: 200, seed: 5 }, () => {});
    expect([d.rows, d.cols]).toEqual([200, 100]);
    expect(sameBits(d.data, priorRealisations(problem.grid, PRIOR, 200, 5).data)).toBe(true);
  });

  it('refuses more than 2²⁴ numbers, naming the most this grid allows and the command line for more', async () => {
    const engine = new Engine();
    await engine.handle({ id: 1, kind: 'setProblem', version: 1, problem: profileProblem(160, 'diagonal') });
    const most = Math.floor(MAX_DRAW_NUMBERS / 160);
    await expect(engine.handle({ id: 2, kind: 'priorDraws', problemVersion: 1, prior: PRIOR, count: 10_001, seed: 5 }, () => {})).rejects.toThrow(
      `an integer from 1 to ${Math.min(10_000, most)} on this grid of 160 cells`,
    );
    await expect(engine.handle({ id: 3, kind: 'posteriorDraws', problemVersion: 1, prior: PRIOR, count: 0, seed: 5 }, () => {})).rejects.toThrow('priorscope sample');
  });
});
