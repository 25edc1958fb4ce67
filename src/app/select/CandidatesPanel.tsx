/** Pinned candidate priors compared side by side: bands or paired maps, scores, realisations, cross-calibration. */
import { useGridView } from '../gridView.ts';
import { useEffect, useMemo, useState } from 'react';
import { useWb } from '../context.ts';
import { Plot } from '../Plot.tsx';
import { NumberField } from '../controls.tsx';
import { axis1D, gridDimension, rowOf } from '../traces.ts';
import type { GridView } from '../gridView.ts';
import { bestRow, fmt, SCORE_COLUMNS, scoreRows } from './candidates.ts';
import { Num, TaskStatusLine } from './common.tsx';
import { candidatesKey, type Candidate } from './slice.ts';
import {
  candidateBandTraces,
  candidateDrawTraces,
  candidateLineLayout,
  candidateMapLayout,
  candidateMapTrace,
  candidateTruthTrace,
} from './traces.ts';
import { evidenceReadings, priorLine } from './evidenceScale.ts';
import type { CandidateScores } from '../../worker/tuningProtocol.ts';
import { axisLabel, withUnit } from '../labels.ts';
import { candidateRanges, DIVERGING, SEQUENTIAL } from '../colourScales.ts';
import { useColourLimits } from '../overview/colourLimits.ts';

export function CandidatesPanel() {
  const p = useGridView()!;
  const candidates = useWb((s) => s.candidates);
  const key = useWb(candidatesKey);
  const refresh = useWb((s) => s.refreshCandidates);
  const task = useWb((s) => s.selectTasks.candidates);
  const cross = useWb((s) => s.selectTasks.crossCalibration);
  const [unpin, rename, use] = [useWb((s) => s.unpin), useWb((s) => s.renameCandidate), useWb((s) => s.useCandidate)];
  useEffect(() => refresh(), [key, refresh]);
  const scores = task.key === key ? task.value : null;
  const crossValue = cross.value && cross.key?.startsWith(`${key}:`) ? cross.value : null;
  const rows = useMemo(() => scoreRows(candidates, scores, crossValue), [candidates, scores, crossValue]);
  const evidence = useMemo(
    () =>
      evidenceReadings(
        candidates.map((c, k) => ({ prior: c.prior, logEvidence: scores?.[k]?.ok ? scores[k].logEvidence : null })),
        p.grid,
      ),
    [candidates, scores, p.grid],
  );
  if (candidates.length === 0) {
    return (
      <section className="sel-card">
        <h3>Candidates</h3>
        <p className="note" data-testid="candidates-empty">
          Nothing pinned yet. Use “Pin current prior” above to keep up to four priors and compare them here.
        </p>
      </section>
    );
  }
  return (
    <section className="sel-card" aria-labelledby="sel-cand-h">
      <h3 id="sel-cand-h">Candidates</h3>
      <TaskStatusLine kind="candidates" task={task} label="Scoring candidates" />
      <table className="sel-table" data-testid="scores-table">
        <thead>
          <tr>
            <th>candidate</th>
            {SCORE_COLUMNS.map((c) => (
              <th key={c.id} title={`${c.tip}${c.better ? ` (${c.better} is better)` : ''}`}>
                {c.label}
              </th>
            ))}
            <th title="Against the candidate of highest log evidence: 2 ln B with B the ratio of evidences, read on the scale of Kass & Raftery (1995, J. Am. Stat. Assoc. 90:773)">
              evidence against the best
            </th>
            <th />
          </tr>
        </thead>
        <tbody>
          {rows.map((r, k) => (
            <tr key={r.id} data-testid={`candidate-row-${k}`}>
              <td>
                <span className="swatch" style={{ background: r.colour }} aria-hidden="true" />
                <input
                  className="cand-name"
                  aria-label={`name of candidate ${k + 1}`}
                  data-testid={`candidate-name-${k}`}
                  defaultValue={r.name}
                  onBlur={(e) => rename(r.id, e.target.value)}
                />
                <div className="note cand-prior" data-testid={`candidate-prior-${k}`}>
                  {priorLine(candidates[k].prior, p.grid.unit ?? '', p.quantity.unit)}
                </div>
                {r.error && (
                  <span className="error" role="alert">
                    {r.error}
                  </span>
                )}
              </td>
              {r.cells.map((c) => {
                const col = SCORE_COLUMNS.find((x) => x.id === c.column)!;
                const best = bestRow(rows, col) === k;
                return (
                  <td key={c.column} className={best ? 'best' : undefined} title={best ? 'best of the pinned candidates' : undefined}>
                    <Num testId={`score-${k}-${c.column}`} value={c.value} text={c.text} />
                  </td>
                );
              })}
              <td data-testid={`candidate-kr-${k}`}>{evidence.readings[k]?.text ?? '—'}</td>
              <td>
                <button
                  type="button"
                  data-testid={`candidate-use-${k}`}
                  onClick={() => use(r.id)}
                  title="Make this candidate the current prior"
                >
                  Use this one
                </button>{' '}
                <button type="button" data-testid={`candidate-remove-${k}`} onClick={() => unpin(r.id)} aria-label={`Remove ${r.name}`}>
                  Remove
                </button>
              </td>
            </tr>
          ))}
        </tbody>
      </table>
      {evidence.caution && (
        <p className="note caution-note" data-testid="parameter-count-caution">
          {evidence.caution}
        </p>
      )}
      {scores && <Comparison p={p} candidates={candidates} scores={scores} />}
      <CrossTable candidates={candidates} />
    </section>
  );
}

function Comparison({ p, candidates, scores }: { p: GridView; candidates: readonly Candidate[]; scores: readonly CandidateScores[] }) {
  const is2D = gridDimension(p.grid) === 2;
  const ok = useMemo(
    () =>
      candidates
        .map((c, k) => ({ c, s: scores[k] }))
        .filter((x): x is { c: Candidate; s: Extract<CandidateScores, { ok: true }> } => !!x.s && x.s.ok),
    [candidates, scores],
  );
  const bands = useMemo(() => {
    if (is2D) return null;
    const x = axis1D(p.grid);
    const traces = candidateBandTraces(
      x,
      ok.map(({ c, s }) => ({ name: c.name, colour: c.colour, mean: s.mean, std: s.std })),
    );
    if (p.truth) traces.push(candidateTruthTrace(x, p.truth));
    return traces;
  }, [p, ok, is2D]);
  const draws = useMemo(() => {
    if (is2D) return null;
    return candidateDrawTraces(
      axis1D(p.grid),
      ok.map(({ c, s }) => ({ id: c.id, name: c.name, colour: c.colour, draws: s.draws })),
    );
  }, [p, ok, is2D]);
  const xTitle = axisLabel(p.grid, 0);
  const q = withUnit(p.quantity.name, p.quantity.unit);
  const limits = useColourLimits();
  const ranges = useMemo(
    () =>
      candidateRanges(
        ok.map(({ c, s }) => ({ prior: c.prior, signed: [s.mean, rowOf(s.draws.data, s.draws.cols, 0)], std: s.std })),
        limits,
      ),
    [ok, limits.half],
  );
  if (!is2D) {
    return (
      <div className="grid-2">
        <Plot
          id="plot-candidate-bands"
          label="Posterior mean and 95% band of each candidate"
          data={bands!}
          layout={candidateLineLayout('Posterior mean and 95% band per candidate', xTitle, q)}
          height={300}
        />
        <Plot
          id="plot-candidate-draws"
          label="Posterior realisations of each candidate"
          data={draws!}
          layout={candidateLineLayout('Posterior realisations per candidate (same seed)', xTitle, q)}
          height={300}
        />
      </div>
    );
  }
  return (
    <div className="sel-maps">
      {ok.map(({ c, s }) => (
        <div key={c.id} className="grid-3" style={{ borderLeft: `4px solid ${c.colour}` }}>
          <Plot
            id={`plot-cand-mean-${c.id}`}
            label={`${c.name}: posterior mean`}
            data={[candidateMapTrace(p.grid, s.mean, 'mean', DIVERGING, ranges.signed)]}
            layout={candidateMapLayout(p.grid, withUnit(`${c.name}: posterior mean`, p.quantity.unit))}
            height={220}
          />
          <Plot
            id={`plot-cand-std-${c.id}`}
            label={`${c.name}: posterior standard deviation`}
            data={[candidateMapTrace(p.grid, s.std, 'std', SEQUENTIAL, ranges.std)]}
            layout={candidateMapLayout(p.grid, withUnit(`${c.name}: posterior std`, p.quantity.unit))}
            height={220}
          />
          <Plot
            id={`plot-cand-draw-${c.id}`}
            label={`${c.name}: a posterior realisation`}
            data={[candidateMapTrace(p.grid, rowOf(s.draws.data, s.draws.cols, 0), 'draw 1', DIVERGING, ranges.signed)]}
            layout={candidateMapLayout(p.grid, `${c.name}: posterior realisation 1`)}
            height={220}
          />
        </div>
      ))}
    </div>
  );
}

function CrossTable({ candidates }: { candidates: readonly Candidate[] }) {
  const key = useWb(candidatesKey);
  const task = useWb((s) => s.selectTasks.crossCalibration);
  const run = useWb((s) => s.runCrossCalibration);
  const [replicates, setReplicates] = useState(10);
  const v = task.value && task.key?.startsWith(`${key}:`) ? task.value : null;
  const K = candidates.length;
  return (
    <div className="sel-sub">
      <h4>Cross-calibration: truth from one candidate, inverted with another</h4>
      <div className="row toolbar">
        <NumberField
          label="replicates"
          value={replicates}
          unit=""
          tip="(truth, data) pairs per table cell; all cells share the same random numbers"
          testId="cross-replicates"
          validate={(x) => (Number.isInteger(x) && x >= 1 && x <= 500 ? null : 'replicates must be an integer from 1 to 500')}
          onCommit={setReplicates}
        />
        <button type="button" data-testid="cross-run" onClick={() => run(replicates, 19)} disabled={task.status === 'running'}>
          Compute cross-table
        </button>
        <TaskStatusLine kind="crossCalibration" task={task} label="Cross-calibration" />
      </div>
      {v && v.size === K && (
        <table className="sel-table cross" data-testid="cross-table">
          <thead>
            <tr>
              <th>truth from ↓ / inverted with →</th>
              {candidates.map((c) => (
                <th key={c.id}>
                  <span className="swatch" style={{ background: c.colour }} aria-hidden="true" />
                  {c.name}
                </th>
              ))}
            </tr>
          </thead>
          <tbody>
            {candidates.map((a, i) => (
              <tr key={a.id}>
                <th>
                  <span className="swatch" style={{ background: a.colour }} aria-hidden="true" />
                  {a.name}
                </th>
                {candidates.map((b, j) => (
                  <td key={b.id} className={i === j ? 'diag' : undefined}>
                    <Num
                      testId={`cross-${i}-${j}`}
                      value={v.coverage95[i * K + j]}
                      text={`${fmt(v.coverage68[i * K + j], 3)} / ${fmt(v.coverage95[i * K + j], 3)}`}
                    />
                  </td>
                ))}
              </tr>
            ))}
          </tbody>
          <caption className="note">
            Coverage of the 68% / 95% bands (nominal 0.683 / 0.95); {v.replicates} replicates per cell
            {v.cancelled ? ', cancelled early' : ''}.
          </caption>
        </table>
      )}
    </div>
  );
}
