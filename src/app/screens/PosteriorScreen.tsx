/** The Posterior screen: mean and bands (1-D) or maps (2-D), and the averaging kernel of a chosen cell. */
import { useGridView } from '../gridView.ts';
import { useMemo } from 'react';
import { useShallow } from 'zustand/react/shallow';
import { gridDimension } from '../../core/grid/grid.ts';
import type { GridView } from '../gridView.ts';
import { useWb } from '../context.ts';
import { NumberField } from '../controls.tsx';
import {
  kernelTraces,
  posteriorBandLayout,
  posteriorBandTraces,
  posteriorLayouts,
  posteriorMapTraces,
  truthMapTraces,
} from '../figures/posterior.ts';
import { Plot } from '../Plot.tsx';
import { bandsState, bandsText, shownPosterior } from '../posteriorView.ts';
import { MARK_POSTERIOR_DRAWN } from '../results/slice.ts';
import { cellAt } from '../traces.ts';
import { Waiting } from './Waiting.tsx';

function CellPicker({ p }: { p: GridView }) {
  const [cell, selectCell] = useWb(useShallow((s) => [s.selectedCell, s.selectCell] as const));
  const nx = p.grid.shape[0];
  const ny = p.grid.shape[1] ?? 1;
  const is2D = gridDimension(p.grid) === 2;
  const ix = cell === null ? 0 : cell % nx;
  const iy = cell === null ? 0 : Math.floor(cell / nx);
  return (
    <div className="row toolbar" aria-label="Averaging kernel cell">
      <span className="note">
        Click a {is2D ? 'map cell' : 'point'} or type its index to see its averaging kernel (row of R = Cm Gᵀ K⁻¹ G):
      </span>
      <NumberField
        label="column ix"
        value={ix}
        unit=""
        tip={`0 … ${nx - 1}`}
        testId="cell-ix"
        validate={(v) => (Number.isInteger(v) && v >= 0 && v < nx ? null : `column must be an integer from 0 to ${nx - 1}`)}
        onCommit={(v) => selectCell(v + nx * iy)}
      />
      {is2D && (
        <NumberField
          label="row iy"
          value={iy}
          unit=""
          tip={`0 … ${ny - 1}`}
          testId="cell-iy"
          validate={(v) => (Number.isInteger(v) && v >= 0 && v < ny ? null : `row must be an integer from 0 to ${ny - 1}`)}
          onCommit={(v) => selectCell(ix + nx * v)}
        />
      )}
      <button type="button" data-testid="show-kernel" onClick={() => selectCell(ix + nx * iy)}>
        Show kernel
      </button>
      {cell !== null && (
        <button type="button" onClick={() => selectCell(null)}>
          Clear
        </button>
      )}
    </div>
  );
}

const markDrawn = () => performance.mark(MARK_POSTERIOR_DRAWN);

export function PosteriorScreen() {
  const p = useGridView();
  const complete = useWb((s) => s.posterior);
  const partial = useWb((s) => s.posteriorPartial);
  const busy = useWb((s) => s.busy.posterior ?? false);
  const error = useWb((s) => s.errors.posterior ?? null);
  const resolution = useWb((s) => s.resolution);
  const resError = useWb((s) => s.errors.resolution ?? null);
  const selectCell = useWb((s) => s.selectCell);
  const selected = useWb((s) => s.selectedCell);
  const is2D = p ? gridDimension(p.grid) === 2 : false;
  // The newest mean (a partial one while the bands are computed) and its bands when they exist.
  const post = useMemo(() => shownPosterior(complete, partial), [complete, partial]);
  const bands = bandsText(bandsState(complete, partial, busy, error));

  const oneD = useMemo(() => (p && post && !is2D ? posteriorBandTraces(p.grid, post, p.truth) : null), [p, post, is2D]);
  const oneDLayout = useMemo(() => p && posteriorBandLayout(p.grid, p.quantity), [p]);
  const maps = useMemo(() => (p && post && is2D ? posteriorMapTraces(p.grid, post) : null), [p, post, is2D]);
  // The truth does not depend on the prior: its own memo, so a new posterior does not redraw it.
  const truthMap = useMemo(() => (p && is2D && p.truth ? truthMapTraces(p.grid, p.truth) : null), [p, is2D]);
  const layouts = useMemo(() => p && posteriorLayouts(p.grid, p.quantity.unit), [p]);
  const kernelData = useMemo(() => (p && resolution ? kernelTraces(p.grid, resolution) : []), [p, resolution]);
  if (!p || !layouts || !oneDLayout) return null;
  const click = (x: number, y: number) => {
    const c = cellAt(p.grid, x, y);
    if (c !== null) selectCell(c);
  };
  return (
    <div className="screen" data-testid="screen-posterior">
      {error && (
        <p className="error" role="alert" data-testid="posterior-error">
          Posterior: {error}
        </p>
      )}
      {bands && (
        <p className="bands-status" role="status" aria-live="polite" data-testid="bands-status">
          {bands}
        </p>
      )}
      {!post && !error && <Waiting what="the posterior" />}
      {oneD && (
        <Plot
          id="plot-posterior"
          label="Posterior mean and bands"
          data={oneD}
          layout={oneDLayout}
          height={340}
          onDrawn={markDrawn}
          onPointClick={click}
        />
      )}
      {maps && (
        <div className="grid-3">
          <Plot
            id="plot-posterior-mean"
            label="Posterior mean map"
            data={maps.mean}
            layout={layouts.mean}
            height={240}
            onDrawn={markDrawn}
            onPointClick={click}
          />
          {maps.std ? (
            <Plot
              id="plot-posterior-std"
              label="Posterior standard deviation map"
              data={maps.std}
              layout={layouts.std}
              height={240}
              onPointClick={click}
            />
          ) : (
            <BandsPending what="standard deviation map" text={bands} />
          )}
          {maps.vr ? (
            <Plot
              id="plot-variance-reduction"
              label="Variance reduction map"
              data={maps.vr}
              layout={layouts.vr}
              height={240}
              onPointClick={click}
            />
          ) : (
            <BandsPending what="variance reduction map" text={bands} />
          )}
          {truthMap && <Plot id="plot-truth" label="Truth map" data={truthMap} layout={layouts.truth} height={240} onPointClick={click} />}
          {resolution && selected !== null && (
            <Plot id="plot-kernel" label="Averaging kernel map" data={kernelData} layout={layouts.kernel} height={240} />
          )}
        </div>
      )}
      <CellPicker p={p} />
      {resError && (
        <p className="error" role="alert">
          Averaging kernel: {resError}
        </p>
      )}
      {!is2D && resolution && selected !== null && (
        <Plot id="plot-kernel" label="Averaging kernel" data={kernelData} layout={layouts.kernel} height={200} />
      )}
    </div>
  );
}

/** Stands in for a map that needs the bands while they are computed (or after they failed). */
function BandsPending({ what, text }: { what: string; text: string | null }) {
  return (
    <div
      className="bands-pending"
      data-testid="bands-pending"
      style={{ minHeight: 240 }}
      aria-label={`Posterior ${what}: ${text ?? 'not available'}`}
    >
      <span className="note">{text ?? 'Uncertainty bands: not available.'}</span>
    </div>
  );
}
