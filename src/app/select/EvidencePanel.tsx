/** Evidence map over (length, variance) of one term, 1-D profiles over ν and the nugget, and the type-II fit. */
import { useEffect, useMemo, useState, type KeyboardEvent } from 'react';
import { moveMapCursor } from './mapKeys.ts';
import { useWb } from '../context.ts';
import { freshness, freshnessText } from './slice.ts';
import { Plot } from '../Plot.tsx';
import { NumberField } from '../controls.tsx';
import { hyperParameters, termLength } from '../../core/tuning/index.ts';
import type { PriorSpec } from '../../core/prior/spec.ts';
import type { ProfileParameter } from '../../core/tuning/index.ts';
import { evidenceMapTraces, logValues, mapCellAt, mapCursorTrace, profileTraces } from './traces.ts';
import { fmt } from './candidates.ts';
import { parameterLabel, withUnit } from '../labels.ts';
import { Num, TaskStatusLine } from './common.tsx';
import type { MapSettings } from './slice.ts';
import { kernelTakes } from '../../core/kernels/table.ts';

/** Default ranges around the term: lengths ×1/5 … ×5, variances ×1/100 … ×100, 16 × 16. */
export function defaultMapSettings(prior: PriorSpec, term: number): MapSettings {
  const t = prior.terms[term] ?? prior.terms[0];
  const l = termLength(t);
  return { term, lengths: { min: l / 5, max: l * 5, count: 16 }, variances: { min: t.variance / 100, max: t.variance * 100, count: 16 } };
}

const positive = (name: string) => (v: number) => (v > 0 && Number.isFinite(v) ? null : `${name} must be a finite number > 0`);
const countCheck = (name: string) => (v: number) =>
  Number.isInteger(v) && v >= 1 && v <= 200 ? null : `${name} must be an integer from 1 to 200`;

function AxisFields({
  name,
  unit,
  axis,
  onChange,
  testId,
}: {
  name: string;
  unit: string;
  axis: { min: number; max: number; count: number };
  onChange: (a: { min: number; max: number; count: number }) => void;
  testId: string;
}) {
  return (
    <span className="sel-axis">
      <strong>{name}</strong>
      <NumberField
        label="from"
        value={axis.min}
        unit={unit}
        tip={`smallest ${name} (log-spaced axis)`}
        testId={`${testId}-min`}
        validate={positive(`${name} from`)}
        onCommit={(min) => onChange({ ...axis, min })}
      />
      <NumberField
        label="to"
        value={axis.max}
        unit={unit}
        tip={`largest ${name}`}
        testId={`${testId}-max`}
        validate={(v) => positive(`${name} to`)(v) ?? (v >= axis.min ? null : `${name} to must be ≥ from (${axis.min})`)}
        onCommit={(max) => onChange({ ...axis, max })}
      />
      <NumberField
        label="values"
        value={axis.count}
        unit=""
        tip="number of log-spaced values (resolution)"
        testId={`${testId}-count`}
        validate={countCheck(`${name} values`)}
        onCommit={(count) => onChange({ ...axis, count })}
      />
    </span>
  );
}

export function EvidencePanel() {
  const p = useWb((s) => s.problem)!;
  const prior = useWb((s) => s.prior)!;
  const task = useWb((s) => s.selectTasks.evidenceMap);
  const run = useWb((s) => s.runEvidenceMap);
  const applyCell = useWb((s) => s.applyMapCell);
  const mapFresh = useWb((s) => freshness(s.selectTasks.evidenceMap, s));
  const mapApplicable = mapFresh === 'current' || mapFresh === 'earlier-prior';
  const [settings, setSettings] = useState<MapSettings>(() => defaultMapSettings(prior, 0));
  const term = prior.terms[settings.term] ?? prior.terms[0];
  const unit = p.grid.unit ?? '';
  const varUnit = p.quantity.unit ? `(${p.quantity.unit})²` : '';
  const map = task.value && task.key?.startsWith(`${p.version}:`) ? task.value : null;
  const current = useMemo(() => {
    const t = prior.terms[map?.term ?? settings.term];
    return t ? { length: termLength(t), variance: t.variance } : null;
  }, [prior, map, settings.term]);
  // Keyboard cursor over the map cells (./mapKeys.ts): arrows move it, Enter or Space applies it.
  const [cursor, setCursor] = useState<number | null>(null);
  const cursorCell = map && cursor !== null && cursor < map.logEvidence.length ? cursor : null;
  const traces = useMemo(() => {
    if (!map) return [];
    const t = evidenceMapTraces(map, current);
    return cursorCell === null ? t : [...t, mapCursorTrace(map, cursorCell)];
  }, [map, current, cursorCell]);
  const onMapKey = (e: KeyboardEvent<HTMLDivElement>) => {
    if (!map) return;
    const start = cursorCell ?? map.best?.index ?? 0;
    if ((e.key === 'Enter' || e.key === ' ') && cursorCell !== null) {
      e.preventDefault();
      applyCell(cursorCell);
      return;
    }
    const next = moveMapCursor(cursorCell === null ? start : cursorCell, e.key, map.lengths.length, map.variances.length);
    if (next === null) return;
    e.preventDefault();
    setCursor(cursorCell === null ? start : next);
  };
  const layout = useMemo(
    () => ({
      title: {
        text: `Log evidence over term ${(map?.term ?? 0) + 1}'s length and variance (click a cell to apply it)`,
        font: { size: 12 },
      },
      xaxis: { title: { text: withUnit('log₁₀ length ℓ', unit) } },
      yaxis: { title: { text: withUnit('log₁₀ variance σ²', varUnit) } },
      showlegend: true,
    }),
    [map, unit, varUnit],
  );
  const click = (x: number, y: number) => {
    if (!map) return;
    const k = mapCellAt(map, x, y);
    if (k !== null) applyCell(k);
  };
  return (
    <section className="sel-card" aria-labelledby="sel-map-h">
      <h3 id="sel-map-h">Evidence map</h3>
      <div className="row toolbar">
        <label className="inline">
          Term{' '}
          <select
            data-testid="map-term"
            value={settings.term}
            onChange={(e) => setSettings(defaultMapSettings(prior, Number(e.target.value)))}
          >
            {prior.terms.map((t, k) => (
              <option key={k} value={k}>
                {k + 1}: {t.kernel}
              </option>
            ))}
          </select>
        </label>
        <AxisFields
          name="length"
          unit={unit}
          axis={settings.lengths}
          onChange={(lengths) => setSettings({ ...settings, lengths })}
          testId="map-lengths"
        />
        <AxisFields
          name="variance"
          unit={varUnit}
          axis={settings.variances}
          onChange={(variances) => setSettings({ ...settings, variances })}
          testId="map-variances"
        />
        <button
          type="button"
          onClick={() => setSettings(defaultMapSettings(prior, settings.term))}
          title="Ranges around the current term: lengths ×1/5…×5, variances ×1/100…×100"
        >
          Ranges from prior
        </button>
        <button type="button" className="primary" data-testid="map-run" onClick={() => run(settings)} disabled={task.status === 'running'}>
          Compute map
        </button>
        <TaskStatusLine kind="evidenceMap" task={task} label="Evidence map" />
      </div>
      {term.lengths && <p className="note">Anisotropic term: the length axis is the first length; the second keeps its ratio to it.</p>}
      {map && (
        <div className={mapFresh === 'current' ? undefined : 'stale'} data-testid="map-result" data-freshness={mapFresh}>
          {freshnessText(mapFresh, task.prior, prior) && (
            <p className="stale-note" role="status" data-testid="map-stale">
              {freshnessText(mapFresh, task.prior, prior)}
            </p>
          )}
          <div
            className="map-keys"
            tabIndex={0}
            role="group"
            data-testid="map-keys"
            aria-label="Evidence map cells: arrow keys move the highlighted cell, Enter applies it to the prior"
            title="Arrow keys: move the highlighted cell (← → length, ↑ ↓ variance); Enter: apply it"
            onKeyDown={onMapKey}
            onBlur={() => setCursor(null)}
          >
            <Plot id="plot-evidence-map" label="Evidence map heat map" data={traces} layout={layout} height={360} onPointClick={click} />
          </div>
          {cursorCell !== null && (
            <p className="note" aria-live="polite" data-testid="map-cursor" data-index={cursorCell}>
              Highlighted: ℓ = {fmt(map.lengths[Math.floor(cursorCell / map.variances.length)])} {unit}, σ² ={' '}
              {fmt(map.variances[cursorCell % map.variances.length])} {varUnit}, log evidence{' '}
              {Number.isFinite(map.logEvidence[cursorCell]) ? map.logEvidence[cursorCell].toFixed(3) : 'not computed'} — Enter applies it.
            </p>
          )}
          <p className="row" data-testid="map-best">
            {map.best ? (
              <>
                Maximum: ℓ = <Num testId="map-best-length" value={map.best.length} text={fmt(map.best.length)} /> {unit}, σ² ={' '}
                <Num testId="map-best-variance" value={map.best.variance} text={fmt(map.best.variance)} /> {varUnit}, log evidence{' '}
                <Num testId="map-best-value" value={map.best.logEvidence} text={map.best.logEvidence.toFixed(3)} />
                <button
                  type="button"
                  data-testid="map-apply-best"
                  onClick={() => applyCell(map.best!.index)}
                  disabled={!mapApplicable}
                  title={mapApplicable ? undefined : (freshnessText(mapFresh, task.prior, prior) ?? undefined)}
                >
                  Apply maximum
                </button>
              </>
            ) : (
              'No cell of the map could be evaluated.'
            )}
            <span className="note">
              {map.lengths.length} × {map.variances.length} cells,{' '}
              {map.method === 'eigen' ? 'one eigendecomposition per length' : 'one Cholesky factorisation per cell'}
              {map.note ? ` (${map.note})` : ''}.{' '}
              {map.best &&
              (map.best.index % map.variances.length === 0 ||
                map.best.index % map.variances.length === map.variances.length - 1 ||
                map.best.index < map.variances.length ||
                map.best.index >= map.logEvidence.length - map.variances.length)
                ? 'The maximum lies on the edge of the map: widen the ranges.'
                : ''}
              {task.status === 'cancelled' ? ' Cancelled: some rows are missing.' : ''}
            </span>
          </p>
        </div>
      )}
      <ProfilePanel />
      <FitPanel />
    </section>
  );
}

function ProfilePanel() {
  const prior = useWb((s) => s.prior)!;
  const p = useWb((s) => s.problem)!;
  const task = useWb((s) => s.selectTasks.evidenceProfile);
  const run = useWb((s) => s.runProfile);
  const maternTerm = prior.terms.findIndex((t) => kernelTakes(t.kernel, 'nu'));
  const [kind, setKind] = useState<'nu' | 'nugget'>('nugget');
  const sill = prior.terms.reduce((a, t) => a + t.variance, 0) || 1;
  const [range, setRange] = useState({ min: 1e-6 * sill, max: sill, count: 25 });
  useEffect(() => {
    setRange(kind === 'nu' ? { min: 0.3, max: 8, count: 12 } : { min: 1e-6 * sill, max: sill, count: 25 });
    // eslint-disable-next-line react-hooks/exhaustive-deps
  }, [kind]);
  const value = task.value && task.key?.startsWith(`${p.version}:`) ? task.value : null;
  const profileFresh = useWb((s) => freshness(s.selectTasks.evidenceProfile, s));
  const traces = useMemo(() => (value ? profileTraces(value) : []), [value]);
  const layout = useMemo(
    () =>
      value && {
        title: {
          text: value.parameter === 'nu' ? 'Log evidence against the Matérn smoothness ν' : 'Log evidence against the nugget',
          font: { size: 12 },
        },
        xaxis: {
          type: 'log',
          title: {
            text: value.parameter === 'nu' ? 'ν (dimensionless)' : withUnit('nugget', p.quantity.unit ? `(${p.quantity.unit})²` : ''),
          },
        },
        yaxis: { title: { text: 'log p(d)' } },
      },
    [value, p],
  );
  const go = () => {
    const which: ProfileParameter = kind === 'nu' ? { parameter: 'nu', term: maternTerm } : { parameter: 'nugget' };
    run(which, logValues(range.min, range.max, range.count));
  };
  return (
    <div className="sel-sub">
      <h4>Profile</h4>
      <div className="row toolbar">
        <label className="inline">
          over{' '}
          <select data-testid="profile-kind" value={kind} onChange={(e) => setKind(e.target.value as 'nu' | 'nugget')}>
            <option value="nugget">nugget</option>
            <option value="nu" disabled={maternTerm < 0}>
              ν of term {maternTerm + 1}
              {maternTerm < 0 ? ' (needs a Matérn term)' : ''}
            </option>
          </select>
        </label>
        <AxisFields name={kind === 'nu' ? 'ν' : 'nugget'} unit="" axis={range} onChange={setRange} testId="profile" />
        <button
          type="button"
          data-testid="profile-run"
          onClick={go}
          disabled={task.status === 'running' || (kind === 'nu' && maternTerm < 0)}
        >
          Compute profile
        </button>
        <TaskStatusLine kind="evidenceProfile" task={task} label="Profile" />
      </div>
      {value && (
        <div data-testid="profile-result" className={profileFresh === 'current' ? undefined : 'stale'} data-freshness={profileFresh}>
          {freshnessText(profileFresh) && (
            <p className="stale-note" role="status" data-testid="profile-stale">
              {freshnessText(profileFresh, task.prior, prior)}
            </p>
          )}
          {layout && <Plot id="plot-evidence-profile" label="Evidence profile" data={traces} layout={layout} height={260} />}
          {value.best && (
            <p className="note" data-testid="profile-best">
              Largest at {value.parameter === 'nu' ? 'ν' : 'nugget'} = {fmt(value.best.value)} (log evidence{' '}
              {value.best.logEvidence.toFixed(3)}); the rest of the prior held fixed.
            </p>
          )}
        </div>
      )}
    </div>
  );
}

function FitPanel() {
  const prior = useWb((s) => s.prior)!;
  const p = useWb((s) => s.problem)!;
  const task = useWb((s) => s.selectTasks.typeII);
  const run = useWb((s) => s.runFit);
  const apply = useWb((s) => s.applyTuned);
  const fitFresh = useWb((s) => freshness(s.selectTasks.typeII, s));
  const fitApplicable = fitFresh === 'current' || fitFresh === 'earlier-prior';
  const names = useMemo(() => {
    try {
      return hyperParameters(prior).map((h) => h.name);
    } catch {
      return [];
    }
  }, [prior]);
  const [fitNugget, setFitNugget] = useState(false);
  const [fixedExtra, setFixedExtra] = useState<string[]>([]);
  const fixed = names.filter((n) => (n === 'nugget' && !fitNugget) || fixedExtra.includes(n));
  const value = task.value && task.key?.startsWith(`${p.version}:`) ? task.value : null;
  return (
    <div className="sel-sub">
      <h4>Best by evidence (type-II maximum likelihood)</h4>
      <div className="row toolbar">
        <span className="note">Free parameters:</span>
        {names.map((n) =>
          n === 'nugget' ? (
            <label
              key={n}
              className="inline"
              title="The data often cannot identify the nugget: the fit then drives it towards zero. Fixed unless ticked."
            >
              <input type="checkbox" data-testid="fit-nugget" checked={fitNugget} onChange={(e) => setFitNugget(e.target.checked)} /> nugget
            </label>
          ) : (
            <label key={n} className="inline">
              <input
                type="checkbox"
                data-testid={`fit-free-${n}`}
                checked={!fixedExtra.includes(n)}
                onChange={(e) => setFixedExtra(e.target.checked ? fixedExtra.filter((x) => x !== n) : [...fixedExtra, n])}
              />{' '}
              {parameterLabel(n)}
            </label>
          ),
        )}
        {!names.includes('nugget') && <span className="note">(nugget 0 is not fitted; set a nugget &gt; 0 to let the fit move it)</span>}
        <button
          type="button"
          className="primary"
          data-testid="fit-run"
          onClick={() => run(fixed)}
          disabled={task.status === 'running' || fixed.length === names.length}
        >
          Find best by evidence
        </button>
        <TaskStatusLine kind="typeII" task={task} label="Fit" />
      </div>
      {value && (
        <div data-testid="fit-result" className={fitFresh === 'current' ? undefined : 'stale'} data-freshness={fitFresh}>
          {freshnessText(fitFresh, task.prior, prior) && (
            <p className="stale-note" role="status" data-testid="fit-stale">
              {freshnessText(fitFresh, task.prior, prior)}
            </p>
          )}
          <p>
            Log evidence <Num testId="fit-start-logev" value={value.startLogEvidence} text={value.startLogEvidence.toFixed(3)} /> at the
            start → <Num testId="fit-logev" value={value.logEvidence} text={value.logEvidence.toFixed(3)} /> at the optimum (
            {value.iterations} iterations, {value.converged ? 'converged' : 'not converged'}){value.note ? `; ${value.note}` : ''}.{' '}
            <button
              type="button"
              className="primary"
              data-testid="fit-apply"
              onClick={() => apply(value.prior)}
              disabled={value.conditioning?.usable === false || !fitApplicable}
              title={
                !fitApplicable
                  ? (freshnessText(fitFresh, task.prior, prior) ?? undefined)
                  : value.conditioning?.usable === false
                    ? 'This optimum fails the positive-definiteness check with condition number ≤ 1e10, so it is not offered'
                    : undefined
              }
            >
              Apply optimum
            </button>
          </p>
          {value.conditioning && (
            <p className="note" data-testid="fit-conditioning">
              Prior at the optimum (the workbench&apos;s check):{' '}
              {value.conditioning.usable
                ? `positive definite, condition number ${fmt(value.conditioning.conditionNumber, 3)} (within 1e10)`
                : value.conditioning.positiveDefinite
                  ? `nearly singular, condition number ${fmt(value.conditioning.conditionNumber, 3)} (above 1e10)`
                  : value.conditioning.verdict === 'not-decided'
                    ? 'positive definiteness not decided'
                    : 'not positive definite'}
              {value.conditioning.nuggetAtFloor
                ? '; the nugget sits on the smallest value that guarantees a condition number within 1e10'
                : ''}
              .
            </p>
          )}
          <table className="sel-table">
            <thead>
              <tr>
                <th>parameter</th>
                <th>start</th>
                <th>optimum</th>
                <th title="curvature-based standard error of the optimisation coordinate (natural log of the value, or degrees for an angle)">
                  standard error
                </th>
                <th>≈95% interval</th>
              </tr>
            </thead>
            <tbody>
              {value.parameters.map((q) => (
                <tr key={q.name}>
                  <td title={q.name}>{parameterLabel(q.name)}</td>
                  <td>{fmt(q.start)}</td>
                  <td>
                    <Num value={q.value} text={fmt(q.value)} />
                  </td>
                  <td>
                    {fmt(q.standardError, 3)} {q.scale === 'log' ? '(log units)' : '(degrees)'}
                  </td>
                  <td>
                    [{fmt(q.interval95[0], 3)}, {fmt(q.interval95[1], 3)}]
                  </td>
                </tr>
              ))}
            </tbody>
          </table>
          {value.parameters.some((q) => !Number.isFinite(q.standardError)) && (
            <p className="note">
              A NaN standard error means the surface is flat or not curved downwards there: the data do not pin that parameter down.
            </p>
          )}
        </div>
      )}
    </div>
  );
}
