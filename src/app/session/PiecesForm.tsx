/**
 * "From pieces": G (.csv / .mtx / .npy), data (.csv value,sigma or .npy), an optional data
 * covariance, an optional geometry CSV (src/core/io/geometryCsv.ts), the data unit and the grid typed in. Checked by src/core/io/pieces.ts (in the parse worker);
 * a bad field or file is reported with its name and nothing changes.
 */
import { useRef, useState, type FormEvent } from 'react';
import { useWorkbenchStore } from '../context.ts';
import { readFiles } from '../io/parseClient.ts';
import type { GridForm } from '../../core/io/pieces.ts';

/** Text fields → numbers; an empty optional field is undefined, anything else must parse. */
export function formNumber(text: string): number {
  const t = text.trim();
  return t === '' ? Number.NaN : Number(t);
}

export function PiecesForm() {
  const store = useWorkbenchStore();
  const [open, setOpen] = useState(false);
  const form = useRef<HTMLFormElement>(null);

  const submit = async (e: FormEvent) => {
    e.preventDefault();
    const f = new FormData(form.current!);
    const file = (k: string) => {
      const v = f.get(k);
      return v instanceof File && v.name !== '' ? v : null;
    };
    const str = (k: string) => String(f.get(k) ?? '').trim();
    const g = file('operator');
    const d = file('data');
    const c = file('covariance');
    const geo = file('geometry');
    if (!g || !d) {
      store.setState({ loadError: `from pieces: choose ${!g ? 'the operator G file' : 'the data file'}` });
      return;
    }
    const twoD = str('ny') !== '';
    const grid: GridForm = {
      shape: twoD ? [formNumber(str('nx')), formNumber(str('ny'))] : [formNumber(str('nx'))],
      spacing: twoD ? [formNumber(str('dx')), formNumber(str('dy'))] : [formNumber(str('dx'))],
      ...(str('x0') !== '' || str('y0') !== ''
        ? { origin: twoD ? [formNumber(str('x0') || '0'), formNumber(str('y0') || '0')] : [formNumber(str('x0') || '0')] }
        : {}),
      ...(str('unit') ? { unit: str('unit') } : {}),
    };
    try {
      const [operator, data, ...rest] = await readFiles([g, d, ...(c ? [c] : []), ...(geo ? [geo] : [])]);
      const covariance = c ? rest[0] : undefined;
      const geometry = geo ? rest[c ? 1 : 0] : undefined;
      const ok = await store.getState().loadPieces({
        grid,
        operator: operator!,
        data: data!,
        ...(covariance ? { covariance } : {}),
        ...(geometry ? { geometry } : {}),
        ...(str('dunit') ? { dataUnit: str('dunit') } : {}),
        ...(str('title') ? { title: str('title') } : {}),
        ...(str('quantity') ? { quantity: { name: str('quantity'), ...(str('qunit') ? { unit: str('qunit') } : {}) } } : {}),
      });
      if (ok) setOpen(false);
    } catch (err) {
      store.setState({ loadError: err instanceof Error ? err.message : String(err) });
    }
  };

  return (
    <span className="menu" style={{ position: 'relative' }}>
      <button
        type="button"
        data-testid="pieces-toggle"
        aria-expanded={open}
        onClick={() => setOpen(!open)}
        title="G, data and grid as separate files and fields"
      >
        From pieces…
      </button>
      {open && (
        <form ref={form} className="pieces-form" data-testid="pieces-form" onSubmit={(e) => void submit(e)}>
          <label htmlFor="pf-g">G (.csv, .mtx, .npy)</label>
          <input id="pf-g" name="operator" type="file" accept=".csv,.txt,.mtx,.npy" data-testid="pieces-operator" />
          <label htmlFor="pf-d">Data (.csv value,sigma or .npy)</label>
          <input id="pf-d" name="data" type="file" accept=".csv,.txt,.npy" data-testid="pieces-data" />
          <label htmlFor="pf-c">Data covariance (optional)</label>
          <input id="pf-c" name="covariance" type="file" accept=".csv,.txt,.mtx,.npy" data-testid="pieces-covariance" />
          <label htmlFor="pf-geo">Geometry (optional .csv: x[,y] or sx,sy,rx,ry)</label>
          <input id="pf-geo" name="geometry" type="file" accept=".csv,.txt" data-testid="pieces-geometry" />
          <label htmlFor="pf-du">Data unit</label>
          <input id="pf-du" name="dunit" placeholder="ms" data-testid="pieces-data-unit" />
          <span>Cells nx, ny</span>
          <span className="dims">
            <input name="nx" aria-label="nx (cells along x)" data-testid="pieces-nx" inputMode="numeric" />
            <input name="ny" aria-label="ny (cells along y; empty for 1-D)" data-testid="pieces-ny" inputMode="numeric" placeholder="1-D" />
          </span>
          <span>Spacing dx, dy</span>
          <span className="dims">
            <input name="dx" aria-label="dx (cell spacing along x)" data-testid="pieces-dx" inputMode="decimal" />
            <input name="dy" aria-label="dy (cell spacing along y)" data-testid="pieces-dy" inputMode="decimal" />
          </span>
          <span>Origin x0, y0</span>
          <span className="dims">
            <input name="x0" aria-label="x0 (first cell centre)" inputMode="decimal" placeholder="0" />
            <input name="y0" aria-label="y0" inputMode="decimal" placeholder="0" />
          </span>
          <label htmlFor="pf-u">Length unit</label>
          <input id="pf-u" name="unit" placeholder="m" data-testid="pieces-unit" />
          <label htmlFor="pf-t">Title</label>
          <input id="pf-t" name="title" data-testid="pieces-title" />
          <span>Quantity, unit</span>
          <span className="dims">
            <input name="quantity" aria-label="quantity name" placeholder="value" />
            <input name="qunit" aria-label="quantity unit" />
          </span>
          <button type="submit" className="wide" data-testid="pieces-load">
            Load from pieces
          </button>
        </form>
      )}
    </span>
  );
}
