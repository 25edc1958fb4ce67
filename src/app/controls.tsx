/** Form controls: a log-scale slider paired with a typed numeric input, and a plain number field. */
import { useEffect, useId, useState } from 'react';
import { noteInteraction } from './interaction.ts';
import { formatNumber } from '../core/format.ts';

/** Significant digits a number field shows (the stored value keeps all of its digits until edited). */
export const FIELD_DIGITS = 4;

/**
 * The text a number field shows for `value`: integers below 1e15 in full (seeds, cell indices),
 * anything else with {@link FIELD_DIGITS} significant digits, the exponent always kept.
 */
export function fieldText(value: number): string {
  if (Number.isInteger(value) && Math.abs(value) < 1e15) return String(value);
  return formatNumber(value, FIELD_DIGITS);
}

/** Slider positions per decade-range (integer steps keep keyboard arrows useful). */
const STEPS = 400;

/** Round to 4 significant digits so slider values read cleanly. */
export function roundSignificant(x: number, digits = 4): number {
  if (x === 0 || !Number.isFinite(x)) return x;
  const p = 10 ** (digits - 1 - Math.floor(Math.log10(Math.abs(x))));
  return Math.round(x * p) / p;
}

export function toSlider(value: number, min: number, max: number): number {
  const v = Math.min(max, Math.max(min, value));
  return Math.round((STEPS * Math.log(v / min)) / Math.log(max / min));
}

export function fromSlider(pos: number, min: number, max: number): number {
  return roundSignificant(min * (max / min) ** (pos / STEPS));
}

interface NumberFieldProps {
  label: string;
  value: number;
  unit: string;
  /** Formula or meaning, shown as a tooltip. */
  tip: string;
  testId: string;
  /** Returns an error message, or null when the value is acceptable. */
  validate: (v: number) => string | null;
  onCommit: (v: number) => void;
  step?: number;
  /** Hide the visible label (when a slider beside it already shows it). */
  compact?: boolean;
}

/** A typed numeric input that commits on Enter or when it loses focus; invalid text is explained. */
export function NumberField({ label, value, unit, tip, testId, validate, onCommit, step, compact }: NumberFieldProps) {
  const id = useId();
  const shown = fieldText(value);
  const [draft, setDraft] = useState(shown);
  const [error, setError] = useState<string | null>(null);
  useEffect(() => {
    setDraft(fieldText(value));
    setError(null);
  }, [value]);
  const commit = () => {
    const text = draft.trim();
    // Unedited: keep the stored value with all of its digits (the field shows it rounded).
    if (text === shown) {
      setError(null);
      return;
    }
    const v = Number(text);
    const msg = text === '' || !Number.isFinite(v) ? `${label} must be a number, got "${text}"` : validate(v);
    if (msg) {
      setError(msg);
      return;
    }
    setError(null);
    if (v !== value) onCommit(v);
  };
  return (
    <span className="number-field">
      {!compact && <label htmlFor={id}>{label}</label>}
      <input
        id={id}
        type="text"
        inputMode="decimal"
        aria-label={`${label} (${unit || 'no unit'})`}
        title={tip}
        data-testid={testId}
        value={draft}
        step={step}
        aria-invalid={error !== null}
        onChange={(e) => setDraft(e.target.value)}
        onBlur={commit}
        onKeyDown={(e) => {
          if (e.key === 'Enter') commit();
          if (e.key === 'Escape') {
            setDraft(shown);
            setError(null);
          }
        }}
      />
      <span className="unit">{unit}</span>
      {error && (
        <span className="field-error" role="alert">
          {error}
        </span>
      )}
    </span>
  );
}

interface LogSliderProps {
  label: string;
  value: number;
  min: number;
  max: number;
  unit: string;
  tip: string;
  testId: string;
  onChange: (v: number) => void;
  /** Allow exactly 0 (the leftmost slider position, and typed 0). */
  allowZero?: boolean;
  /**
   * Runs each edit made with the slider itself (dragged, or stepped with the arrow keys), not typed
   * ones, so the caller can treat them as one continuous gesture (the undo history coalesces them).
   */
  continuous?: (edit: () => void) => void;
}

/** A slider on a log scale between min and max, with a typed input (any positive value is accepted). */
export function LogSlider({ label, value, min, max, unit, tip, testId, onChange, allowZero, continuous }: LogSliderProps) {
  const id = useId();
  const pos = allowZero && value === 0 ? 0 : Math.max(allowZero ? 1 : 0, toSlider(value, min, max));
  return (
    <div className="log-slider">
      <label htmlFor={id} title={tip}>
        {label}
      </label>
      <input
        id={id}
        type="range"
        min={0}
        max={STEPS}
        step={1}
        value={pos}
        title={tip}
        aria-valuetext={`${fieldText(value)} ${unit}`.trim()}
        data-testid={`${testId}-slider`}
        onChange={(e) => {
          noteInteraction();
          const p = Number(e.target.value);
          const edit = () => onChange(allowZero && p === 0 ? 0 : fromSlider(p, min, max));
          if (continuous) continuous(edit);
          else edit();
        }}
      />
      <NumberField
        label={label}
        value={value}
        unit={unit}
        tip={tip}
        testId={`${testId}-input`}
        compact
        validate={(v) => (allowZero ? (v < 0 ? `${label} must be ≥ 0` : null) : v <= 0 ? `${label} must be > 0` : null)}
        onCommit={onChange}
      />
    </div>
  );
}
