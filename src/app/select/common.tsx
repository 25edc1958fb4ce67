/** Small shared pieces of the prior-selection screen: task status line with progress and Cancel. */
import { useWb } from '../context.ts';
import type { TuningKind } from '../../worker/tuningProtocol.ts';
import type { Task } from './slice.ts';

export function TaskStatusLine({ kind, task, label }: { kind: TuningKind; task: Task<unknown>; label: string }) {
  const progress = useWb((s) => (s.progress?.channel === kind ? s.progress : null));
  const cancel = useWb((s) => s.cancelTuning);
  const running = task.status === 'running';
  return (
    <span className="sel-status" data-testid={`${kind}-status`} data-status={task.status} aria-live="polite">
      {running && (
        <>
          <progress data-testid={`${kind}-progress`} max={1} value={progress?.fraction ?? 0} aria-label={`${label} progress`} />
          <span className="note">{progress ? `${progress.stage}` : `${label} …`}</span>
          <button type="button" data-testid={`${kind}-cancel`} onClick={() => cancel(kind)}>
            Cancel
          </button>
        </>
      )}
      {task.status === 'cancelled' && <span className="note">{label}: cancelled</span>}
      {task.status === 'error' && (
        <span className="error" role="alert">
          {label}: {task.error}
        </span>
      )}
    </span>
  );
}

/** A number with its full-precision value in data-value (read by the end-to-end tests). */
export function Num({ value, text, testId }: { value: number | null; text: string; testId?: string }) {
  return (
    <span
      className="num"
      data-testid={testId}
      data-value={value === null ? '' : String(value)}
      title={value === null ? undefined : String(value)}
    >
      {text}
    </span>
  );
}
