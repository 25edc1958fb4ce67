/** The Problem screen: facts of the loaded problem, its data and the sensitivity of G. */
import { useGridView } from '../gridView.ts';
import { useMemo } from 'react';
import { cellCount } from '../../core/grid/grid.ts';
import { useWb } from '../context.ts';
import { coverageLayout, coverageTraces, dataLayout, observedTrace } from '../figures/problem.ts';
import { fmtNum } from '../figures/common.ts';
import { withUnit } from '../labels.ts';
import { Plot } from '../Plot.tsx';
import { gridOverlayTraces, overlayLegend, surveyDataFigure } from '../survey/figures.ts';

export function ProblemScreen() {
  const p = useGridView();
  const posterior = useWb((s) => s.posterior);
  // Against position when the data say where they were measured (src/app/survey/figures.ts).
  const profile = useMemo(() => p && surveyDataFigure(p), [p]);
  const data = useMemo(() => profile?.data ?? (p ? [observedTrace(p.values, p.sigma)] : []), [p, profile]);
  const layout = useMemo(() => profile?.layout ?? (p && dataLayout(p.dataUnit)), [p, profile]);
  // The grid's outline, first cell centre, cell size and the geometry over the sensitivity map.
  const coverage = useMemo(() => (p ? [...coverageTraces(p.grid, p.coverage), ...gridOverlayTraces(p.grid, p.geometry)] : []), [p]);
  const covLayout = useMemo(() => p && { ...coverageLayout(p.grid, p.dataUnit, p.quantity.unit), ...overlayLegend() }, [p]);
  if (!p || !layout || !covLayout) return null;
  const g = p.grid;
  return (
    <div className="screen" data-testid="screen-problem">
      <div className="facts">
        <h2>{p.title}</h2>
        <p>{p.description}</p>
        <dl>
          <dt>Grid</dt>
          <dd data-testid="grid-facts">
            {g.shape.join(' × ')} cells of {g.spacing.join(' × ')} {g.unit ?? ''} (N = {cellCount(g)})
          </dd>
          <dt>Data</dt>
          <dd>
            M = {p.dataCount}, σ from {fmtNum(Math.min(...p.sigma))} to {fmtNum(Math.max(...p.sigma))} {p.dataUnit || '(no unit given)'}
          </dd>
          <dt>Operator G</dt>
          <dd>
            {p.operatorKind}, {p.operatorNonZeros} non-zeros
          </dd>
          <dt title="The dense loops (Cholesky, variance solves) run as WebAssembly SIMD when the browser allows it, else as JavaScript; the results are the same">
            Numeric kernels
          </dt>
          <dd data-testid="numeric-kernels">{p.numericKernels}</dd>
          <dt>Quantity</dt>
          <dd>{withUnit(p.quantity.name, p.quantity.unit)}</dd>
          {posterior && (
            <>
              <dt title="tr R, R = Cm Gᵀ K⁻¹ G">Resolved parameters</dt>
              <dd>{fmtNum(posterior.summary.resolutionTrace)}</dd>
            </>
          )}
        </dl>
      </div>
      <div className="grid-2">
        <Plot id="plot-data" label="Observed data with error bars" data={data} layout={layout} height={380} />
        <Plot id="plot-coverage" label="Sensitivity map of the forward operator" data={coverage} layout={covLayout} height={380} />
      </div>
    </div>
  );
}
