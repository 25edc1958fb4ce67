/** The five screens of the main area: problem, prior, realisations, posterior, data fit. */
import { useMemo } from 'react';
import { useShallow } from 'zustand/react/shallow';
import { useWb } from './context.ts';
import { Plot } from './Plot.tsx';
import { NumberField } from './controls.tsx';
import { MARK_POSTERIOR_DRAWN } from './store.ts';
import {
  axes2D,
  axis1D,
  band,
  bandTrace,
  cellAt,
  cellCount,
  COLOURS,
  commonRange,
  correlationCurves,
  correlationMap,
  DIVERGING_SCALE,
  gridDimension,
  MAP_SCALE,
  rowOf,
  termLengths,
  toRows2D,
  Z68,
  Z95,
  type Trace,
} from './traces.ts';
import type { ProblemView } from '../worker/protocol.ts';
import { bandsState, bandsText, FIT_REFERENCE_BASIS, fitVerdict, formatTail, shownPosterior } from './posteriorView.ts';
import { axisLabel, axisNames, downAxisLabel, offsetLabel, orientationNote, orientationTag, withUnit } from './labels.ts';
import { escapePlotText } from './plotText.ts';
import { formatNumber } from '../core/format.ts';

/** "d (ms)", or "d" when the data have no unit. */
function dLabel(p: ProblemView): string {
  return withUnit('d', p.dataUnit);
}

function qLabel(p: ProblemView): string {
  return withUnit(p.quantity.name, p.quantity.unit);
}

function xLabel(p: ProblemView, k = 0): string {
  return axisLabel(p.grid, k);
}

/**
 * Layout of a 2-D map: equal aspect, the second axis increasing downwards (one convention on every
 * 2-D plot, the correlation map included; ./labels.ts orientationNote states it under the title).
 */
export function mapLayout(p: ProblemView, title: string): Record<string, unknown> {
  return {
    title: { text: title, font: { size: 12 } },
    xaxis: { title: { text: xLabel(p, 0) }, constrain: 'domain' },
    yaxis: { title: { text: downAxisLabel(p.grid) }, autorange: 'reversed', scaleanchor: 'x', constrain: 'domain' },
    margin: { l: 56, r: 10, t: 30, b: 42 },
  };
}

function heat(p: ProblemView, field: ArrayLike<number>, name: string, extra: Trace = {}): Trace {
  const { x, y } = axes2D(p.grid);
  return {
    type: 'heatmap',
    x,
    y,
    z: toRows2D(p.grid, field),
    colorscale: MAP_SCALE,
    name,
    hovertemplate: `${hoverName(axisNames(p.grid)[0]!)} %{x}<br>${hoverName(axisNames(p.grid)[1]!)} %{y}<br>${hoverName(name)} %{z:.4g}<extra></extra>`,
    colorbar: { thickness: 10, len: 0.9 },
    ...extra,
  };
}

// ---------------------------------------------------------------------------------------------

export function ProblemScreen() {
  const p = useWb((s) => s.problem);
  const posterior = useWb((s) => s.posterior);
  const data = useMemo(() => {
    if (!p) return [];
    const idx = Array.from({ length: p.dataCount }, (_, i) => i + 1);
    return [
      {
        type: 'scatter',
        mode: 'markers',
        x: idx,
        y: p.values,
        name: 'observed ±1σ',
        marker: { color: COLOURS.data, size: 5 },
        error_y: { type: 'data', array: p.sigma, visible: true, color: COLOURS.data, thickness: 1 },
      },
    ];
  }, [p]);
  const dataLayout = useMemo(
    () =>
      p && {
        title: { text: 'Data with ±1σ error bars', font: { size: 12 } },
        xaxis: { title: { text: 'datum number' } },
        yaxis: { title: { text: dLabel(p) } },
      },
    [p],
  );
  const coverage = useMemo(() => {
    if (!p) return [];
    if (gridDimension(p.grid) === 2) return [heat(p, p.coverage, 'Σ|G|')];
    return [{ type: 'scatter', mode: 'lines', x: axis1D(p.grid), y: p.coverage, name: 'Σᵢ|Gᵢⱼ|', line: { color: COLOURS.accent } }];
  }, [p]);
  const coverageLayout = useMemo(
    () =>
      p &&
      (gridDimension(p.grid) === 2
        ? mapLayout(p, 'Sensitivity: column sums Σᵢ|Gᵢⱼ|')
        : {
            title: { text: 'Sensitivity: column sums Σᵢ|Gᵢⱼ|', font: { size: 12 } },
            xaxis: { title: { text: xLabel(p) } },
            yaxis: { title: { text: withUnit('Σ|G|', p.dataUnit && p.quantity.unit ? `${p.dataUnit} per ${p.quantity.unit}` : '') } },
          }),
    [p],
  );
  if (!p || !dataLayout || !coverageLayout) return null;
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
          <dd>{qLabel(p)}</dd>
          {posterior && (
            <>
              <dt title="tr R, R = Cm Gᵀ K⁻¹ G">Resolved parameters</dt>
              <dd>{fmtNum(posterior.summary.resolutionTrace)}</dd>
            </>
          )}
        </dl>
      </div>
      <div className="grid-2">
        <Plot id="plot-data" label="Observed data with error bars" data={data} layout={dataLayout} height={280} />
        <Plot id="plot-coverage" label="Sensitivity map of the forward operator" data={coverage} layout={coverageLayout} height={280} />
      </div>
    </div>
  );
}

function fmtNum(x: number): string {
  return formatNumber(x, 4);
}

/** A name from a file inside one of our hover templates: escaped, and no %{…} placeholders. */
function hoverName(s: string): string {
  return escapePlotText(s).replace(/%/g, '%%');
}

// ---------------------------------------------------------------------------------------------

export function PriorScreen() {
  const p = useWb((s) => s.problem);
  const prior = useWb((s) => s.prior);
  const cov = useWb((s) => s.covariance);
  const covError = useWb((s) => s.errors.covariance ?? null);
  const curves = useMemo(() => {
    if (!p || !prior) return null;
    const maxLen = Math.max(...prior.terms.map((t) => Math.max(...termLengths(t))), ...p.grid.spacing);
    const extent = Math.max(...p.grid.shape.map((n, k) => n * p.grid.spacing[k]!));
    try {
      return { c: correlationCurves(prior, Math.min(extent, 4 * maxLen)), error: null };
    } catch (e) {
      return { c: null, error: e instanceof Error ? e.message : String(e) };
    }
  }, [p, prior]);
  const curveData = useMemo(() => {
    if (!curves?.c) return [];
    const c = curves.c;
    const traces: Trace[] = [{ type: 'scatter', mode: 'lines', x: c.r, y: c.total, name: 'total (with nugget)', line: { color: COLOURS.mean, width: 2.5 } }];
    c.terms.forEach((t, k) => {
      traces.push({ type: 'scatter', mode: 'lines', x: c.r, y: t.y, name: `term ${k + 1}: ${t.term.kernel}`, line: { dash: 'dot', width: 1.5 } });
      traces.push({
        type: 'scatter',
        mode: 'lines+text',
        x: [t.practicalRange, t.practicalRange],
        y: [0, 1],
        name: `practical range ${k + 1}`,
        text: ['', `ρ = 0.05 at ${fmtNum(t.practicalRange)}`],
        textposition: 'top right',
        line: { color: COLOURS.priorLine, dash: 'dash', width: 1 },
        showlegend: false,
      });
    });
    return traces;
  }, [curves]);
  const curveLayout = useMemo(
    () =>
      p && {
        title: { text: 'Correlation against distance (first axis); dashed: practical range ρ = 0.05', font: { size: 12 } },
        xaxis: { title: { text: withUnit('distance r', p.grid.unit) } },
        yaxis: { title: { text: 'correlation ρ' }, range: [-0.05, 1.1] },
      },
    [p],
  );
  const is2D = p ? gridDimension(p.grid) === 2 : false;
  const mapData = useMemo(() => {
    if (!p || !prior || !is2D) return [];
    try {
      const range = Math.max(...prior.terms.map((t) => Math.max(...termLengths(t)))) * 3;
      const m = correlationMap(prior, Math.min(range, Math.max(...p.grid.shape.map((n, k) => n * p.grid.spacing[k]!))));
      return [
        { type: 'heatmap', x: m.offsets, y: m.offsets, z: m.z, colorscale: MAP_SCALE, zmin: 0, zmax: 1, name: 'ρ', colorbar: { thickness: 10 }, hovertemplate: `${hoverName(offsetLabel(p.grid, 0))} %{x}<br>${hoverName(offsetLabel(p.grid, 1))} %{y}<br>ρ %{z:.3f}<extra></extra>` },
        {
          type: 'contour',
          x: m.offsets,
          y: m.offsets,
          z: m.z,
          contours: { start: 0.05, end: 0.05, size: 1, coloring: 'none', showlabels: true },
          line: { color: '#fff', width: 2 },
          showscale: false,
          name: 'ρ = 0.05',
          hoverinfo: 'skip',
        },
      ];
    } catch {
      return [];
    }
  }, [p, prior, is2D]);
  const mapLayoutMemo = useMemo(
    () =>
      p && {
        title: { text: 'Correlation map around a cell; contour ρ = 0.05', font: { size: 12 } },
        xaxis: { title: { text: offsetLabel(p.grid, 0) } },
        yaxis: { title: { text: downAxisLabel(p.grid, true) }, autorange: 'reversed', scaleanchor: 'x' },
      },
    [p],
  );
  const covData = useMemo(
    () => (cov ? [{ type: 'heatmap', z: toRows2D({ shape: [cov.cols, cov.rows], spacing: [1, 1] }, cov.data), colorscale: MAP_SCALE, name: 'Cm' }] : []),
    [cov],
  );
  const covLayout = useMemo(
    () =>
      p && {
        title: { text: withUnit('Prior covariance Cm', p.quantity.unit ? `(${p.quantity.unit})²` : ''), font: { size: 12 } },
        xaxis: { title: { text: 'cell j' } },
        yaxis: { title: { text: 'cell i' }, autorange: 'reversed', scaleanchor: 'x' },
      },
    [p],
  );
  if (!p || !prior || !curveLayout || !mapLayoutMemo || !covLayout) return null;
  const small = cellCount(p.grid) <= 400;
  return (
    <div className="screen" data-testid="screen-prior">
      {curves?.error && <p className="error" role="alert">{curves.error}</p>}
      <div className="grid-2">
        <Plot id="plot-correlation" label="Correlation against distance" data={curveData} layout={curveLayout} height={300} />
        {is2D ? (
          <Plot id="plot-correlation-map" label="Two-dimensional correlation map" data={mapData} layout={mapLayoutMemo} height={300} />
        ) : small ? (
          <Plot id="plot-covariance" label="Prior covariance heat map" data={covData} layout={covLayout} height={300} />
        ) : null}
      </div>
      {is2D && (
        <p className="note" data-testid="orientation-note">
          Every map here, the correlation map included: {orientationNote(p.grid)}. The angle θ turns from {axisNames(p.grid)[0]} towards {axisNames(p.grid)[1]}, so a positive θ
          tilts the ellipse clockwise on screen (down to the right).
        </p>
      )}
      {!small && <p className="note">The covariance heat map is shown for grids of at most 400 cells (this one has {cellCount(p.grid)}).</p>}
      {covError && <p className="error" role="alert">Covariance: {covError}</p>}
    </div>
  );
}

// ---------------------------------------------------------------------------------------------

function Gallery({ id, title, p, draws, range }: { id: string; title: string; p: ProblemView; draws: { data: Float64Array; cols: number; rows: number }; range: [number, number] }) {
  const data = useMemo(() => {
    const out: Trace[] = [];
    const is2D = gridDimension(p.grid) === 2;
    const x = axis1D(p.grid);
    for (let k = 0; k < draws.rows; k++) {
      const f = rowOf(draws.data, draws.cols, k);
      const ax = k === 0 ? '' : String(k + 1);
      if (is2D) {
        out.push({
          ...heat(p, f, `draw ${k + 1}`),
          xaxis: `x${ax}`,
          yaxis: `y${ax}`,
          coloraxis: 'coloraxis',
        });
      } else {
        out.push({ type: 'scatter', mode: 'lines', x, y: f, name: `draw ${k + 1}`, xaxis: `x${ax}`, yaxis: `y${ax}`, line: { color: COLOURS.mean, width: 1.2 }, showlegend: false });
      }
    }
    return out;
  }, [p, draws]);
  const layout = useMemo(() => {
    const is2D = gridDimension(p.grid) === 2;
    const l: Record<string, unknown> = {
      title: { text: is2D ? `${title} ${orientationTag(p.grid)}` : title, font: { size: 12 } },
      grid: { rows: 2, columns: 3, pattern: 'independent', xgap: 0.08, ygap: 0.16 },
      margin: { l: 40, r: 10, t: 30, b: 30 },
      showlegend: false,
    };
    if (is2D) l.coloraxis = { colorscale: MAP_SCALE, cmin: range[0], cmax: range[1], colorbar: { thickness: 10, title: { text: p.quantity.unit } } };
    for (let k = 0; k < draws.rows; k++) {
      const ax = k === 0 ? '' : String(k + 1);
      l[`yaxis${ax}`] = is2D ? { autorange: 'reversed', showticklabels: false } : { range };
      l[`xaxis${ax}`] = is2D ? { showticklabels: false } : {};
    }
    return l;
  }, [p, draws, range, title]);
  return <Plot id={id} label={title} data={data} layout={layout} height={280} />;
}

export function RealisationsScreen() {
  const p = useWb((s) => s.problem);
  const [seed, setSeed, newSeed] = useWb(useShallow((s) => [s.seed, s.setSeed, s.newSeed] as const));
  const priorDraws = useWb((s) => s.priorDraws);
  const postDraws = useWb((s) => s.posteriorDraws);
  const errors = useWb(useShallow((s) => [s.errors.priorDraws, s.errors.posteriorDraws] as const));
  const range = useMemo(
    () => commonRange([priorDraws?.data ?? new Float64Array(), postDraws?.data ?? new Float64Array()]),
    [priorDraws, postDraws],
  );
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
        <span className="note">Six draws m = m₀ + L z (prior) and from the posterior, same seed, one colour scale.</span>
      </div>
      {errors.map((e, k) => e && <p key={k} className="error" role="alert">{e}</p>)}
      <div className="grid-2">
        {priorDraws ? <Gallery id="plot-prior-draws" title="Prior realisations" p={p} draws={priorDraws} range={range} /> : <Waiting what="prior realisations" />}
        {postDraws ? <Gallery id="plot-posterior-draws" title="Posterior realisations" p={p} draws={postDraws} range={range} /> : <Waiting what="posterior realisations" />}
      </div>
    </div>
  );
}

function Waiting({ what }: { what: string }) {
  return <div className="waiting">Computing {what} …</div>;
}

// ---------------------------------------------------------------------------------------------

function CellPicker({ p }: { p: ProblemView }) {
  const [cell, selectCell] = useWb(useShallow((s) => [s.selectedCell, s.selectCell] as const));
  const nx = p.grid.shape[0]!;
  const ny = p.grid.shape[1] ?? 1;
  const is2D = gridDimension(p.grid) === 2;
  const ix = cell === null ? 0 : cell % nx;
  const iy = cell === null ? 0 : Math.floor(cell / nx);
  return (
    <div className="row toolbar" aria-label="Averaging kernel cell">
      <span className="note">Click a {is2D ? 'map cell' : 'point'} or type its index to see its averaging kernel (row of R = Cm Gᵀ K⁻¹ G):</span>
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
  const p = useWb((s) => s.problem);
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

  const oneD = useMemo(() => {
    if (!p || !post || is2D) return null;
    const x = axis1D(p.grid);
    const s = post.summary;
    const traces: Trace[] = [];
    const pb = band(post.priorMean, post.priorStd, Z95);
    traces.push(bandTrace(x, pb.lower, pb.upper, 'prior 95%', COLOURS.prior));
    if (s) {
      const b95 = band(s.mean, s.std, Z95);
      const b68 = band(s.mean, s.std, Z68);
      traces.push(bandTrace(x, b95.lower, b95.upper, 'posterior 95%', COLOURS.band95));
      traces.push(bandTrace(x, b68.lower, b68.upper, 'posterior 68%', COLOURS.band68));
    }
    if (p.truth) traces.push({ type: 'scatter', mode: 'lines', x, y: p.truth, name: 'truth', line: { color: COLOURS.truth, width: 1.2, dash: 'dot' } });
    traces.push({ type: 'scatter', mode: 'lines', x, y: post.mean, name: 'posterior mean', line: { color: COLOURS.mean, width: 2.2 } });
    return traces;
  }, [p, post, is2D]);
  const oneDLayout = useMemo(
    () =>
      p && {
        title: { text: 'Posterior mean with 68% and 95% bands; prior 95% band', font: { size: 12 } },
        xaxis: { title: { text: xLabel(p), standoff: 4 } },
        yaxis: { title: { text: qLabel(p) } },
        legend: { orientation: 'h', x: 0, y: -0.18, yanchor: 'top' },
      },
    [p],
  );
  const maps = useMemo(() => {
    if (!p || !post || !is2D) return null;
    const s = post.summary;
    return {
      mean: [heat(p, post.mean, 'mean')],
      std: s ? [heat(p, s.std, 'std')] : null,
      vr: s ? [heat(p, s.varianceReduction, 'variance reduction', { zmin: 0, zmax: 1 })] : null,
    };
  }, [p, post, is2D]);
  // The truth does not depend on the prior: its own memo, so a new posterior does not redraw it.
  const truthMap = useMemo(() => (p && is2D && p.truth ? [heat(p, p.truth, 'truth')] : null), [p, is2D]);
  const layouts = useMemo(
    () =>
      p && {
        mean: mapLayout(p, withUnit('Posterior mean', p.quantity.unit)),
        std: mapLayout(p, withUnit('Posterior standard deviation', p.quantity.unit)),
        vr: mapLayout(p, 'Variance reduction 1 − σ²post/σ²prior'),
        truth: mapLayout(p, withUnit('Truth', p.quantity.unit)),
        kernel: is2D
          ? mapLayout(p, 'Averaging kernel of the selected cell')
          : { title: { text: 'Averaging kernel of the selected cell', font: { size: 12 } }, xaxis: { title: { text: xLabel(p) } }, yaxis: { title: { text: 'R row' } } },
      },
    [p, is2D],
  );
  const kernelData = useMemo(() => {
    if (!p || !resolution) return [];
    if (is2D) {
      const a = resolution.row.reduce((m, v) => Math.max(m, Math.abs(v)), 0) || 1;
      const { x, y } = axes2D(p.grid);
      const nx = p.grid.shape[0]!;
      return [
        heat(p, resolution.row, 'R row', { colorscale: DIVERGING_SCALE, zmin: -a, zmax: a }),
        { type: 'scatter', mode: 'markers', x: [x[resolution.cell % nx]], y: [y[Math.floor(resolution.cell / nx)]], marker: { symbol: 'x-thin', size: 12, line: { width: 2, color: '#222' } }, name: 'cell', showlegend: false },
      ];
    }
    const x = axis1D(p.grid);
    return [
      { type: 'scatter', mode: 'lines', x, y: resolution.row, name: 'R row', line: { color: COLOURS.accent } },
      { type: 'scatter', mode: 'markers', x: [x[resolution.cell]], y: [resolution.row[resolution.cell]], name: 'cell', marker: { color: '#222', size: 8 } },
    ];
  }, [p, resolution, is2D]);
  if (!p || !layouts || !oneDLayout) return null;
  const click = (x: number, y: number) => {
    const c = cellAt(p.grid, x, y);
    if (c !== null) selectCell(c);
  };
  return (
    <div className="screen" data-testid="screen-posterior">
      {error && <p className="error" role="alert" data-testid="posterior-error">Posterior: {error}</p>}
      {bands && (
        <p className="bands-status" role="status" aria-live="polite" data-testid="bands-status">
          {bands}
        </p>
      )}
      {!post && !error && <Waiting what="the posterior" />}
      {oneD && <Plot id="plot-posterior" label="Posterior mean and bands" data={oneD} layout={oneDLayout} height={340} onDrawn={markDrawn} onPointClick={click} />}
      {maps && (
        <div className="grid-3">
          <Plot id="plot-posterior-mean" label="Posterior mean map" data={maps.mean} layout={layouts.mean} height={240} onDrawn={markDrawn} onPointClick={click} />
          {maps.std ? (
            <Plot id="plot-posterior-std" label="Posterior standard deviation map" data={maps.std} layout={layouts.std} height={240} onPointClick={click} />
          ) : (
            <BandsPending what="standard deviation map" text={bands} />
          )}
          {maps.vr ? (
            <Plot id="plot-variance-reduction" label="Variance reduction map" data={maps.vr} layout={layouts.vr} height={240} onPointClick={click} />
          ) : (
            <BandsPending what="variance reduction map" text={bands} />
          )}
          {truthMap && <Plot id="plot-truth" label="Truth map" data={truthMap} layout={layouts.truth} height={240} onPointClick={click} />}
          {resolution && selected !== null && <Plot id="plot-kernel" label="Averaging kernel map" data={kernelData} layout={layouts.kernel} height={240} />}
        </div>
      )}
      <CellPicker p={p} />
      {resError && <p className="error" role="alert">Averaging kernel: {resError}</p>}
      {!is2D && resolution && selected !== null && <Plot id="plot-kernel" label="Averaging kernel" data={kernelData} layout={layouts.kernel} height={200} />}
    </div>
  );
}

/** Stands in for a map that needs the bands while they are computed (or after they failed). */
function BandsPending({ what, text }: { what: string; text: string | null }) {
  return (
    <div className="bands-pending" data-testid="bands-pending" style={{ minHeight: 240 }} aria-label={`Posterior ${what}: ${text ?? 'not available'}`}>
      <span className="note">{text ?? 'Uncertainty bands: not available.'}</span>
    </div>
  );
}

// ---------------------------------------------------------------------------------------------

export function FitScreen() {
  const p = useWb((s) => s.problem);
  const complete = useWb((s) => s.posterior);
  const partial = useWb((s) => s.posteriorPartial);
  // The data fit needs only the mean: the partial one is complete for this screen.
  const post = useMemo(() => shownPosterior(complete, partial), [complete, partial]);
  const error = useWb((s) => s.errors.posterior ?? null);
  const fit = useMemo(() => {
    if (!p || !post) return null;
    const idx = Array.from({ length: p.dataCount }, (_, i) => i + 1);
    return {
      obs: [
        { type: 'scatter', mode: 'markers', x: idx, y: p.values, name: 'observed ±1σ', marker: { color: COLOURS.data, size: 5 }, error_y: { type: 'data', array: p.sigma, visible: true, color: COLOURS.data, thickness: 1 } },
        { type: 'scatter', mode: 'lines+markers', x: idx, y: post.predicted, name: 'predicted G m̃', marker: { color: COLOURS.predicted, size: 4 }, line: { width: 1 } },
      ],
      res: [
        { type: 'bar', x: idx, y: post.residuals, name: 'normalised residual', marker: { color: COLOURS.accent } },
        { type: 'scatter', mode: 'lines', x: [0.5, p.dataCount + 0.5], y: [2, 2], line: { dash: 'dash', color: '#999', width: 1 }, name: '±2', showlegend: false, hoverinfo: 'skip' },
        { type: 'scatter', mode: 'lines', x: [0.5, p.dataCount + 0.5], y: [-2, -2], line: { dash: 'dash', color: '#999', width: 1 }, showlegend: false, hoverinfo: 'skip' },
      ],
    };
  }, [p, post]);
  const layouts = useMemo(
    () =>
      p && {
        obs: { title: { text: 'Observed and predicted data', font: { size: 12 } }, xaxis: { title: { text: 'datum number' } }, yaxis: { title: { text: dLabel(p) } } },
        res: { title: { text: 'Normalised residuals (d − G m̃)/σ', font: { size: 12 } }, xaxis: { title: { text: 'datum number' } }, yaxis: { title: { text: 'residual (σ units, dimensionless)' } } },
      },
    [p],
  );
  if (!p || !layouts) return null;
  const s = post;
  const ref = post?.fitReference ?? null;
  const verdict = s && ref ? fitVerdict(s.chi2, ref) : null;
  return (
    <div className="screen" data-testid="screen-fit">
      {error && <p className="error" role="alert">Posterior: {error}</p>}
      {s && (
        <p className="chi2" data-testid="chi2" title={FIT_REFERENCE_BASIS}>
          χ² = <strong data-testid="chi2-value">{fmtNum(s.chi2)}</strong> (M = {s.dataCount} data)
          {ref && verdict ? (
            <>
              {' '}
              — expected under the model <span data-testid="chi2-expected">{fmtNum(ref.expected)}</span> = M − {fmtNum(s.dataCount - ref.expected)} resolved
              parameters; 95% interval <span data-testid="chi2-interval">[{fmtNum(ref.interval95[0])}, {fmtNum(ref.interval95[1])}]</span>, P(χ² ≥ observed) ={' '}
              <span data-testid="chi2-tail">{formatTail(ref.upperTail)}</span>{' '}
              <span data-testid="chi2-verdict" data-position={verdict.position}>
                ({verdict.text})
              </span>
            </>
          ) : (
            <> — the reference distribution of χ² follows with the uncertainty bands.</>
          )}
        </p>
      )}
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
