/**
 * The per-cell parts of the prior that used to need a prior file: the explicit mean m₀ (one value
 * per cell) and the standard-deviation profile s (Cm = S C S + nugget·I, S = diag(s)), each read
 * from a .csv or .npy of N values (src/core/io/cellValues.ts). A bad file is reported by name and
 * the prior is left as it was.
 */
import { useRef, type ChangeEvent } from 'react';
import { cellCount, isCellList } from '../../core/grid/grid.ts';
import { parseCellValues, type CellValuesKind } from '../../core/io/cellValues.ts';
import type { PriorSpec } from '../../core/prior/spec.ts';
import { formatNumber } from '../../core/format.ts';
import { useWb, useWorkbenchStore } from '../context.ts';
import { readFiles } from '../io/parseClient.ts';

/** The prior with the file's values as its mean or std profile. */
export function withCellValues(prior: PriorSpec, kind: CellValuesKind, values: Float64Array | null): PriorSpec {
  if (kind === 'mean') return values ? { ...prior, mean: { values: Array.from(values) } } : prior;
  const { stdProfile: _dropped, ...rest } = prior;
  return values ? { ...rest, stdProfile: Array.from(values) } : rest;
}

export function PerCellFields() {
  const store = useWorkbenchStore();
  const problem = useWb((s) => s.problem);
  const profile = useWb((s) => s.prior?.stdProfile ?? null);
  const meanRef = useRef<HTMLInputElement>(null);
  const stdRef = useRef<HTMLInputElement>(null);
  if (!problem) return null;
  const n = cellCount(problem.grid);

  const load = (kind: CellValuesKind) => async (e: ChangeEvent<HTMLInputElement>) => {
    const f = e.currentTarget.files?.[0];
    e.currentTarget.value = '';
    if (!f) return;
    try {
      const [file] = await readFiles([f]);
      const s = store.getState();
      if (!s.problem || !s.prior) return;
      const values = parseCellValues(file!.name, file!.bytes, s.problem.grid, kind);
      s.setPrior(withCellValues(s.prior, kind, values));
    } catch (err) {
      store.setState({ loadError: err instanceof Error ? err.message : String(err) });
    }
  };

  const range = (a: readonly number[]) => `${formatNumber(Math.min(...a))} to ${formatNumber(Math.max(...a))}`;
  return (
    <fieldset data-testid="per-cell">
      <legend>
        Per cell (from a file of {n} values, {isCellList(problem.grid) ? 'in the order of the cell centres' : 'x fastest'})
      </legend>
      <button
        type="button"
        data-testid="mean-file"
        onClick={() => meanRef.current?.click()}
        title="A .csv with one column of N values or a .npy of shape (N,) or (ny, nx): m₀ in each cell"
      >
        Mean m₀ from file…
      </button>
      <input
        ref={meanRef}
        type="file"
        hidden
        accept=".csv,.txt,.npy"
        title="File of N mean values"
        data-testid="mean-file-input"
        onChange={(e) => void load('mean')(e)}
      />{' '}
      <button
        type="button"
        data-testid="std-profile-file"
        onClick={() => stdRef.current?.click()}
        title="Standard-deviation profile s (> 0, N values): Cm = S C S + nugget·I with S = diag(s)"
      >
        Std profile from file…
      </button>
      <input
        ref={stdRef}
        type="file"
        hidden
        accept=".csv,.txt,.npy"
        title="File of N standard deviations"
        data-testid="std-profile-input"
        onChange={(e) => void load('std')(e)}
      />
      {profile && (
        <p className="hint" data-testid="std-profile-state">
          Std profile s: {range(profile)} (multiplies the correlated terms; the nugget is added after){' '}
          <button
            type="button"
            data-testid="std-profile-clear"
            onClick={() => store.getState().setPrior(withCellValues(store.getState().prior!, 'std', null))}
          >
            Remove
          </button>
        </p>
      )}
    </fieldset>
  );
}
