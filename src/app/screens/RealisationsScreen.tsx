/** The Realisations screen: six prior and six posterior draws from one seed, on one colour scale. */
import { useGridView } from '../gridView.ts';
import { useMemo } from 'react';
import { useShallow } from 'zustand/react/shallow';
import type { Matrix } from '../../core/linalg/matrix.ts';
import type { GridView } from '../gridView.ts';
import { useWb } from '../context.ts';
import { NumberField } from '../controls.tsx';
import { galleryLayout, galleryTraces } from '../figures/realisations.ts';
import { Plot } from '../Plot.tsx';
import { commonRange } from '../traces.ts';
import { divergingRange, effectiveRange } from '../colourScales.ts';
import { useColourLimits } from '../overview/colourLimits.ts';
import { Waiting } from './Waiting.tsx';

function Gallery({ id, title, p, draws, range }: { id: string; title: string; p: GridView; draws: Matrix; range: [number, number] }) {
  const data = useMemo(() => galleryTraces(p.grid, draws), [p, draws]);
  const layout = useMemo(() => galleryLayout(p.grid, p.quantity.unit, draws.rows, range, title), [p, draws, range, title]);
  return <Plot id={id} label={title} data={data} layout={layout} height={280} />;
}

export function RealisationsScreen() {
  const p = useGridView();
  const [seed, setSeed, newSeed] = useWb(useShallow((s) => [s.seed, s.setSeed, s.newSeed] as const));
  const priorDraws = useWb((s) => s.priorDraws);
  const postDraws = useWb((s) => s.posteriorDraws);
  const errors = useWb(useShallow((s) => [s.errors.priorDraws, s.errors.posteriorDraws] as const));
  const priorMean = useWb((s) => s.prior?.mean);
  const limits = useColourLimits();
  // One range for both galleries, symmetric about a constant prior mean (else about the middle of the values), or fixed by hand on the overview.
  const range = useMemo((): [number, number] => {
    const fields = [priorDraws?.data ?? new Float64Array(), postDraws?.data ?? new Float64Array()];
    const [lo, hi] = commonRange(fields);
    const centre = priorMean && 'constant' in priorMean ? priorMean.constant : (lo + hi) / 2;
    const r = effectiveRange(divergingRange(fields, centre), centre, limits);
    return [r[0], r[1]];
  }, [priorDraws, postDraws, priorMean, limits.half]);
  if (!p) return null;
  return (
    <div className="screen" data-testid="screen-realisations">
      <div className="row toolbar">
        <NumberField
          label="Seed"
          value={seed}
          unit=""
          tip="Seed of the random generator: the same seed gives the same realisations"
          testId="seed-input"
          validate={(v) => (Number.isInteger(v) && v >= 0 && v < 2 ** 32 ? null : 'Seed must be an integer from 0 to 4294967295')}
          onCommit={setSeed}
        />
        <button type="button" data-testid="redraw" onClick={newSeed} title="Draw again with a new seed">
          Redraw (new seed)
        </button>
        <span className="note">
          Six draws m = m₀ + L z (prior) and from the posterior, same seed, one colour scale centred on the prior mean (limits fixed by hand
          on the Overview apply here too).
        </span>
      </div>
      {errors.map(
        (e, k) =>
          e && (
            <p key={k} className="error" role="alert">
              {e}
            </p>
          ),
      )}
      <div className="grid-2">
        {priorDraws ? (
          <Gallery id="plot-prior-draws" title="Prior realisations" p={p} draws={priorDraws} range={range} />
        ) : (
          <Waiting what="prior realisations" />
        )}
        {postDraws ? (
          <Gallery id="plot-posterior-draws" title="Posterior realisations" p={p} draws={postDraws} range={range} />
        ) : (
          <Waiting what="posterior realisations" />
        )}
      </div>
    </div>
  );
}
