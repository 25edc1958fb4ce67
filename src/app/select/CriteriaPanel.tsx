/** The closed-form criteria of the current prior side by side, and calibration on demand. */
import { useEffect, useMemo, useState } from 'react';
import { useWb } from '../context.ts';
import { Plot } from '../Plot.tsx';
import { NumberField } from '../controls.tsx';
import { BAND_LEVELS, CRITERIA_DIFFER_EXPLANATION, DISCREPANCY_FORM_WORDS, type DiscrepancyResult } from '../../core/tuning/index.ts';
import type { PriorSpec } from '../../core/prior/spec.ts';
import { fmt } from './candidates.ts';
import { Num, TaskStatusLine } from './common.tsx';
import { looTraces, rankTraces } from './traces.ts';
import { priorKey } from './slice.ts';

export function CriteriaPanel() {
  const key = useWb(priorKey);
  const refresh = useWb((s) => s.refreshCriteria);
  const task = useWb((s) => s.selectTasks.criteria);
  const apply = useWb((s) => s.applyTuned);
  useEffect(() => refresh(), [key, refresh]);
  const c = task.key === key ? task.value : null;
  const loo = useMemo(() => (c ? looTraces(c.leaveOneOut.contributions) : []), [c]);
  const looLayout = useMemo(
    () => ({
      title: { text: 'Leave-one-out: log predictive density of each datum given the others', font: { size: 12 } },
      xaxis: { title: { text: 'datum number' } },
      yaxis: { title: { text: 'log p(dᵢ | d₋ᵢ)' } },
      showlegend: false,
    }),
    [],
  );
  return (
    <section className="sel-card" aria-labelledby="sel-crit-h">
      <h3 id="sel-crit-h">Criteria for the current prior</h3>
      <TaskStatusLine kind="criteria" task={task} label="Criteria" />
      {c && (
        <>
          <table className="sel-table" data-testid="criteria-table">
            <thead>
              <tr>
                <th>criterion</th>
                <th>value</th>
                <th>what it suggests</th>
              </tr>
            </thead>
            <tbody>
              <tr>
                <td title="log N(d; G m0, G Cm Gᵀ + Cd)">log evidence</td>
                <td>
                  <Num testId="crit-logev" value={c.logEvidence} text={c.logEvidence.toFixed(3)} />
                </td>
                <td>Higher is better; compare between priors (the evidence map and the fit search for its maximum).</td>
              </tr>
              <tr>
                <td title="Σᵢ log p(dᵢ | d₋ᵢ), closed form">leave-one-out log score</td>
                <td>
                  <Num testId="crit-loo" value={c.leaveOneOut.logScore} text={c.leaveOneOut.logScore.toFixed(3)} />
                </td>
                <td>Higher is better; the bars below show which data are predicted poorly.</td>
              </tr>
              <DiscrepancyRow d={c.discrepancy} apply={apply} />
              <DiscrepancyRow d={c.discrepancyExpected} apply={apply} />
              <tr>
                <td title="q = (d − G m0)ᵀ K⁻¹ (d − G m0) against χ²_M">prior predictive check</td>
                <td>
                  q/M = <Num testId="crit-ppc" value={c.priorPredictive.reduced} text={fmt(c.priorPredictive.reduced)} />, p ={' '}
                  <Num testId="crit-ppc-p" value={c.priorPredictive.pTwoSided} text={fmt(c.priorPredictive.pTwoSided, 3)} />
                </td>
                <td>
                  95% range of χ²_M/M: [{fmt(c.priorPredictive.interval95[0] / c.priorPredictive.dataCount)},{' '}
                  {fmt(c.priorPredictive.interval95[1] / c.priorPredictive.dataCount)}]{' — '}
                  {c.priorPredictive.plausible
                    ? 'the data are plausible under this prior.'
                    : c.priorPredictive.pUpper < 0.5
                      ? 'the data lie too far from the prior mean for its spread.'
                      : 'the data fit suspiciously well: the prior may be far too wide or the errors overstated.'}
                </td>
              </tr>
            </tbody>
          </table>
          <p className="note" data-testid="criteria-explanation">
            Why they can differ: {CRITERIA_DIFFER_EXPLANATION}
          </p>
          <Plot id="plot-loo" label="Leave-one-out contributions per datum" data={loo} layout={looLayout} height={220} />
        </>
      )}
      <CalibrationPanel />
    </section>
  );
}

/**
 * One form of the discrepancy rule: the scale it asks for, what it targets in plain words, and the
 * scaling offered as that form's suggestion (never as "the" fix).
 */
function DiscrepancyRow({ d, apply }: { d: DiscrepancyResult; apply: (p: PriorSpec) => void }) {
  const classical = d.form === 'classical';
  const id = classical ? 'crit-discrepancy' : 'crit-discrepancy-expected';
  const name = classical ? 'discrepancy rule, classical (χ² = M)' : 'discrepancy rule, expected value (χ² = M − tr R)';
  const target = classical
    ? `χ² = M = ${d.target}`
    : `χ² = its expected value ${fmt(d.target)} (M minus the resolved parameters at that scale)`;
  return (
    <tr data-testid={`${id}-row`}>
      <td title={DISCREPANCY_FORM_WORDS[d.form]}>{name}</td>
      <td>
        {d.status === 'found' ? (
          <>
            × <Num testId={id} value={d.scale} text={fmt(d.scale)} />
          </>
        ) : (
          <span data-testid={id}>{d.status === 'mean-fits' ? 'not needed' : 'unreachable'}</span>
        )}
      </td>
      <td>
        {d.status === 'found' ? (
          <>
            Targets {target}: multiplying every variance and the nugget by {fmt(d.scale)} gets there.{' '}
            {classical
              ? 'With a correct prior this rule asks for a stiffer prior, because the posterior mean also fits part of the noise.'
              : 'A correct prior meets this target on average, but one data set gives a noisy scale.'}{' '}
            <button
              type="button"
              data-testid={classical ? 'discrepancy-apply' : 'discrepancy-expected-apply'}
              onClick={() => d.prior && apply(d.prior)}
            >
              Apply this scaling
            </button>
          </>
        ) : d.status === 'mean-fits' ? (
          `The prior mean alone fits the data to χ² = ${fmt(d.chi2)}: no scaling reaches ${classical ? 'χ² = M' : 'the expected value'}.`
        ) : (
          `Even an unbounded variance leaves χ² = ${fmt(d.chi2)} above ${classical ? 'M' : 'its expected value'}: part of the data cannot be fitted by this prior.`
        )}
      </td>
    </tr>
  );
}

function CalibrationPanel() {
  const key = useWb(priorKey);
  const task = useWb((s) => s.selectTasks.calibration);
  const run = useWb((s) => s.runCalibration);
  const [replicates, setReplicates] = useState(20);
  const [draws, setDraws] = useState(19);
  const v = task.value && task.key?.startsWith(`${key}:`) ? task.value : null;
  const hist = useMemo(() => (v ? rankTraces(v.rankHistogram) : []), [v]);
  const layout = useMemo(
    () => ({
      title: { text: 'Rank of the truth among posterior draws (flat when calibrated)', font: { size: 12 } },
      xaxis: { title: { text: 'rank' } },
      yaxis: { title: { text: 'count (cells × replicates)' } },
      showlegend: false,
    }),
    [],
  );
  /** Mean ± 1.96 standard errors of the per-replicate coverages (replicates are independent). */
  const spread = (x: Float64Array): [number, number] => {
    const n = x.length;
    const m = x.reduce((a, b) => a + b, 0) / n;
    const sd = n > 1 ? Math.sqrt(x.reduce((a, b) => a + (b - m) ** 2, 0) / (n - 1)) : Number.NaN;
    return [m - (1.96 * sd) / Math.sqrt(n), m + (1.96 * sd) / Math.sqrt(n)];
  };
  return (
    <div className="sel-sub">
      <h4>Calibration</h4>
      <p className="note">
        Draw truths from the current prior, simulate data with the problem's errors, invert with the same prior, count how often the truth
        lies inside the bands.
      </p>
      <div className="row toolbar">
        <NumberField
          label="replicates"
          value={replicates}
          unit=""
          tip="independent (truth, data) pairs"
          testId="cal-replicates"
          validate={(x) => (Number.isInteger(x) && x >= 2 && x <= 2000 ? null : 'replicates must be an integer from 2 to 2000')}
          onCommit={setReplicates}
        />
        <NumberField
          label="draws"
          value={draws}
          unit=""
          tip="posterior draws per replicate (rank bins = draws + 1)"
          testId="cal-draws"
          validate={(x) => (Number.isInteger(x) && x >= 1 && x <= 99 ? null : 'draws must be an integer from 1 to 99')}
          onCommit={setDraws}
        />
        <button type="button" data-testid="calibration-run" onClick={() => run(replicates, draws)} disabled={task.status === 'running'}>
          Run calibration
        </button>
        <TaskStatusLine kind="calibration" task={task} label="Calibration" />
      </div>
      {v && v.replicates > 0 && (
        <>
          <table className="sel-table" data-testid="calibration-table">
            <thead>
              <tr>
                <th>band</th>
                <th>nominal</th>
                <th>coverage</th>
                <th title="mean ± 1.96 standard errors over independent replicates">spread over replicates</th>
              </tr>
            </thead>
            <tbody>
              {(
                [
                  ['68% (±1σ)', BAND_LEVELS.inner.nominal, v.coverage68, v.replicateCoverage68, 'cal-cov68'],
                  ['95% (±1.96σ)', BAND_LEVELS.outer.nominal, v.coverage95, v.replicateCoverage95, 'cal-cov95'],
                ] as const
              ).map(([label, nominal, cov, per, id]) => {
                const [lo, hi] = spread(per);
                return (
                  <tr key={id}>
                    <td>{label}</td>
                    <td>{fmt(nominal, 4)}</td>
                    <td>
                      <Num testId={id} value={cov} text={fmt(cov, 4)} />
                    </td>
                    <td>
                      [{fmt(lo, 3)}, {fmt(hi, 3)}]{' '}
                      {nominal >= lo && nominal <= hi
                        ? '(contains the nominal value)'
                        : '(nominal value outside; with few replicates this happens 1 time in 20 by chance)'}
                    </td>
                  </tr>
                );
              })}
            </tbody>
          </table>
          <p className="note">
            {v.replicates} replicates × {v.draws} draws{v.cancelled ? ' (cancelled early)' : ''}.
          </p>
          <Plot id="plot-rank-histogram" label="Rank histogram" data={hist} layout={layout} height={220} />
        </>
      )}
    </div>
  );
}
