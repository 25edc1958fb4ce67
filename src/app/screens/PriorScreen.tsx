/** The Prior screen: correlation against distance, the 2-D correlation map or the Cm heat map. */
import { useGridView } from '../gridView.ts';
import { useMemo } from 'react';
import { cellCount, gridDimension } from '../../core/grid/grid.ts';
import { useWb } from '../context.ts';
import {
  correlationCurveLayout,
  correlationCurveTraces,
  correlationMapLayout,
  correlationMapTraces,
  covarianceLayout,
  covarianceTraces,
} from '../figures/prior.ts';
import { axisNames, orientationNote } from '../labels.ts';
import { Plot } from '../Plot.tsx';
import { COVARIANCE_VIEW_CELLS } from '../results/slice.ts';
import type { Trace } from '../traces.ts';

export function PriorScreen() {
  const p = useGridView();
  const prior = useWb((s) => s.prior);
  const cov = useWb((s) => s.covariance);
  const covError = useWb((s) => s.errors.covariance ?? null);
  const curves = useMemo((): { data: Trace[]; error: string | null } => {
    if (!p || !prior) return { data: [], error: null };
    try {
      return { data: correlationCurveTraces(prior, p.grid), error: null };
    } catch (e) {
      return { data: [], error: e instanceof Error ? e.message : String(e) };
    }
  }, [p, prior]);
  const curveLayout = useMemo(() => p && correlationCurveLayout(p.grid), [p]);
  const is2D = p ? gridDimension(p.grid) === 2 : false;
  const mapData = useMemo(() => {
    if (!p || !prior || !is2D) return [];
    try {
      return correlationMapTraces(prior, p.grid);
    } catch {
      // The curve above reports the same failure in words.
      return [];
    }
  }, [p, prior, is2D]);
  const mapLayout = useMemo(() => p && correlationMapLayout(p.grid), [p]);
  const covData = useMemo(() => (cov ? covarianceTraces(cov) : []), [cov]);
  const covLayout = useMemo(() => p && covarianceLayout(p.quantity.unit), [p]);
  if (!p || !prior || !curveLayout || !mapLayout || !covLayout) return null;
  const small = cellCount(p.grid) <= COVARIANCE_VIEW_CELLS;
  return (
    <div className="screen" data-testid="screen-prior">
      {curves.error && (
        <p className="error" role="alert">
          {curves.error}
        </p>
      )}
      <div className="grid-2">
        <Plot id="plot-correlation" label="Correlation against distance" data={curves.data} layout={curveLayout} height={300} />
        {is2D ? (
          <Plot id="plot-correlation-map" label="Two-dimensional correlation map" data={mapData} layout={mapLayout} height={300} />
        ) : small ? (
          <Plot id="plot-covariance" label="Prior covariance heat map" data={covData} layout={covLayout} height={300} />
        ) : null}
      </div>
      {is2D && (
        <p className="note" data-testid="orientation-note">
          Every map here, the correlation map included: {orientationNote(p.grid)}. The angle θ turns from {axisNames(p.grid)[0]} towards{' '}
          {axisNames(p.grid)[1]}, so a positive θ tilts the ellipse clockwise on screen (down to the right).
        </p>
      )}
      {!small && (
        <p className="note">
          The covariance heat map is shown for grids of at most {COVARIANCE_VIEW_CELLS} cells (this one has {cellCount(p.grid)}).
        </p>
      )}
      {covError && (
        <p className="error" role="alert">
          Covariance: {covError}
        </p>
      )}
    </div>
  );
}
