/**
 * A cell-list problem's one screen (the user's own mesh, given by its cell centres): the field against the
 * coordinate (1-D), a map of the centres coloured by value (2-D), or three slabs through the cloud with a slider per
 * axis (3-D), for the posterior mean, standard deviation, variance reduction, the prior correlation with the chosen
 * cell, a prior and a posterior realisation and the chosen cell's averaging kernel. Figures from the pure builders in
 * ../figures/cells.ts. Click a marker to choose its cell.
 */
import { useMemo, useState } from 'react';
import { useShallow } from 'zustand/react/shallow';
import { isCellList } from '../../core/grid/grid.ts';
import { useWb } from '../context.ts';
import { type FieldId, FieldPicker, fieldLabel, useFieldValues } from './fields.tsx';
import { startCell } from '../defaults.ts';
import {
  chosenTrace,
  cloudAxisNames,
  cloudExtent,
  cloudLayout,
  cloudTrace,
  lineLayout,
  lineTrace,
  nearestAmong,
  nearestCell,
  nearestInPlane,
  slabHalfWidth,
  slabMembers,
  slabPositions,
  slabTitle,
} from '../figures/cells.ts';
import { geometryTraces, planeAxes, type SectionPlane, volumeColour } from '../figures/sections.ts';
import { withUnit } from '../labels.ts';
import { Plot } from '../Plot.tsx';
import { download } from '../session/download.ts';
import { posteriorCsv } from '../session/exports.ts';
import { Waiting } from './Waiting.tsx';

export function CellsScreen() {
  const cells = useWb((s) => (s.problem && isCellList(s.problem.grid) ? s.problem.grid : null));
  const geometry = useWb((s) => s.problem?.geometry ?? undefined);
  const unitQ = useWb((s) => s.problem?.quantity.unit ?? '');
  const post = useWb((s) => s.posterior);
  const [selected, selectCell] = useWb(useShallow((s) => [s.selectedCell, s.selectCell] as const));
  const [field, setField] = useState<FieldId>('mean');
  const sel = selected ?? (cells ? startCell(cells) : 0);
  // Slab positions (3-D): start through the chosen cell; a slider moves one, and the chosen cell follows.
  const positions = useMemo(() => (cells ? [0, 1, 2].map((k) => slabPositions(cells, k)) : [[], [], []]), [cells]);
  const [at, setAt] = useState<[number, number, number] | null>(null);
  const where: [number, number, number] = cells ? (at ?? [cells.x[sel] ?? 0, cells.y[sel] ?? 0, cells.z[sel] ?? 0]) : [0, 0, 0];
  const values = useFieldValues(cells, field, sel);
  const label = fieldLabel(field);
  const figures = useMemo(() => {
    if (!cells || !values) return null;
    const shown = volumeColour(values.v, values.signed, values.centre === undefined ? values.priorMean : new Float64Array(values.v.length));
    const heading = shown.perturbation ? `${label} − prior mean` : label;
    if (cells.dim === 1) {
      return {
        kind: 'line' as const,
        data: [lineTrace(cells, shown.values, label)],
        layout: lineLayout(cells, heading, withUnit(label, unitQ)),
      };
    }
    const half = slabHalfWidth(cells);
    const planes: readonly SectionPlane[] = cells.dim === 2 ? ['xy'] : ['xy', 'xz', 'yz'];
    return {
      kind: 'planes' as const,
      heading,
      planes: planes.map((plane, k) => {
        const f = planeAxes(plane)[2];
        const members = slabMembers(cells, f, where[f], half);
        return {
          plane,
          members,
          data: [
            cloudTrace(cells, plane, members, shown.values, label, shown.colour, k === planes.length - 1),
            chosenTrace(cells, plane, sel),
            ...geometryTraces(geometry, plane),
          ],
          // Three slabs side by side leave room for the slab alone (the field is named in the list above them).
          layout: cloudLayout(
            cells,
            plane,
            planes.length === 1
              ? `${heading}: ${slabTitle(cells, plane, where[f], half, members.length)}`
              : slabTitle(cells, plane, where[f], half, members.length),
          ),
          extent: cloudExtent(cells, plane),
        };
      }),
    };
  }, [cells, values, label, unitQ, geometry, sel, where[0], where[1], where[2]]);
  if (!cells) return null;
  const names = cloudAxisNames(cells);
  // A slider moves one slab and chooses, among the cells in it, the one nearest the chosen cell's other two
  // coordinates; the other two slabs then pass through that cell, so it lies in all three.
  const moveSlab = (axis: number, k: number) => {
    const pos = positions[axis][k];
    const members = slabMembers(cells, axis, pos, slabHalfWidth(cells));
    const target = [cells.x[sel], cells.y[sel], cells.z[sel]];
    target[axis] = pos;
    const c = members.length > 0 ? nearestAmong(cells, members, target) : nearestCell(cells, target);
    const next: [number, number, number] = [cells.x[c], cells.y[c], cells.z[c]];
    next[axis] = pos;
    setAt(next);
    selectCell(c);
  };
  const n = cells.x.length;
  return (
    <div className="screen" data-testid="screen-cells">
      <div className="row toolbar">
        <FieldPicker testId="cells-field" field={field} onChange={setField} />
        {cells.dim === 3 &&
          [0, 1, 2].map((a) => {
            const list = positions[a];
            const k = Math.max(
              0,
              list.findIndex((v) => v >= where[a]),
            );
            return (
              <label key={a}>
                {names[a]} {Number(where[a].toPrecision(6))}
                {cells.unit ? ` ${cells.unit}` : ''}{' '}
                <input
                  type="range"
                  data-testid={`cells-slider-${a}`}
                  aria-label={`slab position along ${names[a]}`}
                  min={0}
                  max={list.length - 1}
                  step={1}
                  value={k}
                  onChange={(e) => moveSlab(a, Number(e.target.value))}
                />
              </label>
            );
          })}
        <span data-testid="cells-chosen">
          chosen cell {sel} at (
          {[cells.x[sel], cells.y[sel], cells.z[sel]]
            .slice(0, cells.dim)
            .map((v) => Number(v.toPrecision(6)))
            .join(', ')}
          ){cells.unit ? ` ${cells.unit}` : ''}
        </span>
        <button
          type="button"
          data-testid="export-cells-csv"
          disabled={!post}
          title="Cell centres with the posterior mean and standard deviation, one row per cell in the order of cells.centres"
          onClick={() => post && download(posteriorCsv(cells, post.summary))}
        >
          Export CSV
        </button>
        <span className="note">
          Your own mesh: {n} cells given by their centres ({cells.dim}-D), on the dense route (Cm of N² numbers).{' '}
          {cells.dim === 2 && 'Each marker is a cell centre coloured by its value. '}
          {cells.dim === 3 &&
            'Each map is a slab through the cloud: the centres within one typical cell size of the position on the third axis, projected onto the plane; a slider moves a slab and chooses the nearest cell. '}
          Click a marker to choose its cell (for the averaging kernel and the correlation). Prior selection studies (evidence map,
          candidates) and the report run on regular grids; for a cell list use priorscope posterior, check and sample.
        </span>
      </div>
      {figures ? (
        figures.kind === 'line' ? (
          <Plot
            id="plot-cells-line"
            label={`${label} against position`}
            data={figures.data}
            layout={figures.layout}
            height={340}
            onPointClick={(x) => selectCell(nearestCell(cells, [x]))}
          />
        ) : (
          <div className={figures.planes.length === 1 ? undefined : 'grid-3'}>
            {figures.planes.length > 1 && (
              <div className="section-heading" data-testid="cells-shown">
                {figures.heading}
              </div>
            )}
            {figures.planes.map((f) => (
              <Plot
                key={f.plane}
                id={`plot-cells-${f.plane}`}
                label={`cells ${f.plane}`}
                data={f.data}
                layout={f.layout}
                height={Math.round(
                  Math.min(520, Math.max(180, ((figures.planes.length === 1 ? 520 : 320) * f.extent[1]) / f.extent[0] + 80)),
                )}
                onPointClick={(u, v) => {
                  const c = nearestInPlane(cells, f.plane, f.members, u, v);
                  if (c !== null) {
                    selectCell(c);
                    setAt([cells.x[c], cells.y[c], cells.z[c]]);
                  }
                }}
              />
            ))}
          </div>
        )
      ) : (
        <Waiting what={field === 'kernel' ? 'the averaging kernel (resolution row) of the chosen cell' : 'the cells'} />
      )}
    </div>
  );
}
