/**
 * A 3-D problem's one screen: three orthogonal sections (x–y, x–z, y–z) through a chosen cell, with a slider per
 * axis, for the posterior mean, standard deviation, variance reduction, prior and posterior realisations and the
 * averaging kernel (resolution row) of the chosen cell. Figures from the pure builders in ../figures/sections.ts.
 */
import { useGridView } from '../gridView.ts';
import { useMemo, useState } from 'react';
import { useShallow } from 'zustand/react/shallow';
import { useWb } from '../context.ts';
import { type FieldId, FieldPicker, fieldLabel, useFieldValues } from './fields.tsx';
import { startCell } from '../defaults.ts';
import {
  crossHairs,
  geometryTraces,
  planeExtent,
  sectionLayout,
  sectionsThrough,
  sectionTrace,
  volumeAxisNames,
  volumeColour,
  centres,
} from '../figures/sections.ts';
import { Plot } from '../Plot.tsx';
import { download } from '../session/download.ts';
import { volumeVti } from '../session/exports.ts';
import { Waiting } from './Waiting.tsx';

export function VolumeScreen() {
  const p = useGridView();
  const post = useWb((s) => s.posterior);
  const priorDraws = useWb((s) => s.priorDraws);
  const postDraws = useWb((s) => s.posteriorDraws);
  const [selected, selectCell] = useWb(useShallow((s) => [s.selectedCell, s.selectCell] as const));
  const [field, setField] = useState<FieldId>('mean');
  const shape = p ? [p.grid.shape[0], p.grid.shape[1] ?? 1, p.grid.shape[2] ?? 1] : [1, 1, 1];
  const sel = selected ?? (p ? startCell(p.grid) : 0);
  const cell: [number, number, number] = [sel % shape[0], Math.floor(sel / shape[0]) % shape[1], Math.floor(sel / (shape[0] * shape[1]))];
  const values = useFieldValues(p ? p.grid : null, field, sel);
  const figures = useMemo(() => {
    if (!p || !values) return null;
    const shown = volumeColour(values.v, values.signed, values.centre === undefined ? values.priorMean : new Float64Array(values.v.length));
    const label = fieldLabel(field);
    const heading = shown.perturbation ? `${label} − prior mean` : label;
    const centre: [number, number, number] = [centres(p.grid, 0)[cell[0]], centres(p.grid, 1)[cell[1]], centres(p.grid, 2)[cell[2]]];
    const planes = sectionsThrough(p.grid, shown.values, cell).map((s, k) => ({
      plane: s.plane,
      data: [
        sectionTrace(p.grid, s, label, shown.colour, k === 2),
        crossHairs(s, centre),
        ...geometryTraces(p.geometry ?? undefined, s.plane),
      ],
      layout: sectionLayout(p.grid, s, ''),
      extent: planeExtent(p.grid, s.plane),
    }));
    return { heading, planes };
  }, [p, values, field, cell[0], cell[1], cell[2]]);
  if (!p) return null;
  const names = volumeAxisNames(p.grid);
  const move = (axis: number, to: number) => {
    const c = [...cell];
    c[axis] = to;
    selectCell(c[0] + shape[0] * (c[1] + shape[1] * c[2]));
  };
  return (
    <div className="screen" data-testid="screen-volume">
      <div className="row toolbar">
        <FieldPicker testId="volume-field" field={field} onChange={setField} />
        {[0, 1, 2].map((a) => (
          <label key={a}>
            {names[a]} {Number(centres(p.grid, a)[cell[a]].toPrecision(6))}
            {p.grid.unit ? ` ${p.grid.unit}` : ''}{' '}
            <input
              type="range"
              data-testid={`volume-slider-${a}`}
              aria-label={`section position along ${names[a]}`}
              min={0}
              max={shape[a] - 1}
              step={1}
              value={cell[a]}
              onChange={(e) => move(a, Number(e.target.value))}
            />
          </label>
        ))}
        <button
          type="button"
          data-testid="export-vti"
          disabled={!post}
          title="The posterior mean, std, prior std, variance reduction and one prior and one posterior realisation as VTK image data (cell data)"
          onClick={() => post && download(volumeVti(p.grid, p.title, post.summary, priorDraws, postDraws))}
        >
          Export .vti
        </button>
        <span className="note">
          A 3-D grid ({shape.join(' × ')} cells) is shown as three sections through the chosen cell (dotted lines mark the other two
          sections); the survey geometry is projected onto each. Signed fields share one diverging scale about the prior mean, magnitudes
          one scale from 0, the averaging kernel one about 0. For a full 3-D viewer, export a .vti file here, or write one with priorscope
          posterior --vti FILE or priorscope sample --format vti.
        </span>
      </div>
      {figures ? (
        <div className="grid-3">
          <div className="section-heading" data-testid="volume-shown">
            {figures.heading}
          </div>
          {figures.planes.map((f) => (
            <Plot
              key={f.plane}
              id={`plot-section-${f.plane}`}
              label={`section ${f.plane}`}
              data={f.data}
              layout={f.layout}
              height={Math.round(Math.min(420, Math.max(160, (320 * f.extent[1]) / f.extent[0] + 80)))}
            />
          ))}
        </div>
      ) : (
        <Waiting what={field === 'kernel' ? 'the averaging kernel (resolution row) of the chosen cell' : 'the volume'} />
      )}
    </div>
  );
}
