/**
 * The session bar under the header: open your own problem (files, drag-and-drop, or pieces with
 * a grid form), import / export, undo / redo, share link, start over, autosave status.
 * Every text that comes from a file (names, titles, messages) is rendered as React text.
 */
import { useEffect, useRef, useState, type FormEvent } from 'react';
import { useWb, useWorkbenchStore } from '../context.ts';
import { isCellList } from '../../core/grid/grid.ts';
import { readFiles } from '../io/parseClient.ts';
import { LoadError } from '../io/parseClient.ts';
import { exportCovariance, exportDraws, exportPlots, exportPosterior, exportPrior, openReport, shareLink } from './actions.ts';
import { PiecesForm } from './PiecesForm.tsx';
import './session.css';

/** The typed number of realisations, or an Error naming the field. */
function drawCountOf(text: string): number {
  const n = Number(text.trim());
  if (!Number.isInteger(n) || n < 1) throw new Error(`Realisations to export must be a whole number ≥ 1, got ${JSON.stringify(text)}`);
  return n;
}

function guarded<T>(f: () => Promise<T>, onError: (m: string) => void): () => void {
  return () => {
    f().catch((e: unknown) => onError(e instanceof Error ? e.message : String(e)));
  };
}

export function SessionBar() {
  const store = useWorkbenchStore();
  const loadStatus = useWb((s) => s.loadStatus);
  const loadError = useWb((s) => s.loadError);
  const warnings = useWb((s) => s.loadWarnings);
  const canUndo = useWb((s) => s.history.past.length > 0);
  const canRedo = useWb((s) => s.history.future.length > 0);
  const user = useWb((s) => s.userProblem?.label ?? null);
  const title = useWb((s) => s.problem?.title ?? '');
  const saveStatus = useWb((s) => s.saveStatus);
  const ready = useWb((s) => s.problemStatus === 'ready');
  const hasPosterior = useWb((s) => s.posterior !== null);
  // The report is drawn on a grid (a volume on its middle section); a cell list has none.
  const onCells = useWb((s) => s.problem !== null && isCellList(s.problem.grid));
  const noReport = onCells ? 'The report is drawn on a regular grid; for a cell list, export the posterior CSV and the prior' : undefined;
  const [link, setLink] = useState<string | null>(null);
  const [drawCount, setDrawCount] = useState('100');
  const [dragging, setDragging] = useState(false);
  const filesRef = useRef<HTMLInputElement>(null);
  const priorRef = useRef<HTMLInputElement>(null);
  const s = store.getState();
  const fail = (m: string) => store.setState({ loadError: m });

  const openFiles = async (list: FileList | File[] | null) => {
    if (!list || list.length === 0) return;
    try {
      await s.loadProblemFiles(await readFiles([...list]));
    } catch (e) {
      store.setState({ loadError: e instanceof LoadError || e instanceof Error ? e.message : String(e) });
    }
  };

  // Drag-and-drop anywhere on the page.
  useEffect(() => {
    const over = (e: DragEvent) => {
      if (!e.dataTransfer?.types.includes('Files')) return;
      e.preventDefault();
      setDragging(true);
    };
    const leave = (e: DragEvent) => {
      if (e.relatedTarget === null) setDragging(false);
    };
    const drop = (e: DragEvent) => {
      if (!e.dataTransfer?.files.length) return;
      e.preventDefault();
      setDragging(false);
      void openFiles(e.dataTransfer.files);
    };
    window.addEventListener('dragover', over);
    window.addEventListener('dragleave', leave);
    window.addEventListener('drop', drop);
    return () => {
      window.removeEventListener('dragover', over);
      window.removeEventListener('dragleave', leave);
      window.removeEventListener('drop', drop);
    };
  });

  const onPrior = async (e: FormEvent<HTMLInputElement>) => {
    const f = e.currentTarget.files?.[0];
    e.currentTarget.value = '';
    if (!f) return;
    try {
      const [file] = await readFiles([f]);
      await s.importPrior(file!);
    } catch (err) {
      fail(err instanceof Error ? err.message : String(err));
    }
  };

  return (
    <div className={`session-bar${dragging ? ' dragging' : ''}`} data-testid="session-bar">
      <span className="group">
        <button
          type="button"
          onClick={() => filesRef.current?.click()}
          title="A problem .json with the files it names (choose them together), or drop them on the page"
        >
          Open problem files…
        </button>
        <input
          ref={filesRef}
          type="file"
          multiple
          hidden
          accept=".json,.csv,.txt,.mtx,.npy"
          data-testid="load-files-input"
          onChange={(e) => {
            const files = e.currentTarget.files ? [...e.currentTarget.files] : [];
            e.currentTarget.value = '';
            void openFiles(files);
          }}
        />
        <PiecesForm />
        <span
          className="template"
          title="A small invented problem to start from: the .json names G.mtx; data.csv and geometry.csv are for “From pieces”"
        >
          templates:{' '}
          {['problem.json', 'G.mtx', 'data.csv', 'geometry.csv'].map((f) => (
            <a key={f} href={`templates/${f}`} download={f} data-testid={`template-${f}`}>
              {f}{' '}
            </a>
          ))}
        </span>
      </span>
      <span className="group">
        <button type="button" data-testid="undo" disabled={!canUndo} onClick={() => s.undo()} title="Undo the last prior edit (Ctrl/Cmd+Z)">
          ↶ Undo
        </button>
        <button type="button" data-testid="redo" disabled={!canRedo} onClick={() => s.redo()} title="Redo (Shift+Ctrl/Cmd+Z)">
          ↷ Redo
        </button>
      </span>
      <details className="menu">
        <summary data-testid="export-menu">Export</summary>
        <div className="menu-items">
          <button type="button" data-testid="export-prior" disabled={!ready} onClick={() => exportPrior(store)}>
            Prior (.json)
          </button>
          <button type="button" data-testid="import-prior" disabled={!ready} onClick={() => priorRef.current?.click()}>
            Import prior…
          </button>
          <input ref={priorRef} type="file" hidden accept=".json" data-testid="import-prior-input" onChange={(e) => void onPrior(e)} />
          <button type="button" data-testid="export-posterior-csv" disabled={!hasPosterior} onClick={() => exportPosterior(store, 'csv')}>
            Posterior mean + std (.csv)
          </button>
          <button type="button" data-testid="export-posterior-npy" disabled={!hasPosterior} onClick={() => exportPosterior(store, 'npy')}>
            Posterior mean + std (.npy)
          </button>
          <label
            className="draw-count"
            title="Realisations to export, draws × cells as priorscope sample writes them, with the grid in a .grid.json beside them"
          >
            Realisations to export{' '}
            <input
              type="number"
              min={1}
              step={1}
              value={drawCount}
              onChange={(e) => setDrawCount(e.currentTarget.value)}
              data-testid="export-draw-count"
              style={{ width: '6em' }}
            />
          </label>
          {(['prior', 'posterior'] as const).map((w) =>
            (['csv', 'npy'] as const).map((f) => (
              <button
                key={w + f}
                type="button"
                data-testid={`export-${w}-draws-${f}`}
                disabled={!ready}
                onClick={guarded(() => exportDraws(store, w, f, drawCountOf(drawCount)), fail)}
              >
                {drawCount} {w === 'prior' ? 'prior' : 'posterior'} realisations (.{f} + grid)
              </button>
            )),
          )}
          {(['covariance', 'cholesky'] as const).map((form) => (
            <button
              key={form}
              type="button"
              data-testid={`export-${form}-npy`}
              disabled={!ready}
              title="Dense N × N float64 .npy for grids up to 4096 cells (128 MiB), with the grid in a .grid.json beside it"
              onClick={guarded(() => exportCovariance(store, form), fail)}
            >
              {form === 'covariance' ? 'Dense Cm (.npy)' : 'Cholesky factor L of Cm, L Lᵀ = Cm (.npy)'}
            </button>
          ))}
          <button type="button" data-testid="export-plots-png" onClick={guarded(() => exportPlots('png', title), fail)}>
            Plots on this screen (.png, twice the screen size)
          </button>
          <button type="button" data-testid="export-plots-svg" onClick={guarded(() => exportPlots('svg', title), fail)}>
            Plots on this screen (.svg)
          </button>
          <button
            type="button"
            data-testid="report-open"
            disabled={!hasPosterior || onCells}
            title={noReport}
            onClick={guarded(() => openReport(store, 'open'), fail)}
          >
            One-page report (open)
          </button>
          <button
            type="button"
            data-testid="report-download"
            disabled={!hasPosterior || onCells}
            title={noReport}
            onClick={guarded(() => openReport(store, 'download'), fail)}
          >
            One-page report (.html)
          </button>
        </div>
      </details>
      <span className="group">
        <button
          type="button"
          data-testid="share"
          disabled={!ready}
          onClick={guarded(async () => setLink(await shareLink(store)), fail)}
          title="A link holding the prior (and the built-in problem)"
        >
          Share link
        </button>
        {link && (
          <input
            className="share-link"
            readOnly
            data-testid="share-link"
            value={link}
            aria-label="Share link (a link takes precedence over the autosaved session when opened)"
            onFocus={(e) => e.currentTarget.select()}
          />
        )}
        {link && <span className="hint">opening it takes precedence over the autosaved session</span>}
        <button
          type="button"
          data-testid="start-over"
          onClick={() => void s.startOver()}
          title="Forget the saved session and open the demo"
        >
          Start over with demo
        </button>
      </span>
      <span className="source" data-testid="problem-source">
        {user ? `Your problem: ${title} (${user})` : null}
      </span>
      <span className="save" data-testid="autosave-status">
        {loadStatus !== 'idle'
          ? 'Reading files …'
          : saveStatus === 'saved'
            ? 'Saved'
            : saveStatus === 'pending'
              ? 'Saving …'
              : saveStatus === 'failed'
                ? 'Autosave failed'
                : ''}
      </span>
      {loadError && (
        <div className="load-error" role="alert" data-testid="load-error">
          <span>Nothing was changed. {loadError}</span>{' '}
          <button type="button" onClick={() => s.dismissLoadError()}>
            OK
          </button>
        </div>
      )}
      {warnings.length > 0 && !loadError && (
        <div className="load-warnings" data-testid="load-warnings">
          {warnings.map((w, i) => (
            <div key={i}>{w}</div>
          ))}
        </div>
      )}
    </div>
  );
}
