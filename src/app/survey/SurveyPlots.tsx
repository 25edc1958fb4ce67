/**
 * The survey in place on the screens: the data fit against position (point data) or the rays
 * coloured by residual beside each datum's misfit (path data), and the Problem screen's data
 * profile and grid overlay. Figures come from ./figures.ts.
 */
import { useMemo } from 'react';
import type { GridView } from '../gridView.ts';
import { Plot } from '../Plot.tsx';
import { gridOverlayTraces, misfitTraces, profileLayouts, profileTraces, rayLayouts, rayTraces } from './figures.ts';

interface Fit {
  readonly predicted: ArrayLike<number>;
  readonly residuals: ArrayLike<number>;
}

/** The fit's survey views, or nothing when the problem has no geometry. */
export function SurveyFitPlots({ p, fit }: { p: GridView; fit: Fit }) {
  const figs = useMemo(() => {
    const g = p.geometry;
    if (g?.kind === 'points') {
      const t = profileTraces(p, g.positions, fit);
      const l = profileLayouts(p, t.axis);
      return { kind: 'points' as const, a: t.data, b: t.residuals, la: l.data, lb: l.residuals };
    }
    if (g?.kind === 'paths') {
      const l = rayLayouts(p.grid);
      return {
        kind: 'paths' as const,
        a: [...gridOverlayTraces(p.grid, null), ...rayTraces(p.grid, g, fit.residuals)],
        b: misfitTraces(fit.residuals),
        la: l.rays,
        lb: l.misfit,
      };
    }
    return null;
  }, [p, fit]);
  if (!figs) return null;
  if (figs.kind === 'points') {
    return (
      <div className="grid-2" data-testid="survey-profile">
        <Plot
          id="plot-profile"
          label="Observed and predicted data against where they were measured"
          data={figs.a}
          layout={figs.la}
          height={300}
        />
        <Plot
          id="plot-profile-residuals"
          label="Normalised residuals against where the data were measured"
          data={figs.b}
          layout={figs.lb}
          height={300}
        />
      </div>
    );
  }
  return (
    <div className="grid-2" data-testid="survey-rays">
      <Plot id="plot-rays" label="Rays over the section coloured by normalised residual" data={figs.a} layout={figs.la} height={420} />
      <Plot id="plot-misfit" label="Misfit of each datum against its number" data={figs.b} layout={figs.lb} height={420} />
    </div>
  );
}
