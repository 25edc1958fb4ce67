/**
 * The overview: one prior's realisations, its posterior and its data fit side by side, redrawn
 * while any prior control moves (the detailed screens keep the rest). Traces come from ./traces.ts.
 * When every panel has drawn the results of the current prior, the performance mark
 * {@link MARK_OVERVIEW_DRAWN} is set (read by `npm run bench:ui`).
 */
import { useGridView } from '../gridView.ts';
import { useCallback, useMemo, useRef } from 'react';
import { useWb, useWorkbenchStore } from '../context.ts';
import { Plot } from '../Plot.tsx';
import { NumberField } from '../controls.tsx';
import { axis1D, gridDimension } from '../traces.ts';
import { bandsState, bandsText, FIT_REFERENCE_BASIS, fitVerdict, shownPosterior } from '../posteriorView.ts';
import { axisLabel, orientationNote, withUnit } from '../labels.ts';
import { formatNumber } from '../../core/format.ts';
import {
  overviewFit,
  overviewFitAxis,
  overviewMaps,
  posteriorTraces1D,
  priorBand,
  priorTraces1D,
  mapLayout,
  SHOWN_DRAWS_1D,
  SHOWN_DRAWS_2D,
} from './traces.ts';
import { useColourLimits } from './colourLimits.ts';
import { trueAspectHeight } from '../colourScales.ts';
import type { WorkbenchState } from '../store.ts';

/** Performance mark: every overview panel shows the results of the current prior. */
export const MARK_OVERVIEW_DRAWN = 'ps:overview-drawn';

const fmt = (x: number) => formatNumber(x, 4);

/** The results the overview needs are those of the current prior (nothing pending). */
function current(s: WorkbenchState): boolean {
  if (!s.problem) return false;
  const rev = `${s.problem.version}:${s.priorRevision}`;
  return (
    s.computedFor.posterior === rev &&
    !s.busy.posterior &&
    s.posterior !== null &&
    s.posteriorPartial === null &&
    s.computedFor.priorDraws === `${rev}:${s.seed}` &&
    !s.busy.priorDraws
  );
}

export function OverviewScreen() {
  const store = useWorkbenchStore();
  const p = useGridView();
  const complete = useWb((s) => s.posterior);
  const partial = useWb((s) => s.posteriorPartial);
  const draws = useWb((s) => s.priorDraws);
  const busy = useWb((s) => s.busy.posterior ?? false);
  const error = useWb((s) => s.errors.posterior ?? null);
  const drawError = useWb((s) => s.errors.priorDraws ?? null);
  const revision = useWb((s) => s.priorRevision);
  const prior = useWb((s) => s.prior);
  const limits = useColourLimits();
  const post = useMemo(() => shownPosterior(complete, partial), [complete, partial]);
  const is2D = p ? gridDimension(p.grid) === 2 : false;
  const bands = bandsText(bandsState(complete, partial, busy, error));

  // Which panels have drawn since the prior last changed; the mark once all have, on current results.
  const drawn = useRef({ revision: -1, ids: new Set<string>(), marked: false });
  if (drawn.current.revision !== revision) drawn.current = { revision, ids: new Set(), marked: false };
  const panelIds = is2D ? ['ov-draw-1', 'ov-draw-2', 'ov-mean', 'ov-std', 'ov-fit'] : ['ov-prior', 'ov-posterior', 'ov-fit'];
  const expected = useRef(panelIds);
  expected.current = panelIds;
  const onDrawn = useCallback(
    (id: string) => {
      const d = drawn.current;
      d.ids.add(id);
      if (!d.marked && expected.current.every((k) => d.ids.has(k)) && current(store.getState())) {
        d.marked = true;
        performance.mark(MARK_OVERVIEW_DRAWN);
      }
    },
    [store],
  );
  const drawnBy = useMemo(() => Object.fromEntries(panelIds.map((id) => [id, () => onDrawn(id)])), [onDrawn, is2D]);

  // The prior's mean and pointwise std from its spec: the prior panel draws as soon as the draws arrive.
  const band = useMemo(() => (p && prior ? priorBand(p.grid, prior) : null), [p, prior]);
  const priorMean = band?.mean ?? null;

  const priorPanel = useMemo(
    () => (p && !is2D && band ? priorTraces1D(axis1D(p.grid), draws, band.mean, band.std) : null),
    [p, is2D, band, draws],
  );
  const posteriorPanel = useMemo(
    () =>
      p && !is2D && post
        ? posteriorTraces1D(
            axis1D(p.grid),
            { mean: post.mean, priorMean: post.priorMean, priorStd: post.priorStd, std: post.summary?.std ?? null },
            p.truth,
          )
        : null,
    [p, is2D, post],
  );
  const maps = useMemo(() => {
    if (!p || !is2D || !priorMean) return null;
    const pst = post ? { mean: post.mean, priorStd: post.priorStd, std: post.summary?.std ?? null } : null;
    return overviewMaps(p.grid, p.quantity.unit, priorMean, draws, pst, limits);
  }, [p, is2D, priorMean, draws, post, limits.half]);
  const fit = useMemo(() => (p && post ? overviewFit(p, post) : null), [p, post]);

  const layouts = useMemo(() => {
    if (!p) return null;
    const q = withUnit(p.quantity.name, p.quantity.unit);
    const line = (title: string) => ({
      title: { text: title, font: { size: 12 } },
      xaxis: { title: { text: axisLabel(p.grid, 0), standoff: 2 } },
      yaxis: { title: { text: q } },
      margin: { l: 56, r: 8, t: 28, b: 40 },
      showlegend: false,
    });
    const pert = maps?.perturbation ? ' − prior mean' : '';
    return {
      prior: line(`Prior: ${SHOWN_DRAWS_1D} realisations, mean (dashed), 95% band`),
      posterior: line('Posterior: mean, 68% and 95% bands; prior 95% (sand)'),
      fit: {
        title: { text: 'Data fit: observed ±1σ (dots), predicted (line)', font: { size: 12 } },
        xaxis: { title: { text: overviewFitAxis(p), standoff: 2 } },
        yaxis: { title: { text: withUnit('d', p.dataUnit) } },
        margin: { l: 56, r: 8, t: 28, b: 40 },
        showlegend: false,
      },
      draw1: mapLayout(p.grid, `Prior realisation 1${pert}`),
      draw2: mapLayout(p.grid, `Prior realisation 2${pert}`),
      mean: mapLayout(p.grid, `Posterior mean${pert}`),
      std: mapLayout(p.grid, 'Posterior standard deviation'),
    };
  }, [p, maps?.perturbation]);

  if (!p || !layouts) return null;
  const ref = post?.fitReference ?? null;
  const verdict = post && ref ? fitVerdict(post.chi2, ref) : null;
  // 2-D: the figure height that shows the section at true scale in a third of the screen's width.
  const extent: [number, number] = [p.grid.shape[0] * p.grid.spacing[0], (p.grid.shape[1] ?? 1) * (p.grid.spacing[1] ?? 1)];
  const h = is2D ? trueAspectHeight(extent, 430, { l: 52, r: 78, t: 28, b: 40 }, 170, 360) : 270;
  const wait = (what: string) => (
    <div className="waiting" style={{ minHeight: h }}>
      Computing {what} …
    </div>
  );
  return (
    <div className="screen" data-testid="screen-overview">
      {error && (
        <p className="error" role="alert">
          Posterior: {error}
        </p>
      )}
      {drawError && (
        <p className="error" role="alert">
          Prior realisations: {drawError}
        </p>
      )}
      <div className="row toolbar overview-bar">
        <span className="note">
          Prior, posterior and data fit of the prior being edited, redrawn as the controls move; the other tabs hold the details.
          {is2D && ` Maps at true scale, ${orientationNote(p.grid)}.`}
        </span>
        {is2D && (
          <NumberField
            label="Colour ± limit"
            value={limits.half ?? 0}
            unit={p.quantity.unit}
            tip={`Half-width of the colour range of realisations and posterior mean about the prior mean, fixed by hand; 0 = automatic (the largest departure shown)${maps ? `. Now ${fmt((maps.signedRange[1] - maps.signedRange[0]) / 2)}` : ''}`}
            testId="colour-limit"
            validate={(v) => (Number.isFinite(v) && v >= 0 ? null : 'a half-width ≥ 0 (0 for automatic)')}
            onCommit={(v) => limits.setHalf(v > 0 ? v : null)}
          />
        )}
      </div>
      {post && (
        <p className="chi2" data-testid="overview-chi2" title={FIT_REFERENCE_BASIS}>
          χ² = {fmt(post.chi2)} for M = {post.dataCount} data
          {ref && verdict ? (
            <>
              ; expected {fmt(ref.expected)}, 95% interval [{fmt(ref.interval95[0])}, {fmt(ref.interval95[1])}]:{' '}
              <span data-position={verdict.position}>{verdict.text}</span>
            </>
          ) : (
            <> ; its reference follows with the bands.</>
          )}
        </p>
      )}
      {bands && (
        <p className="bands-status note" role="status">
          {bands}
        </p>
      )}
      {!is2D && (
        <div className="grid-3 overview-grid">
          {draws && priorPanel ? (
            <Plot
              id="ov-prior"
              label="Prior realisations"
              data={priorPanel}
              layout={layouts.prior}
              height={h}
              onDrawn={drawnBy['ov-prior']}
            />
          ) : (
            wait('prior realisations')
          )}
          {posteriorPanel ? (
            <Plot
              id="ov-posterior"
              label="Posterior mean and bands"
              data={posteriorPanel}
              layout={layouts.posterior}
              height={h}
              onDrawn={drawnBy['ov-posterior']}
            />
          ) : (
            wait('the posterior')
          )}
          {fit ? (
            <Plot id="ov-fit" label="Data fit" data={fit} layout={layouts.fit} height={h} onDrawn={drawnBy['ov-fit']} />
          ) : (
            wait('the data fit')
          )}
        </div>
      )}
      {maps && (
        <div className="grid-3 overview-grid">
          {maps.draws[0] ? (
            <Plot
              id="ov-draw-1"
              label="Prior realisation 1"
              data={maps.draws[0]}
              layout={layouts.draw1}
              height={h}
              onDrawn={drawnBy['ov-draw-1']}
            />
          ) : (
            wait('prior realisations')
          )}
          {maps.draws[1] ? (
            <Plot
              id="ov-draw-2"
              label="Prior realisation 2"
              data={maps.draws[1]}
              layout={layouts.draw2}
              height={h}
              onDrawn={drawnBy['ov-draw-2']}
            />
          ) : (
            wait('prior realisations')
          )}
          {maps.mean ? (
            <Plot id="ov-mean" label="Posterior mean map" data={maps.mean} layout={layouts.mean} height={h} onDrawn={drawnBy['ov-mean']} />
          ) : (
            wait('the posterior mean')
          )}
          {maps.std ? (
            <Plot
              id="ov-std"
              label="Posterior standard deviation map"
              data={maps.std}
              layout={layouts.std}
              height={h}
              onDrawn={drawnBy['ov-std']}
            />
          ) : (
            wait('the posterior standard deviation')
          )}
          {fit ? (
            <Plot id="ov-fit" label="Data fit" data={fit} layout={layouts.fit} height={Math.max(h, 240)} onDrawn={drawnBy['ov-fit']} />
          ) : (
            wait('the data fit')
          )}
        </div>
      )}
      {is2D && SHOWN_DRAWS_2D > 0 && (
        <p className="note">
          Realisations and the posterior mean share one diverging colour range centred on the prior mean; the standard deviation runs from 0
          to the largest prior standard deviation.
        </p>
      )}
    </div>
  );
}
