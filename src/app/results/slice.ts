/**
 * The results slice of the workbench store (spread into it by ../store.ts): everything computed for
 * the current prior (posterior, diagnostics, realisations, averaging kernel, covariance view), with
 * per-channel errors, busy flags and the key each result was computed for. `refresh` requests what
 * the open screen needs and is not up to date; each channel's newest request wins (../../worker/client.ts).
 */
import { cellCount, gridDimension, isCellList } from '../../core/grid/grid.ts';
import type { Matrix } from '../../core/linalg/matrix.ts';
import type { Diagnostics } from '../../core/prior/diagnostics.ts';
import type { ClientPort, Outcome } from '../../worker/client.ts';
import type { Channel, PosteriorPartial, PosteriorResult } from '../../worker/protocol.ts';
import { DRAW_COUNT, startCell } from '../defaults.ts';
import type { StoreGet, StoreSet } from '../store.ts';

/**
 * Cells × data from which the positive-definiteness verdict is asked for only after the posterior mean is drawn (a 32³
 * grid with 1,000 rays is 3.3·10⁷: its verdict took a core from the mean for 0.8 s; a 128² grid with 400 data, 6.6·10⁶,
 * starts both at once). Our choice.
 */
export const HEAVY_POSTERIOR = 1e7;

/** Largest N for which the covariance heat map is requested. */
export const COVARIANCE_VIEW_CELLS = 400;

/** Performance mark of a redrawn posterior plot, read by the UI benchmark (test/bench/ui.ts). */
export const MARK_POSTERIOR_DRAWN = 'ps:posterior-drawn';

type ResultChannel = Exclude<Channel, 'problem'>;

export interface ResultsState {
  /** The newest complete posterior (mean and bands of one prior); exports and the report use only this. */
  posterior: PosteriorResult | null;
  /**
   * The mean of a newer posterior request whose bands are still being computed (or failed), drawn
   * instead of `posterior` until the full result replaces it (../posteriorView.ts). Never stored in
   * the undo history, the autosave or a share link, which hold priors only.
   */
  posteriorPartial: PosteriorPartial | null;
  diagnostics: Diagnostics | null;
  priorDraws: Matrix | null;
  posteriorDraws: Matrix | null;
  resolution: { cell: number; row: Float64Array } | null;
  covariance: Matrix | null;
  /** Error message per channel for the current prior (null when fine). */
  errors: Partial<Record<ResultChannel, string>>;
  busy: Partial<Record<ResultChannel, boolean>>;
  /** Key (revision, seed, cell) each result was computed for; avoids recomputing on tab switches. */
  computedFor: Partial<Record<ResultChannel, string>>;
  progress: { channel: Channel; stage: string; fraction: number } | null;
}

export interface ResultsSlice extends ResultsState {
  setProgress(p: ResultsState['progress']): void;
  /** Request every result the current screen needs that is not up to date. */
  refresh(): void;
}

/** The results with nothing computed (progress is kept as it is). */
export const emptyResults = (): Omit<ResultsState, 'progress'> => ({
  posterior: null,
  posteriorPartial: null,
  diagnostics: null,
  priorDraws: null,
  posteriorDraws: null,
  resolution: null,
  covariance: null,
  errors: {},
  busy: {},
  computedFor: {},
});

export function createResultsSlice(set: StoreSet, get: StoreGet, client: ClientPort): ResultsSlice {
  /**
   * Run one channel's request and store its result (ignoring superseded outcomes); `describe`
   * turns a failure into the message shown (default: the error's own).
   */
  const run = <T>(
    channel: ResultChannel,
    key: string,
    call: () => Promise<Outcome<T>>,
    apply: (value: T) => Partial<ResultsState>,
    describe: (message: string) => string = (m) => m,
  ) => {
    const s = get();
    if (s.computedFor[channel] === key && !s.errors[channel]) return;
    set({ busy: { ...get().busy, [channel]: true }, computedFor: { ...get().computedFor, [channel]: key } });
    call().then(
      (o) => {
        if (o.superseded) return;
        const errors = { ...get().errors };
        delete errors[channel];
        set({ ...apply(o.value), errors, busy: { ...get().busy, [channel]: false }, progress: null });
      },
      (e: unknown) => {
        const computedFor = { ...get().computedFor };
        delete computedFor[channel];
        set({
          errors: { ...get().errors, [channel]: describe(e instanceof Error ? e.message : String(e)) },
          busy: { ...get().busy, [channel]: false },
          computedFor,
          progress: null,
        });
      },
    );
  };

  return {
    ...emptyResults(),
    progress: null,

    setProgress(progress) {
      set({ progress });
    },

    refresh() {
      const s = get();
      const prior = s.prior;
      const problem = s.problem;
      if (!prior || !problem || s.problemStatus !== 'ready') return;
      const rev = `${problem.version}:${s.priorRevision}`;
      // Mean first, bands later (FFT path, large problems): a partial of the current request is
      // drawn at once; the full result replaces it. If the bands then fail, the mean stays.
      let partialShown = false;
      // Resolves when this refresh's posterior has drawn its mean (partial or full), or at once when none was asked.
      let meanReady: Promise<unknown> = Promise.resolve();
      run(
        'posterior',
        rev,
        () => {
          let partialArrived = () => {};
          const partial = new Promise<void>((r) => {
            partialArrived = r;
          });
          const full = client.posterior(prior, (posteriorPartial) => {
            partialArrived();
            const now = get();
            if (now.computedFor.posterior !== rev || now.problem?.version !== problem.version) return;
            partialShown = true;
            set({ posteriorPartial });
          });
          // Never rejects: a failed posterior lets a waiting verdict go ahead (and leaves no unhandled rejection).
          meanReady = Promise.race([partial, full]).then(
            () => undefined,
            () => undefined,
          );
          return full;
        },
        (posterior) => ({ posterior, posteriorPartial: null }),
        (message) =>
          partialShown ? `the uncertainty bands could not be computed (${message}); the posterior mean is shown without them` : message,
      );
      // A 3-D problem and a cell list have one screen each (every field there): their draws and the chosen cell's
      // resolution row on every tab.
      const oneScreen = isCellList(problem.grid) || gridDimension(problem.grid) === 3;
      if ((s.tab === 'posterior' && s.selectedCell !== null) || oneScreen) {
        const cell = s.selectedCell ?? startCell(problem.grid);
        run(
          'resolution',
          `${rev}:${cell}`,
          () => client.resolution(prior, cell),
          (resolution) => ({ resolution }),
        );
      }
      // Prior draws before the diagnostics: both go to the same worker, and the overview waits for the draws.
      if (s.tab === 'realisations' || s.tab === 'overview' || oneScreen) {
        const key = `${rev}:${s.seed}`;
        const seed = s.seed;
        run(
          'priorDraws',
          key,
          () => client.priorDraws(prior, DRAW_COUNT, seed),
          (priorDraws) => ({ priorDraws }),
        );
      }
      // A heavy posterior (N·M ≥ HEAVY_POSTERIOR) gets both cores first: the verdict's request waits for the mean to be
      // drawn (busy at once, so nothing looks settled meanwhile) and is dropped if a newer refresh took the channel.
      const heavy = cellCount(problem.grid) * problem.dataCount >= HEAVY_POSTERIOR;
      const verdict = () => client.diagnostics(prior);
      run(
        'diagnostics',
        rev,
        () =>
          heavy ? meanReady.then(() => (get().computedFor.diagnostics === rev ? verdict() : { superseded: true as const })) : verdict(),
        (diagnostics) => ({ diagnostics }),
      );
      if (s.tab === 'realisations' || oneScreen) {
        const key = `${rev}:${s.seed}`;
        const seed = s.seed;
        run(
          'posteriorDraws',
          key,
          () => client.posteriorDraws(prior, DRAW_COUNT, seed),
          (posteriorDraws) => ({ posteriorDraws }),
        );
      }
      if (s.tab === 'prior' && cellCount(problem.grid) <= COVARIANCE_VIEW_CELLS) {
        run(
          'covariance',
          rev,
          () => client.covariance(prior),
          (covariance) => ({ covariance }),
        );
      }
    },
  };
}
