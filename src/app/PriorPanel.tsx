/** The left panel: mean model, covariance terms (add / remove / reorder), nugget. */
import { PerCellFields } from './prior/PerCellFields.tsx';
import { KERNEL_NAMES, type KernelName, type Term } from '../core/kernels/spec.ts';
import { kernelDefinition, termSmoothness } from '../core/kernels/table.ts';
import type { MeanSpec, PriorSpec } from '../core/prior/spec.ts';
import { MAX_PINNED } from './select/candidates.ts';
import { gridDimension } from '../core/grid/grid.ts';
import { useWb } from './context.ts';
import { LogSlider, NumberField } from './controls.tsx';
import { noteInteraction } from './interaction.ts';
import { axisNames } from './labels.ts';
import { formatNumber } from '../core/format.ts';
import type { ProblemView } from '../worker/protocol.ts';
import { geometryScale } from '../core/problems/geometry.ts';
import { MAX_TERMS } from '../core/prior/validate.ts';

function lengthRange(problem: ProblemView): [number, number] {
  const { extent, spacing } = geometryScale(problem.grid);
  return [spacing / 10, extent * 10];
}

export function PriorPanel() {
  const prior = useWb((s) => s.prior);
  const problem = useWb((s) => s.problem);
  const addTerm = useWb((s) => s.addTerm);
  const setNugget = useWb((s) => s.setNugget);
  const continuous = useWb((s) => s.continuousEdit);
  const resetPrior = useWb((s) => s.resetPrior);
  if (!prior || !problem) return <aside className="prior-panel" aria-label="Prior" />;
  const unit = problem.quantity.unit;
  const varUnit = unit ? `(${unit})²` : '';
  const refVar = Math.max(...prior.terms.map((t) => t.variance), problem.startPrior?.terms[0]?.variance ?? 1, 1e-12);
  return (
    <aside className="prior-panel" aria-label="Prior">
      <h2>Prior</h2>
      <PlausibilityWarning />
      <MeanEditor mean={prior.mean} problem={problem} />
      <PerCellFields />
      <ol className="terms" aria-label="Covariance terms">
        {prior.terms.map((t, i) => (
          <TermEditor key={i} index={i} term={t} count={prior.terms.length} problem={problem} refVar={refVar} />
        ))}
      </ol>
      <div className="row">
        <button
          type="button"
          data-testid="add-term"
          onClick={addTerm}
          disabled={prior.terms.length >= MAX_TERMS}
          title={
            prior.terms.length >= MAX_TERMS ? `A prior has at most ${MAX_TERMS} covariance terms` : 'Add a covariance term: Cm += σ² ρ(h)'
          }
        >
          + Add term
        </button>
        <button type="button" data-testid="reset-prior" onClick={resetPrior} title="Back to the problem's starting prior">
          Reset
        </button>
        <PinButton />
      </div>
      {problem.startRule && (
        <details className="start-rule" data-testid="start-rule">
          <summary>How the starting prior was chosen</summary>
          <p className="note">{problem.startRule}</p>
        </details>
      )}
      <fieldset>
        <legend>Nugget</legend>
        <LogSlider
          continuous={continuous}
          label="Nugget"
          value={prior.nugget ?? 0}
          min={refVar * 1e-12}
          max={refVar * 10}
          allowZero
          unit={varUnit}
          tip="White variance on the diagonal: Cm[i][i] += nugget (leftmost position = 0)"
          testId="nugget"
          onChange={setNugget}
        />
      </fieldset>
    </aside>
  );
}

/**
 * Warns when the data are implausible under the current prior: the prior predictive statistic
 * q = rᵀK⁻¹r (r = d − G m₀, K = G Cm Gᵀ + Cd) of the newest complete posterior lies outside the
 * central 95 % interval of χ²_M (src/core/inverse/posterior.ts and structured.ts compute both).
 * Shown only while that posterior belongs to the current prior and problem.
 */
export function PlausibilityWarning() {
  const text = useWb((s) => {
    const post = s.posterior;
    const current = s.problem !== null && s.computedFor.posterior === `${s.problem.version}:${s.priorRevision}` && !s.busy.posterior;
    return current && post ? plausibilityText(post.summary.dataMisfit, post.summary.reducedMisfitInterval95, post.summary.dataCount) : null;
  });
  if (!text) return null;
  return (
    <div className="plausibility-warning" role="alert" data-testid="plausibility-warning">
      {text}
    </div>
  );
}

/**
 * The warning's words, or null when q/M lies inside its interval (or is not available). Pure, for
 * the unit test (test/app/plausibility.test.ts).
 */
export function plausibilityText(q: number | undefined, interval: readonly [number, number] | undefined, m: number): string | null {
  if (q === undefined || interval === undefined || !Number.isFinite(q)) return null;
  const ratio = q / m;
  if (ratio >= interval[0] && ratio <= interval[1]) return null;
  const high = ratio > interval[1];
  return (
    `The data are implausible under this prior: q/M = ${formatNumber(ratio, 3)} with q = rᵀK⁻¹r, ` +
    `outside the 95 % range [${formatNumber(interval[0], 3)}, ${formatNumber(interval[1], 3)}] of χ²_M/M (M = ${m}). ` +
    (high
      ? 'The data vary more than the prior and the errors allow: the variance may be too small, the mean off, or the errors understated. '
      : 'The data vary less than the prior and the errors predict: the variance may be too large, or the errors overstated. ') +
    'This rests on the prior predictive check: with r = d − G m₀ and K = G Cm Gᵀ + Cd, q follows χ²_M when the Gaussian prior and the stated data errors are right; ' +
    'a correct prior lands outside this range 1 time in 20.'
  );
}

/**
 * Keep the current prior as a candidate for side-by-side comparison on the Choose prior screen
 * (the candidates live in the select slice, src/app/select/slice.ts). Disabled when the list is
 * full or the current prior is already pinned (same spec).
 */
function PinButton() {
  const pin = useWb((s) => s.pinPrior);
  const count = useWb((s) => s.candidates.length);
  const pinned = useWb((s) => s.prior !== null && s.candidates.some((c) => samePrior(c.prior, s.prior!)));
  const full = count >= MAX_PINNED;
  const title = full
    ? `At most ${MAX_PINNED} candidates; remove one on the Choose prior screen first`
    : pinned
      ? 'This prior is already pinned'
      : 'Keep this prior as a candidate to compare on the Choose prior screen';
  return (
    <button
      type="button"
      data-testid="pin-candidate"
      onClick={pin}
      disabled={full || pinned}
      title={title}
      aria-label={`Pin as candidate (${count} of ${MAX_PINNED} pinned)`}
    >
      Pin as candidate{' '}
      <span className="pin-count">
        {count}/{MAX_PINNED}
      </span>
    </button>
  );
}

/** Two prior specs are the same when their JSON forms are (specs are plain JSON-able data). */
export function samePrior(a: PriorSpec, b: PriorSpec): boolean {
  return a === b || JSON.stringify(a) === JSON.stringify(b);
}

function MeanEditor({ mean, problem }: { mean: MeanSpec; problem: ProblemView }) {
  const setMean = useWb((s) => s.setMean);
  const unit = problem.quantity.unit;
  const lenUnit = problem.grid.unit ?? '';
  const dim = gridDimension(problem.grid);
  const kind = 'constant' in mean ? 'constant' : 'trend' in mean ? 'trend' : 'values';
  const axes = axisNames(problem.grid);
  return (
    <fieldset>
      <legend>Mean m₀</legend>
      <label className="inline">
        Form{' '}
        <select
          data-testid="mean-kind"
          value={kind}
          title={`Constant m₀ = c, or linear trend m₀ = a + b·${axes[0]}${dim === 2 ? ` + c·${axes[1]}` : ''}`}
          onChange={(e) => {
            const v = e.target.value;
            if (v === 'constant') setMean({ constant: 'trend' in mean ? mean.trend.intercept : 0 });
            else if (v === 'trend') {
              const c = 'constant' in mean ? mean.constant : 0;
              setMean({ trend: { intercept: c, slope: dim === 2 ? [0, 0] : [0] } });
            }
          }}
        >
          <option value="constant">constant</option>
          <option value="trend">linear trend</option>
          {kind === 'values' && <option value="values">from file (per cell)</option>}
        </select>
      </label>
      {'constant' in mean && (
        <NumberField
          label="Value c"
          value={mean.constant}
          unit={unit}
          tip="m₀ = c in every cell"
          testId="mean-constant"
          validate={() => null}
          onCommit={(v) => setMean({ constant: v })}
        />
      )}
      {'trend' in mean && (
        <>
          <NumberField
            label="Intercept a"
            value={mean.trend.intercept}
            unit={unit}
            tip={`m₀ = a + b·${axes[0]}${dim === 2 ? ` + c·${axes[1]}` : ''}, at absolute coordinates`}
            testId="mean-intercept"
            validate={() => null}
            onCommit={(v) => setMean({ trend: { ...mean.trend, intercept: v } })}
          />
          {mean.trend.slope.map((b, k) => (
            <NumberField
              key={k}
              label={k === 0 ? `Slope b (${axes[0]})` : `Slope c (${axes[1]})`}
              value={b}
              unit={unit && lenUnit ? `${unit}/${lenUnit}` : unit ? `${unit} per length unit` : lenUnit ? `per ${lenUnit}` : ''}
              tip="Change of m₀ per unit distance"
              testId={`mean-slope-${k}`}
              validate={() => null}
              onCommit={(v) => {
                const slope = [...mean.trend.slope];
                slope[k] = v;
                setMean({ trend: { ...mean.trend, slope } });
              }}
            />
          ))}
        </>
      )}
    </fieldset>
  );
}

function TermEditor({
  index,
  term,
  count,
  problem,
  refVar,
}: {
  index: number;
  term: Term;
  count: number;
  problem: ProblemView;
  refVar: number;
}) {
  const updateTerm = useWb((s) => s.updateTerm);
  const setKernel = useWb((s) => s.setKernel);
  const setAnisotropic = useWb((s) => s.setAnisotropic);
  const removeTerm = useWb((s) => s.removeTerm);
  const moveTerm = useWb((s) => s.moveTerm);
  const nu = termSmoothness(term);
  const continuous = useWb((s) => s.continuousEdit);
  const unit = problem.quantity.unit;
  const varUnit = unit ? `(${unit})²` : '';
  const lenUnit = problem.grid.unit ?? '';
  const [lo, hi] = lengthRange(problem);
  const dim = gridDimension(problem.grid);
  const [a0, a1 = 'y'] = axisNames(problem.grid);
  const angleTip = `θ in degrees, turning from +${a0} towards +${a1} to the first axis of the ellipse. Maps draw ${a1} increasing downwards, so on screen a positive θ tilts the ellipse clockwise (down to the right).`;
  const t = `term-${index}`;
  return (
    <li className="term" data-testid={t} aria-label={`Term ${index + 1}`}>
      <div className="term-head">
        <span className="term-no">{index + 1}</span>
        <select
          aria-label={`Kernel of term ${index + 1}`}
          data-testid={`${t}-kernel`}
          value={term.kernel}
          title={kernelDefinition(term.kernel).formula}
          onChange={(e) => setKernel(index, e.target.value as KernelName)}
        >
          {KERNEL_NAMES.map((k) => (
            <option key={k} value={k} title={kernelDefinition(k).formula}>
              {kernelDefinition(k).label}
            </option>
          ))}
        </select>
        <button
          type="button"
          aria-label={`Move term ${index + 1} up`}
          title="Move up"
          disabled={index === 0}
          onClick={() => moveTerm(index, -1)}
        >
          ↑
        </button>
        <button
          type="button"
          aria-label={`Move term ${index + 1} down`}
          title="Move down"
          disabled={index === count - 1}
          onClick={() => moveTerm(index, 1)}
        >
          ↓
        </button>
        <button
          type="button"
          aria-label={`Remove term ${index + 1}`}
          title="Remove this term"
          data-testid={`${t}-remove`}
          onClick={() => removeTerm(index)}
        >
          ×
        </button>
      </div>
      <LogSlider
        continuous={continuous}
        label="Variance σ²"
        value={term.variance}
        min={refVar * 1e-4}
        max={refVar * 1e3}
        unit={varUnit}
        tip="Contribution σ² ρ(h) to Cm; σ² is the variance of this term (its sill)"
        testId={`${t}-variance`}
        onChange={(v) => updateTerm(index, { variance: v })}
      />
      {dim === 2 && (
        <label className="inline" title="Different lengths along two rotated axes: h = √((u/ℓ₁)² + (v/ℓ₂)²)">
          <input
            type="checkbox"
            data-testid={`${t}-anisotropic`}
            checked={term.lengths !== undefined}
            onChange={(e) => setAnisotropic(index, e.target.checked)}
          />{' '}
          anisotropic
        </label>
      )}
      {term.lengths ? (
        <>
          <LogSlider
            continuous={continuous}
            label="Length ℓ₁"
            value={term.lengths[0]}
            min={lo}
            max={hi}
            unit={lenUnit}
            tip="Length along the first (rotated) axis: u = cos θ·dx + sin θ·dy, h = √((u/ℓ₁)² + (v/ℓ₂)²)"
            testId={`${t}-length1`}
            onChange={(v) => updateTerm(index, { lengths: [v, term.lengths[1]] })}
          />
          <LogSlider
            continuous={continuous}
            label="Length ℓ₂"
            value={term.lengths[1]}
            min={lo}
            max={hi}
            unit={lenUnit}
            tip="Length across the first axis: v = −sin θ·dx + cos θ·dy"
            testId={`${t}-length2`}
            onChange={(v) => updateTerm(index, { lengths: [term.lengths[0], v] })}
          />
          <div className="log-slider">
            <label htmlFor={`${t}-angle`} title={angleTip}>
              Angle θ
            </label>
            <input
              id={`${t}-angle`}
              type="range"
              min={-90}
              max={90}
              step={1}
              value={term.angle ?? 0}
              title={angleTip}
              data-testid={`${t}-angle-slider`}
              onChange={(e) => {
                noteInteraction();
                updateTerm(index, { angle: Number(e.target.value) });
              }}
            />
            <NumberField
              label="Angle θ"
              value={term.angle ?? 0}
              unit="°"
              tip={angleTip}
              testId={`${t}-angle-input`}
              compact
              validate={(v) => (v < -180 || v > 180 ? 'Angle must be between −180° and 180°' : null)}
              onCommit={(v) => updateTerm(index, { angle: v })}
            />
          </div>
        </>
      ) : (
        <LogSlider
          continuous={continuous}
          label="Length ℓ"
          value={term.length}
          min={lo}
          max={hi}
          unit={lenUnit}
          tip="Correlation length: h = r/ℓ, r = distance between two cells"
          testId={`${t}-length`}
          onChange={(v) => updateTerm(index, { length: v })}
        />
      )}
      {nu !== undefined && (
        <LogSlider
          continuous={continuous}
          label="Smoothness ν"
          value={nu}
          min={0.1}
          max={20}
          unit=""
          tip="Matérn ν: realisations are ⌈ν⌉−1 times differentiable; ν = ½ is exponential, ν → ∞ Gaussian"
          testId={`${t}-nu`}
          onChange={(v) => updateTerm(index, { nu: v })}
        />
      )}
    </li>
  );
}
