/**
 * The hyperparameter-averaged posterior beside the current prior's: the posterior averaged over the
 * last evidence map's cells, weighted by evidence × a stated hyper-prior (src/core/tuning/averaged.ts),
 * so one sees how much the result depends on the length and variance chosen.
 */
import { useGridView } from '../gridView.ts';
import { useMemo, useState } from 'react';
import { useWb } from '../context.ts';
import { Plot } from '../Plot.tsx';
import { axis1D, gridDimension } from '../traces.ts';
import { axisLabel, withUnit } from '../labels.ts';
import { hyperPriorWords, HYPER_PRIORS, type HyperPrior } from '../../core/tuning/averaged.ts';
import { mapLayout } from '../overview/traces.ts';
import { averagedChange, averagedMaps, averagedTraces1D } from './averagedTraces.ts';
import { fmt } from './candidates.ts';
import { Num, TaskStatusLine } from './common.tsx';

export function AveragedPanel() {
  const p = useGridView();
  const mapTask = useWb((s) => s.selectTasks.evidenceMap);
  const task = useWb((s) => s.selectTasks.averaged);
  const post = useWb((s) => s.posterior);
  const run = useWb((s) => s.runAveraged);
  const [hyper, setHyper] = useState<HyperPrior>('log-uniform');
  const value = task.value && mapTask.key && task.key?.startsWith(`${mapTask.key}:`) ? task.value : null;
  const is2D = p ? gridDimension(p.grid) === 2 : false;
  const figures = useMemo(() => {
    if (!p || !post || !value) return null;
    const chosen = { mean: post.summary.mean, std: post.summary.std };
    if (!is2D) return { line: averagedTraces1D(axis1D(p.grid), chosen, value), maps: null, change: averagedChange(chosen, value) };
    return {
      line: null,
      maps: averagedMaps(p.grid, p.quantity.unit, post.priorMean, chosen, value),
      change: averagedChange(chosen, value),
    };
  }, [p, post, value, is2D]);
  if (!p) return null;
  const q = withUnit(p.quantity.name, p.quantity.unit);
  return (
    <section className="sel-card" aria-labelledby="sel-avg-h" data-testid="averaged-panel">
      <h3 id="sel-avg-h">Averaged over the evidence map</h3>
      <p className="note">
        The posterior averaged over the map’s cells, each weighted by its evidence × the hyper-prior; variance = mean of the cells’
        variances + variance of their means. Beside it, the posterior of the prior on screen: where they differ, the result depends on the
        length and variance chosen.
      </p>
      <div className="row toolbar">
        <label className="inline">
          Hyper-prior{' '}
          <select
            data-testid="averaged-hyper"
            value={hyper}
            onChange={(e) => setHyper(e.target.value as HyperPrior)}
            title={hyperPriorWords(hyper)}
          >
            {HYPER_PRIORS.map((h) => (
              <option key={h} value={h}>
                {h}
              </option>
            ))}
          </select>
        </label>
        <button
          type="button"
          data-testid="averaged-run"
          disabled={!mapTask.value || task.status === 'running'}
          onClick={() => run(hyper)}
          title={mapTask.value ? hyperPriorWords(hyper) : 'Compute an evidence map first'}
        >
          Average over the map
        </button>
        <TaskStatusLine kind="averaged" task={task} label="Averaging" />
      </div>
      {value && figures && (
        <>
          <p className="note" data-testid="averaged-facts">
            {hyperPriorWords(value.hyperPrior)}; {value.cellsUsed} cells entered, effective number of cells{' '}
            <Num value={value.effectiveCells} text={fmt(value.effectiveCells)} />; weight on the map’s edge{' '}
            <Num testId="averaged-edge" value={value.edgeWeight} text={fmt(value.edgeWeight)} />
            {value.edgeWeight > 0.05 ? ' (the map does not hold the evidence’s mass: widen it)' : ''}; largest change of the mean{' '}
            <Num testId="averaged-change" value={figures.change.maxMeanChange} text={fmt(figures.change.maxMeanChange)} /> {p.quantity.unit}
            ; largest std averaged / this prior {fmt(figures.change.stdRatio)}.
          </p>
          {figures.line && (
            <Plot
              id="plot-averaged"
              label="Averaged posterior beside this prior's"
              data={figures.line}
              layout={{
                title: { text: 'Averaged over the map (orange) and this prior (teal, dashed): means and 95% bands', font: { size: 12 } },
                xaxis: { title: { text: axisLabel(p.grid, 0) } },
                yaxis: { title: { text: q } },
                legend: { orientation: 'h', x: 0, y: -0.2, yanchor: 'top' },
              }}
              height={300}
            />
          )}
          {figures.maps && (
            <div className="grid-2">
              <Plot
                id="plot-averaged-chosen-mean"
                label="This prior: posterior mean"
                data={figures.maps.chosenMean}
                layout={mapLayout(p.grid, 'This prior: posterior mean')}
                height={220}
              />
              <Plot
                id="plot-averaged-mean"
                label="Averaged posterior mean"
                data={figures.maps.averagedMean}
                layout={mapLayout(p.grid, 'Averaged: posterior mean')}
                height={220}
              />
              <Plot
                id="plot-averaged-chosen-std"
                label="This prior: posterior std"
                data={figures.maps.chosenStd}
                layout={mapLayout(p.grid, 'This prior: posterior std')}
                height={220}
              />
              <Plot
                id="plot-averaged-std"
                label="Averaged posterior std"
                data={figures.maps.averagedStd}
                layout={mapLayout(p.grid, 'Averaged: posterior std')}
                height={220}
              />
            </div>
          )}
        </>
      )}
    </section>
  );
}
