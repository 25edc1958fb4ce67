/** The Problem screen: facts of the loaded problem, its data and the sensitivity of G. */
import { useMemo } from 'react';
import { cellCount } from '../../core/grid/grid.ts';
import { useWb } from '../context.ts';
import { coverageLayout, coverageTraces, dataLayout, observedTrace } from '../figures/problem.ts';
import { fmtNum } from '../figures/common.ts';
import { withUnit } from '../labels.ts';
import { Plot } from '../Plot.tsx';

export function ProblemScreen() {
  const p = useWb((s) => s.problem);
  const posterior = useWb((s) => s.posterior);
  const data = useMemo(() => (p ? [observedTrace(p.values, p.sigma)] : []), [p]);
  const layout = useMemo(() => p && dataLayout(p.dataUnit), [p]);
  const coverage = useMemo(() => (p ? coverageTraces(p.grid, p.coverage) : []), [p]);
  const covLayout = useMemo(() => p && coverageLayout(p.grid, p.dataUnit, p.quantity.unit), [p]);
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
          <dt title="The dense loops (Cholesky, variance solves) run as WebAssembly SIMD when the browser allows it, else as JavaScript; the results are the same">Numeric kernels</dt>
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
        <Plot id="plot-data" label="Observed data with error bars" data={data} layout={layout} height={280} />
        <Plot id="plot-coverage" label="Sensitivity map of the forward operator" data={coverage} layout={covLayout} height={280} />
      </div>
    </div>
  );
}
