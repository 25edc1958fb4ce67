/** The workbench shell: header with demo picker, prior panel, status, tabbed screens, caution footer. */
import { assertNever } from '../core/errors.ts';
import { useRef, type KeyboardEvent } from 'react';
import { DEMO_CHOICES } from './demos.ts';
import { useWb } from './context.ts';
import { PriorPanel } from './PriorPanel.tsx';
import { StatusPanel } from './StatusPanel.tsx';
import { CellsScreen, FitScreen, PosteriorScreen, PriorScreen, ProblemScreen, RealisationsScreen, VolumeScreen } from './screens/index.ts';
import { gridDimension, isCellList } from '../core/grid/grid.ts';
import { TABS, type TabId } from './view/slice.ts';
import { SelectScreen } from './select/SelectScreen.tsx';
import { OverviewScreen } from './overview/OverviewScreen.tsx';
import { SessionBar } from './session/SessionBar.tsx';
import { CAUTION } from './caution.ts';
import { indexedDbStorage } from './session/autosave.ts';
import { restorePreviousSession } from './session/start.ts';

/** Value of the selector's entry for the user's own problem (not a demo id). */
const USER_OPTION = '__user-problem__';

/** Puts the session kept aside by a link or a ?demo= address back, and reopens the page on it. */
async function restorePrevious(): Promise<void> {
  if (typeof indexedDB === 'undefined') return;
  if (await restorePreviousSession(indexedDbStorage())) location.assign(location.pathname);
}

function Screen({ tab }: { tab: TabId }) {
  const volume = useWb((s) => (s.problem && !isCellList(s.problem.grid) ? gridDimension(s.problem.grid) === 3 : false));
  const cells = useWb((s) => (s.problem ? isCellList(s.problem.grid) : false));
  // A cell list (the user's own mesh) has one screen on every tab: the prior-selection studies need a grid.
  if (cells) return <CellsScreen />;
  if (volume && tab !== 'select') return <VolumeScreen />;
  switch (tab) {
    case 'overview':
      return <OverviewScreen />;
    case 'problem':
      return <ProblemScreen />;
    case 'prior':
      return <PriorScreen />;
    case 'realisations':
      return <RealisationsScreen />;
    case 'posterior':
      return <PosteriorScreen />;
    case 'fit':
      return <FitScreen />;
    case 'select':
      return <SelectScreen />;
    default:
      return assertNever(tab, 'tab');
  }
}

export function App() {
  const demoId = useWb((s) => s.demoId);
  const loadDemo = useWb((s) => s.loadDemo);
  const status = useWb((s) => s.problemStatus);
  const problemError = useWb((s) => s.problemError);
  const tab = useWb((s) => s.tab);
  const setTab = useWb((s) => s.setTab);
  const notice = useWb((s) => s.notice);
  // The selector names what is loaded: the user's problem (title, else file names) or the demo.
  const userTitle = useWb((s) => (s.userProblem ? (s.problem?.title ?? s.userProblem.label) : null));
  const previousKept = useWb((s) => s.previousSessionKept);
  const dismiss = useWb((s) => s.dismissNotice);
  const progress = useWb((s) => s.progress);
  const busy = useWb((s) => Object.values(s.busy).some(Boolean));
  const tabRefs = useRef<(HTMLButtonElement | null)[]>([]);

  const onTabKey = (e: KeyboardEvent, i: number) => {
    const n = TABS.length;
    const j =
      e.key === 'ArrowRight' ? (i + 1) % n : e.key === 'ArrowLeft' ? (i + n - 1) % n : e.key === 'Home' ? 0 : e.key === 'End' ? n - 1 : -1;
    if (j < 0) return;
    e.preventDefault();
    setTab(TABS[j].id);
    tabRefs.current[j]?.focus();
  };

  return (
    <div className="app">
      <header className="top">
        <h1>Priorscope</h1>
        <label className="inline demo-picker">
          Problem{' '}
          <select
            data-testid="demo-select"
            value={userTitle !== null ? USER_OPTION : demoId}
            onChange={(e) => e.target.value !== USER_OPTION && void loadDemo(e.target.value)}
            title={
              userTitle !== null ? 'Your own problem is loaded; choose a built-in example to switch' : 'Built-in invented example problems'
            }
          >
            {userTitle !== null && (
              <option value={USER_OPTION} disabled>
                Your problem: {userTitle}
              </option>
            )}
            {DEMO_CHOICES.map((d) => (
              <option key={d.id} value={d.id}>
                {d.title}
              </option>
            ))}
          </select>
        </label>
        <span className="activity" data-testid="activity" aria-live="polite">
          {status === 'loading' ? 'Loading problem …' : progress ? `${progress.stage} …` : busy ? 'Computing …' : 'Up to date'}
        </span>
        <StatusPanel />
      </header>
      <SessionBar />
      {notice && (
        <div className="notice" role="status">
          {notice}{' '}
          {previousKept && (
            <button type="button" data-testid="restore-previous" onClick={() => void restorePrevious()}>
              Restore the earlier session
            </button>
          )}{' '}
          <button type="button" onClick={dismiss}>
            OK
          </button>
        </div>
      )}
      <div className="body">
        <PriorPanel />
        <main className="main">
          <div role="tablist" aria-label="Screens" className="tabs">
            {TABS.map((t, i) => (
              <button
                type="button"
                key={t.id}
                ref={(el) => {
                  tabRefs.current[i] = el;
                }}
                role="tab"
                id={`tab-${t.id}`}
                data-testid={`tab-${t.id}`}
                aria-selected={tab === t.id}
                aria-controls="screen"
                tabIndex={tab === t.id ? 0 : -1}
                onClick={() => setTab(t.id)}
                onKeyDown={(e) => onTabKey(e, i)}
              >
                {t.label}
              </button>
            ))}
          </div>
          <div id="screen" role="tabpanel" aria-labelledby={`tab-${tab}`} className="tabpanel">
            {status === 'error' && (
              <p className="error" role="alert" data-testid="problem-error">
                Could not load the problem: {problemError}
              </p>
            )}
            {status === 'ready' && <Screen tab={tab} />}
          </div>
        </main>
      </div>
      <footer className="caution" data-testid="caution">
        {CAUTION}
      </footer>
    </div>
  );
}
