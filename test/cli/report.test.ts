/**
 * `priorscope report`: the defence document as one self-contained HTML file, with every section of
 * the report, computed from problem and prior files (in process through runCommand).
 */
import { readFileSync } from 'node:fs';
import { join } from 'node:path';
import { describe, expect, it } from 'vitest';
import { runCommand, tempDir, writeFiles } from './run.ts';

const n = 24;
const m = 10;
const G = Array.from({ length: m }, (_, i) => Array.from({ length: n }, (_, j) => (Math.abs(j - 2 * i - 2) <= 1 ? 1 / 3 : 0)));
const d = Array.from({ length: m }, (_, i) => 0.2 * Math.sin(i / 2));
const problem = {
  kind: 'priorscope.problem',
  version: 1,
  title: 'Bench <b>profile</b> & co',
  grid: { shape: [n], spacing: [2], unit: 'm', axes: ['depth'] },
  quantity: { name: 'temperature', unit: '°C' },
  operator: { dense: G },
  data: { values: d, sigma: new Array(m).fill(0.05), unit: '°C' },
};
const prior = {
  kind: 'priorscope.prior',
  version: 1,
  mean: { constant: 0 },
  terms: [{ kernel: 'exponential', variance: 0.1, length: 8 }],
  nugget: 1e-4,
};
const other = {
  kind: 'priorscope.prior',
  version: 1,
  mean: { constant: 0 },
  terms: [{ kernel: 'matern', nu: 1.5, variance: 0.1, lengths: [8, 8], angle: 0 }],
  nugget: 1e-4,
};

describe('priorscope report', () => {
  it('writes one HTML file with every section, no scripts and no outside references; JSON names the sections', async () => {
    const dir = tempDir();
    writeFiles(dir, {
      'p.json': problem,
      'q.json': prior,
      'q2.json': { ...prior, terms: [{ kernel: 'gaussian', variance: 0.1, length: 4 }] },
    });
    const r = await runCommand(
      ['report', '--problem', 'p.json', '--prior', 'q.json', '--out', 'r.html', '--compare', 'q2.json', '--map-count', '5'],
      dir,
    );
    expect(r.err).toBe('');
    expect(r.code).toBe(0);
    const out = JSON.parse(r.out) as { sections: string[]; bytes: number; averaged: { cellsUsed: number; maxMeanChange: number } };
    expect(out.sections).toEqual([
      'problem',
      'prior',
      'pd',
      'realisations',
      'posterior',
      'fit',
      'evidence',
      'candidates',
      'criteria',
      'averaged',
    ]);
    expect(out.averaged.cellsUsed).toBeGreaterThan(0);
    expect(Number.isFinite(out.averaged.maxMeanChange)).toBe(true);
    const html = readFileSync(join(dir, 'r.html'), 'utf8');
    expect(html.length).toBe(out.bytes - (new TextEncoder().encode(html).length - html.length));
    expect(html).not.toMatch(/<script|https?:\/\/(?!www\.w3\.org\/2000\/svg)/);
    expect(html).toContain('http-equiv="Content-Security-Policy" content="default-src &#39;none&#39;');
    // the file's title is text, not markup
    expect(html).toContain('<h1>Bench &lt;b&gt;profile&lt;/b&gt; &amp; co</h1>');
    // figures: coverage, realisations, posterior, data fit, evidence map, averaged
    expect((html.match(/<svg /g) ?? []).length).toBe(6);
    expect(html).toContain('Kass &amp; Raftery');
    expect(html).toContain('qualified professional');
    expect(html).toMatch(/proven/);
  });

  it('says when candidates differ in their number of hyperparameters', async () => {
    const dir = tempDir();
    writeFiles(dir, {
      'p.json': { ...problem, grid: { shape: [6, 4], spacing: [2, 2], unit: 'm' }, operator: { dense: G.map((row) => row.slice(0, 24)) } },
      'q.json': prior,
      'q2.json': other,
    });
    const r = await runCommand(
      [
        'report',
        '--problem',
        'p.json',
        '--prior',
        'q.json',
        '--out',
        'r.html',
        '--compare',
        'q2.json',
        '--map-count',
        '3',
        '--hyper-prior',
        'uniform',
      ],
      dir,
    );
    expect(r.code).toBe(0);
    const html = readFileSync(join(dir, 'r.html'), 'utf8');
    expect(html).toContain('different numbers of hyperparameters (4, 7)');
    expect(html).toContain('uniform in length and variance');
  });

  it('refuses an unknown hyper-prior with exit code 2, naming the option', async () => {
    const dir = tempDir();
    writeFiles(dir, { 'p.json': problem, 'q.json': prior });
    const r = await runCommand(['report', '--problem', 'p.json', '--prior', 'q.json', '--out', 'r.html', '--hyper-prior', 'flat'], dir);
    expect(r.code).toBe(2);
    expect(r.err).toContain('--hyper-prior');
  });
});
