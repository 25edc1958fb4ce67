/** The Data fit screen: χ² against its reference distribution, observed against predicted data, residuals. */
import { useGridView } from '../gridView.ts';
import { useMemo } from 'react';
import { useWb } from '../context.ts';
import { fmtNum } from '../figures/common.ts';
import { fitLayouts, fitTraces } from '../figures/fit.ts';
import { Plot } from '../Plot.tsx';
import { SurveyFitPlots } from '../survey/SurveyPlots.tsx';
import { FIT_REFERENCE_BASIS, fitVerdict, formatTail, shownPosterior } from '../posteriorView.ts';
import { Waiting } from './Waiting.tsx';

export function FitScreen() {
  const p = useGridView();
  const complete = useWb((s) => s.posterior);
  const partial = useWb((s) => s.posteriorPartial);
  // The data fit needs only the mean: the partial one is complete for this screen.
  const post = useMemo(() => shownPosterior(complete, partial), [complete, partial]);
  const error = useWb((s) => s.errors.posterior ?? null);
  const fit = useMemo(() => (p && post ? fitTraces(p, post) : null), [p, post]);
  const layouts = useMemo(() => p && fitLayouts(p.dataUnit), [p]);
  if (!p || !layouts) return null;
  const s = post;
  const ref = post?.fitReference ?? null;
  const verdict = s && ref ? fitVerdict(s.chi2, ref) : null;
  return (
    <div className="screen" data-testid="screen-fit">
      {error && (
        <p className="error" role="alert">
          Posterior: {error}
        </p>
      )}
      {s && (
        <p className="chi2" data-testid="chi2" title={FIT_REFERENCE_BASIS}>
          χ² = <strong data-testid="chi2-value">{fmtNum(s.chi2)}</strong> (M = {s.dataCount} data)
          {ref && verdict ? (
            <>
              {' '}
              — expected under the model <span data-testid="chi2-expected">{fmtNum(ref.expected)}</span> = M −{' '}
              {fmtNum(s.dataCount - ref.expected)} resolved parameters; 95% interval{' '}
              <span data-testid="chi2-interval">
                [{fmtNum(ref.interval95[0])}, {fmtNum(ref.interval95[1])}]
              </span>
              , P(χ² ≥ observed) = <span data-testid="chi2-tail">{formatTail(ref.upperTail)}</span>{' '}
              <span data-testid="chi2-verdict" data-position={verdict.position}>
                ({verdict.text})
              </span>
            </>
          ) : (
            <> — the reference distribution of χ² follows with the uncertainty bands.</>
          )}
        </p>
      )}
      {fit && post && <SurveyFitPlots p={p} fit={post} />}
      {fit ? (
        <div className="grid-2">
          <Plot id="plot-fit" label="Observed against predicted data" data={fit.obs} layout={layouts.obs} height={300} />
          <Plot id="plot-residuals" label="Normalised residuals" data={fit.res} layout={layouts.res} height={300} />
        </div>
      ) : (
        !error && <Waiting what="the data fit" />
      )}
    </div>
  );
}
